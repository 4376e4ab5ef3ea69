// Element-level checks of the first-order virtual element (dense algebra, small meshes).
import { describe, expect, it } from 'vitest';
import { Matrix, EigenvalueDecomposition, solve } from 'ml-matrix';
import { ElementWork, elementStiffness, type Stabilisation } from '../src/vem/element.js';
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

  it('a cell keeps its energy when a collinear vertex is added to one of its edges, for every field linear along that edge (boundary stabilisation: Beirão da Veiga, Lovadina & Russo 2017)', () => {
    // an irregular non-convex hexagon, and the same cell with a vertex at 0.37 of its edge 2→3
    const base = [[0, 0], [3, -0.4], [4.2, 1.1], [3.1, 3.0], [1.4, 1.9], [-0.6, 2.2]];
    const f = 0.37, pm = [base[2][0] + f * (base[3][0] - base[2][0]), base[2][1] + f * (base[3][1] - base[2][1])];
    const fine = [...base.slice(0, 3), pm, ...base.slice(3)];
    const stiff = (p: number[][], stab: Stabilisation): Float64Array => {
      const n = p.length, Ke = new Float64Array(4 * n * n);
      elementStiffness(Float64Array.from(p.flat()), Int32Array.from(p.keys()), 0, n, D, 2, Ke, new ElementWork(n), stab);
      return Ke;
    };
    // T: the base cell's 12 dofs → the refined cell's 14, the new vertex interpolating its edge
    const T = (u: Float64Array): Float64Array => {
      const v = new Float64Array(14);
      for (let a = 0; a < 6; a++) { const b = a < 3 ? a : a + 1; v[2 * b] = u[2 * a]; v[2 * b + 1] = u[2 * a + 1]; }
      for (let c = 0; c < 2; c++) v[6 + c] = (1 - f) * u[4 + c] + f * u[6 + c];
      return v;
    };
    const energy = (K: Float64Array, u: Float64Array): number => {
      const m = u.length; let e = 0;
      for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) e += u[i] * K[i * m + j] * u[j];
      return e;
    };
    const changes: Record<Stabilisation, number> = { boundary: 0, vertex: 0 };
    for (const stab of ['boundary', 'vertex'] as const) {
      const K6 = stiff(base, stab), K7 = stiff(fine, stab);
      // every unit field and 20 pseudo-random ones (a fixed linear congruential sequence)
      let x = 12345;
      for (let k = 0; k < 32; k++) {
        const u = new Float64Array(12);
        if (k < 12) u[k] = 1e-3;
        else for (let i = 0; i < 12; i++) { x = (x * 1103515245 + 12345) % 2147483648; u[i] = 1e-3 * (x / 2147483648 - 0.5); }
        const e6 = energy(K6, u), e7 = energy(K7, T(u));
        changes[stab] = Math.max(changes[stab], Math.abs(e7 / e6 - 1));
      }
    }
    expect(changes.boundary).toBeLessThan(1e-12);
    // the vertex form depends on the vertex count: the same check fails with it
    expect(changes.vertex).toBeGreaterThan(1e-3);
  });

  it('both stabilisations pass the patch test and keep three zero-energy modes (Beirão da Veiga et al. 2013; common practice)', () => {
    for (const stab of ['boundary', 'vertex'] as const) {
      const nv = pts.length, K = Matrix.zeros(2 * nv, 2 * nv), w = new ElementWork(64), Ke = new Float64Array(128 * 128);
      for (let c = 0; c + 1 < mesh.cellStart.length; c++) {
        const s = mesh.cellStart[c], e = mesh.cellStart[c + 1], n = e - s;
        elementStiffness(mesh.xy, mesh.cellVerts, s, e, D, 1, Ke, w, stab);
        for (let a = 0; a < 2 * n; a++) for (let b = 0; b < 2 * n; b++) {
          const ga = 2 * mesh.cellVerts[s + (a >> 1)] + (a & 1), gb = 2 * mesh.cellVerts[s + (b >> 1)] + (b & 1);
          K.set(ga, gb, K.get(ga, gb) + Ke[a * 2 * n + b]);
        }
      }
      // a linear field has zero out-of-balance force at every interior vertex
      const ug = new Float64Array(2 * nv);
      pts.forEach((p, v) => { ug[2 * v] = 1e-3 * (1 + 2 * p[0] - 0.5 * p[1]); ug[2 * v + 1] = 1e-3 * (-0.3 + 0.7 * p[0] + 1.5 * p[1]); });
      const f = K.mmul(Matrix.columnVector(Array.from(ug))), kmax = K.max();
      for (const v of [8, 9, 10]) for (const d of [2 * v, 2 * v + 1]) expect(Math.abs(f.get(d, 0))).toBeLessThan(1e-12 * kmax);
      const ev = new EigenvalueDecomposition(K, { assumeSymmetric: true }).realEigenvalues;
      const max = Math.max(...ev.map(Math.abs));
      expect(ev.filter((x) => Math.abs(x) < 1e-10 * max).length, stab).toBe(3);
    }
  });
});
