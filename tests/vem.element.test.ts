// Element-level checks of the first-order virtual element (dense algebra, small meshes).
import { describe, expect, it } from 'vitest';
import { Matrix, EigenvalueDecomposition, solve } from 'ml-matrix';
import { ElementWork, elementStiffness } from '../src/vem/element.js';
import { elasticMatrix } from '../src/vem/material.js';
import { polyMeshFrom, type PolyMesh } from '../src/mesh/polymesh.js';
import { cellStresses } from '../src/vem/stress.js';

function denseK(m: PolyMesh, D: Float64Array, t = 1): Matrix {
  const nv = m.xy.length / 2, K = Matrix.zeros(2 * nv, 2 * nv);
  const w = new ElementWork(64), Ke = new Float64Array(128 * 128);
  for (let c = 0; c + 1 < m.cellStart.length; c++) {
    const s = m.cellStart[c], e = m.cellStart[c + 1], n = e - s;
    elementStiffness(m.xy, m.cellVerts, s, e, D, t, Ke, w);
    for (let a = 0; a < 2 * n; a++) for (let b = 0; b < 2 * n; b++) {
      const ga = 2 * m.cellVerts[s + (a >> 1)] + (a & 1), gb = 2 * m.cellVerts[s + (b >> 1)] + (b & 1);
      K.set(ga, gb, K.get(ga, gb) + Ke[a * 2 * n + b]);
    }
  }
  return K;
}

// A small mesh with a non-convex cell, a cell with collinear (hanging) vertices, a triangle and a hexagon.
const pts = [[0, 0], [2, 0], [4, 0], [4, 2], [4, 4], [2, 4], [0, 4], [0, 2], [2, 2], [1, 1.2], [3, 2], [4, 1]];
const cells = [
  [0, 1, 8, 9, 7], // vertex 9 is reflex: a non-convex cell
  [1, 2, 11, 3, 10, 8], // collinear vertices 11 (boundary) and 10 (shared edge)
  [8, 10, 3, 4, 5],
  [7, 9, 8, 5, 6],
];
// fix orientation: make each cell CCW
function ccw(m: number[][]) {
  return m.map((c) => {
    let a = 0;
    for (let k = 0; k < c.length; k++) { const p = pts[c[k]], q = pts[c[(k + 1) % c.length]]; a += p[0] * q[1] - q[0] * p[1]; }
    return a > 0 ? c : [...c].reverse();
  });
}

describe('virtual element, order 1', () => {
  const D = elasticMatrix(30000, 0.2, 'plane-stress');
  const mesh = polyMeshFrom(pts, ccw(cells));

  it('element stiffness is symmetric and has exactly three zero-energy modes (rigid-body modes: common practice; reference: ml-matrix eigenvalues)', () => {
    const K = denseK(mesh, D);
    const n = K.rows, kmax = K.max();
    for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) expect(Math.abs(K.get(i, j) - K.get(j, i))).toBeLessThan(1e-12 * kmax);
    const ev = new EigenvalueDecomposition(K, { assumeSymmetric: true }).realEigenvalues;
    const max = Math.max(...ev.map(Math.abs));
    expect(ev.filter((x) => Math.abs(x) < 1e-10 * max).length).toBe(3);
    expect(Math.min(...ev)).toBeGreaterThan(-1e-10 * max);
  });

  it('patch test on a non-convex cell: a linear field imposed on the boundary is reproduced inside (Beirão da Veiga et al. 2013)', () => {
    // interior vertices: 8, 9, 10 (all others on the boundary of the 4×4 square)
    const K = denseK(mesh, D);
    const nv = pts.length, lin = (x: number, y: number) => [1e-3 * (1 + 2 * x - 0.5 * y), 1e-3 * (-0.3 + 0.7 * x + 1.5 * y)];
    const inner = [8, 9, 10], freeD = inner.flatMap((v) => [2 * v, 2 * v + 1]);
    const fixedD = [...Array(2 * nv).keys()].filter((d) => !freeD.includes(d));
    const ug = new Float64Array(2 * nv);
    pts.forEach((p, v) => { const u = lin(p[0], p[1]); ug[2 * v] = u[0]; ug[2 * v + 1] = u[1]; });
    const Kff = new Matrix(freeD.length, freeD.length), rhs = new Matrix(freeD.length, 1);
    freeD.forEach((i, a) => {
      freeD.forEach((j, b) => Kff.set(a, b, K.get(i, j)));
      let r = 0; for (const j of fixedD) r -= K.get(i, j) * ug[j];
      rhs.set(a, 0, r);
    });
    const x = solve(Kff, rhs);
    freeD.forEach((i, a) => expect(Math.abs(x.get(a, 0) - ug[i])).toBeLessThan(1e-10 * 5e-3));
    // and the cell stress of the exact linear field is the exact constant stress
    const s = cellStresses(mesh, ug, D);
    const exx = 2e-3, eyy = 1.5e-3, gxy = (-0.5 + 0.7) * 1e-3;
    for (let c = 0; c < cells.length; c++) {
      expect(s[3 * c]).toBeCloseTo(D[0] * exx + D[1] * eyy, 9);
      expect(s[3 * c + 2]).toBeCloseTo(D[8] * gxy, 9);
    }
  });
});
