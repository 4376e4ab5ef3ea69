// Polygon meshing: size field, seeds, clipped Voronoi cells, mesh queries.
export * from './polymesh.js';
export { generateMesh } from './generate.js';
export { makeSizeField, sizeFieldMin, GRADING } from './sizefield.js';
export { prng } from './prng.js';
export * from './stats.js';
