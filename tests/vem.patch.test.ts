// Patch test of the first-order virtual element method (Beirão da Veiga et al., "Basic
// principles of virtual element methods", 2013): a linear displacement imposed on the
// boundary is reproduced exactly inside, on any polygon mesh.
import { describe, expect, it } from 'vitest';
import { elasticMatrix } from '../src/vem/material.js';
import { cellStresses } from '../src/vem/stress.js';
import type { PolyMesh } from '../src/mesh/polymesh.js';
import { solvePrescribed, rectangleMesh } from './support/elastic.js';
import { distort } from './support/distort.js';

const lin = (x: number, y: number): [number, number] => [1e-3 * (0.4 + 2 * x - 0.5 * y), 1e-3 * (-0.3 + 0.7 * x + 1.5 * y)];

function maxError(m: PolyMesh, u: Float64Array): number {
  let e = 0, s = 0;
  for (let v = 0; v < m.xy.length / 2; v++) {
    const ex = lin(m.xy[2 * v], m.xy[2 * v + 1]);
    e = Math.max(e, Math.abs(u[2 * v] - ex[0]), Math.abs(u[2 * v + 1] - ex[1]));
    s = Math.max(s, Math.abs(ex[0]), Math.abs(ex[1]));
  }
  return e / s;
}

describe('patch test (Beirão da Veiga et al. 2013)', () => {
  const D = elasticMatrix(1000, 0.3, 'plane-stress');
  for (const seed of [1, 2, 3, 4, 5]) {
    it(`random Voronoi mesh, seed ${seed}: linear field exact to 1e-10`, () => {
      const m = rectangleMesh(10, 6, 1.2, seed, seed % 2 === 0 ? 0 : 4);
      const u = solvePrescribed(m, D, 1, lin);
      expect(maxError(m, u)).toBeLessThan(1e-10);
    });
  }
  for (const seed of [1, 2, 3]) {
    it(`non-convex cells and hanging vertices, seed ${seed}: linear field exact to 1e-10`, () => {
      const { mesh, nonConvex, hanging } = distort(rectangleMesh(10, 6, 1.2, seed), seed);
      expect(nonConvex).toBeGreaterThan(0);
      expect(hanging).toBeGreaterThan(0);
      const u = solvePrescribed(mesh, D, 1, lin);
      expect(maxError(mesh, u)).toBeLessThan(1e-10);
      // constant stress of the linear field in every cell
      const s = cellStresses(mesh, u, D);
      const exx = 2e-3, eyy = 1.5e-3, gxy = 0.2e-3;
      const sxx = D[0] * exx + D[1] * eyy, sxy = D[8] * gxy;
      for (let c = 0; c < s.length / 3; c++) {
        expect(Math.abs(s[3 * c] - sxx)).toBeLessThan(1e-9 * sxx);
        expect(Math.abs(s[3 * c + 2] - sxy)).toBeLessThan(1e-9 * sxx);
      }
    });
  }
});
