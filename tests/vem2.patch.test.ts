// Patch test of the second-order virtual element method (Beirão da Veiga, Brezzi, Marini,
// Russo 2014, "The hitchhiker's guide to the virtual element method"; Beirão da Veiga, Brezzi,
// Marini 2013, "Virtual elements for linear elasticity problems"): a quadratic displacement
// imposed on the boundary, with the constant body force that balances it, is reproduced
// exactly (to round-off) on any polygon mesh.
import { describe, expect, it } from 'vitest';
import { elasticMatrix } from '../src/vem/material.js';
import { Element2Work, NB, elementStiffness2, projection2 } from '../src/vem/element2.js';
import { stressAt2 } from '../src/vem/system2.js';
import type { PolyMesh } from '../src/mesh/polymesh.js';
import { polyMeshFrom } from '../src/mesh/polymesh.js';
import { rectangleMesh } from './support/elastic.js';
import { distort } from './support/distort.js';
import { solvePrescribed2 } from './support/order2.js';

const C = elasticMatrix(1000, 0.3, 'plane-stress');
// u = Σ a_α m_α, v = Σ b_α m_α on m = [1, x, y, x², xy, y²]
const A = [0.4, 2, -0.5, 0.3, -0.7, 0.25].map((v) => 1e-3 * v), Bc = [-0.3, 0.7, 1.5, -0.4, 0.6, 0.35].map((v) => 1e-3 * v);
const quad = (x: number, y: number): [number, number] => [
  A[0] + A[1] * x + A[2] * y + A[3] * x * x + A[4] * x * y + A[5] * y * y,
  Bc[0] + Bc[1] * x + Bc[2] * y + Bc[3] * x * x + Bc[4] * x * y + Bc[5] * y * y,
];
const strain = (x: number, y: number) => [
  A[1] + 2 * A[3] * x + A[4] * y, Bc[2] + Bc[4] * x + 2 * Bc[5] * y,
  A[2] + A[4] * x + 2 * A[5] * y + Bc[1] + 2 * Bc[3] * x + Bc[4] * y,
];
const mul = (v: number[]) => [0, 1, 2].map((r) => C[3 * r] * v[0] + C[3 * r + 1] * v[1] + C[3 * r + 2] * v[2]);
// body force b = −div σ, constant for a quadratic field
const dx = mul([2 * A[3], Bc[4], A[4] + 2 * Bc[3]]), dy = mul([A[4], 2 * Bc[5], 2 * A[5] + Bc[4]]);
const body: [number, number] = [-(dx[0] + dy[2]), -(dx[2] + dy[1])];

function check(m: PolyMesh) {
  const sol = solvePrescribed2(m, C, 1, quad, body), L = sol.layout;
  let err = 0, scale = 0;
  const at = (d: number, x: number, y: number) => {
    const ex = quad(x, y);
    err = Math.max(err, Math.abs(sol.u[d] - ex[0]), Math.abs(sol.u[d + 1] - ex[1]));
    scale = Math.max(scale, Math.abs(ex[0]), Math.abs(ex[1]));
  };
  for (let v = 0; v < L.nv; v++) at(2 * v, m.xy[2 * v], m.xy[2 * v + 1]);
  for (let e = 0; e < L.ne; e++) {
    const a = L.edgeVerts[2 * e], b = L.edgeVerts[2 * e + 1];
    at(2 * L.nv + 2 * e, (m.xy[2 * a] + m.xy[2 * b]) / 2, (m.xy[2 * a + 1] + m.xy[2 * b + 1]) / 2);
  }
  // the stress of the projection equals the exact linear stress anywhere in the cell
  let serr = 0, sscale = 0;
  const s = [0, 0, 0];
  for (let c = 0; c < m.cellStart.length - 1; c++) {
    const v = m.cellVerts[m.cellStart[c]], x = m.xy[2 * v], y = m.xy[2 * v + 1];
    stressAt2(sol.field, c, C, x, y, s);
    const ex = mul(strain(x, y));
    for (let q = 0; q < 3; q++) { serr = Math.max(serr, Math.abs(s[q] - ex[q])); sscale = Math.max(sscale, Math.abs(ex[q])); }
  }
  return { u: err / scale, s: serr / sscale, interior: sol.nFree };
}

describe('order-2 element (Beirão da Veiga, Brezzi, Marini, Russo 2014)', () => {
  it('Π reproduces [P₂]² (Π* D = I) and the stiffness has exactly three zero-energy modes (common practice) on a non-convex cell with a collinear vertex', () => {
    const m = polyMeshFrom([[0, 0], [2, 0], [3, 0], [3, 2], [1.5, 0.8], [0, 2]], [[0, 1, 2, 3, 4, 5]]);
    const w = new Element2Work(6), n = 6, nd = 4 * n + 2;
    projection2(m.xy, m.cellVerts, 0, 6, w);
    let dev = 0;
    for (let i = 0; i < NB; i++) for (let j = 0; j < NB; j++) {
      let s = 0;
      for (let k = 0; k < nd; k++) s += w.Pi[i * nd + k] * w.Dm[k * NB + j];
      dev = Math.max(dev, Math.abs(s - (i === j ? 1 : 0)));
    }
    expect(dev).toBeLessThan(1e-12);
    const Ke = new Float64Array(nd * nd);
    elementStiffness2(m.xy, m.cellVerts, 0, 6, C, 1, Ke, w);
    // zero modes by Gaussian elimination with full pivoting: count pivots below 1e-10 of the largest
    const a = Array.from(Ke), rows = nd;
    let rank = 0;
    const big = Math.max(...a.map(Math.abs));
    const used = new Array(rows).fill(false);
    for (let col = 0; col < rows; col++) {
      let p = -1, best = 1e-10 * big;
      for (let r = 0; r < rows; r++) if (!used[r] && Math.abs(a[r * rows + col]) > best) { best = Math.abs(a[r * rows + col]); p = r; }
      if (p < 0) continue;
      used[p] = true; rank++;
      for (let r = 0; r < rows; r++) if (r !== p) { const f = a[r * rows + col] / a[p * rows + col]; for (let k = 0; k < rows; k++) a[r * rows + k] -= f * a[p * rows + k]; }
    }
    expect(nd - rank).toBe(3);
  });

  for (const seed of [1, 2, 3]) {
    it(`random Voronoi mesh, seed ${seed}: quadratic field exact to 1e-10`, () => {
      const r = check(rectangleMesh(10, 6, 1.2, seed, seed === 2 ? 0 : 4));
      expect(r.interior).toBeGreaterThan(50); // a real interior, not just boundary dofs
      expect(r.u).toBeLessThan(1e-10);
      expect(r.s).toBeLessThan(1e-9);
    });
  }
  for (const seed of [1, 2]) {
    it(`non-convex cells and hanging vertices, seed ${seed}: quadratic field exact to 1e-10`, () => {
      const { mesh, nonConvex, hanging } = distort(rectangleMesh(10, 6, 1.2, seed), seed);
      expect(nonConvex).toBeGreaterThan(0);
      expect(hanging).toBeGreaterThan(0);
      const r = check(mesh);
      expect(r.u).toBeLessThan(1e-10);
      expect(r.s).toBeLessThan(1e-9);
    });
  }
});
