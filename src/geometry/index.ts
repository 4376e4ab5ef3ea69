// Specimen geometry: domain building and boundary queries.
export * from './domain.js';
export { EdgeGrid } from './edgegrid.js';
export { ringArea, orientRing, flatRing } from './rings.js';
