// Cantilever set-up shared by the order-2 test and the benchmark (Timoshenko & Goodier, Theory
// of Elasticity, 3rd ed.): the exact displacement on the whole boundary of a Voronoi mesh.
import { elasticMatrix } from '../../src/vem/material.js';
import { cantilever } from '../../src/vem/closedform.js';
import { errorNorms1, errorNorms2 } from '../../src/vem/norms.js';
import { boundaryVertices } from '../../src/solver/driven.js';
import { solvePrescribed, rectangleMesh } from './elastic.js';
import { solvePrescribed2 } from './order2.js';
import type { PolyMesh } from '../../src/mesh/polymesh.js';

export const L = 8, DEPTH = 2, E = 1000, NU = 0.3;
const C = elasticMatrix(E, NU, 'plane-stress'), beam = cantilever(L, DEPTH, 1, E, NU);

const now = () => performance.now() / 1000;

/** The Voronoi mesh of the beam for a cell size. */
export const beamMesh = (size: number, seed: number): PolyMesh => rectangleMesh(L, DEPTH, size, seed);

/** Order-2 errors on mesh m; solve_s times the solve alone (assembly, factorization, recovery). */
export function order2(m: PolyMesh) {
  const t0 = now(), sol = solvePrescribed2(m, C, 1, beam.u), solve_s = now() - t0;
  return { ...errorNorms2(m, sol.field, C, beam.u, beam.strain), h: Math.sqrt(L * DEPTH / (m.cellStart.length - 1)), unknowns: sol.nFree, solve_s };
}
/** Order-1 errors on mesh m, solved through the run's System and Newton path. */
export function order1(m: PolyMesh) {
  const t0 = now(), u = solvePrescribed(m, C, 1, beam.u), solve_s = now() - t0, on = boundaryVertices(m);
  return { ...errorNorms1(m, u, C, beam.u, beam.strain), h: Math.sqrt(L * DEPTH / (m.cellStart.length - 1)), unknowns: 2 * (on.length - on.reduce((a, b) => a + b, 0)), solve_s };
}
