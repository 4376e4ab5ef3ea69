// Fill-reducing orderings: valid permutations, fill on regular grids, correct solves, determinism.
import { describe, expect, it } from 'vitest';
import { Matrix, solve as denseSolve } from 'ml-matrix';
import { analyze, csrFromTriplets, factorize, fillReducingOrder, matVec, toDense, type CsrMatrix, type CsrPattern, type OrderingMethod } from '../src/linalg/index.js';
import { gridStiffnessQ4 } from '../cli/bench-matrix.js';
import { gridLaplacian, randomDominant, rng } from '../src/linalg/samples.js';

const METHODS: OrderingMethod[] = ['mindegree', 'dissection', 'auto'];

function isPermutation(p: Int32Array, n: number): boolean {
  if (p.length !== n) return false;
  const seen = new Uint8Array(n);
  for (const v of p) {
    if (v < 0 || v >= n || seen[v]) return false;
    seen[v] = 1;
  }
  return true;
}

/** Pattern of the nodes of a k×k grid of square elements (every node coupled to its 8 neighbours), as in George 1973. */
function gridNinePoint(k: number): CsrMatrix {
  const rows: number[] = [];
  const cols: number[] = [];
  for (let j = 0; j < k; j++) {
    for (let i = 0; i < k; i++) {
      for (let dj = -1; dj <= 1; dj++) {
        for (let di = -1; di <= 1; di++) {
          const ii = i + di;
          const jj = j + dj;
          if (ii < 0 || jj < 0 || ii >= k || jj >= k) continue;
          rows.push(j * k + i);
          cols.push(jj * k + ii);
        }
      }
    }
  }
  return csrFromTriplets(k * k, rows, cols, rows.map((r, t) => (r === cols[t] ? 9 : -1)), 'both');
}

describe('fill-reducing orderings', () => {
  it('are permutations on random patterns, empty rows, a dense row and disconnected pieces', () => {
    const cases: CsrMatrix[] = [];
    for (const [n, perRow, seed] of [
      [1, 0, 1],
      [2, 1, 2],
      [50, 3, 3],
      [500, 10, 4],
      [3000, 2, 5], // many small components
    ]) cases.push(randomDominant(n, perRow, seed, 'positive'));
    // node 0 coupled to all others, a chain, and isolated nodes
    const n = 600;
    const rows: number[] = [];
    const cols: number[] = [];
    for (let i = 0; i < n; i++) {
      rows.push(i);
      cols.push(i);
      if (i > 0 && i < 500) rows.push(0), cols.push(i);
      if (i > 1 && i < 500) rows.push(i - 1), cols.push(i);
    }
    cases.push(csrFromTriplets(n, rows, cols, rows.map(() => 1), 'both'));
    cases.push(gridStiffnessQ4(30, 20)); // two dofs a node: merged rows
    for (const A of cases) for (const m of METHODS) expect(isPermutation(fillReducingOrder(A, m), A.n)).toBe(true);
  });

  it('nested dissection on a k×k grid of square elements stays within the O(n log n) fill of George 1973', () => {
    // George 1973 (SIAM J. Numer. Anal. 10): nested dissection of the k×k element grid fills
    // L with about (31/4) n log2 n entries, n = k² (constant from memory).
    const ratio: number[] = [];
    for (const k of [32, 64, 128]) {
      const A = gridNinePoint(k);
      const nn = k * k;
      const fill = analyze(A, { ordering: 'dissection' }).nnzLExact;
      const george = (31 / 4) * nn * Math.log2(nn);
      expect(fill).toBeLessThan(george);
      ratio.push(fill / (nn * Math.log2(nn)));
      // banded (natural) order fills about k³ entries
      if (k === 64) expect(fill).toBeLessThan(0.5 * analyze(A, { ordering: 'natural' }).nnzLExact);
      // minimum degree fills O(n log n) too but with a larger constant, which shows once the grid is large
      // (from memory; measured here: within 2 % of dissection at k = 32 and 64, 7 % more at k = 128)
      const md = analyze(A, { ordering: 'mindegree' }).nnzLExact;
      if (k === 128) expect(fill).toBeLessThan(md);
      else expect(fill).toBeLessThan(1.05 * md);
    }
    // n log n growth: the constant does not drift as the grid is refined
    for (const t of [1, 2]) {
      expect(ratio[t] / ratio[t - 1]).toBeGreaterThan(0.75);
      expect(ratio[t] / ratio[t - 1]).toBeLessThan(1.33);
    }
  });

  it('minimum degree on a 5-point grid gives far less fill than the band (from memory: O(k² log k) against O(k³))', () => {
    const A = gridLaplacian(40, true);
    const natural = analyze(A, { ordering: 'natural' }).nnzLExact;
    expect(natural).toBeGreaterThan(60000);
    expect(analyze(A, { ordering: 'mindegree' }).nnzLExact).toBeLessThan(0.5 * natural);
  });

  it('solutions agree with the dense solve of the reference library (ml-matrix, REFERENCES.md)', () => {
    const A = gridStiffnessQ4(12, 9);
    const r = rng(7);
    const b = Float64Array.from({ length: A.n }, () => r() * 2 - 1);
    const d = toDense(A);
    const M = new Matrix(A.n, A.n);
    for (let i = 0; i < A.n; i++) for (let j = 0; j < A.n; j++) M.set(i, j, d[i * A.n + j]);
    const ref = denseSolve(M, Matrix.columnVector(Array.from(b))).to1DArray();
    let scale = 0;
    for (const v of ref) scale = Math.max(scale, Math.abs(v));
    for (const m of ['mindegree', 'dissection'] as const) {
      const x = factorize(A, analyze(A, { ordering: m })).solve(b);
      let err = 0;
      for (let i = 0; i < A.n; i++) err = Math.max(err, Math.abs(x[i] - ref[i]));
      expect(err / scale).toBeLessThan(1e-9);
    }
  });

  it('are deterministic: the same pattern gives the same order', () => {
    const A = gridStiffnessQ4(40, 25);
    for (const m of ['mindegree', 'dissection'] as const) {
      expect(Array.from(fillReducingOrder(A, m))).toEqual(Array.from(fillReducingOrder(A, m)));
    }
  });
});

/** Entries of L (diagonal included) by eliminating the pattern in the given order on a dense boolean matrix. */
function denseFill(p: CsrPattern, perm: Int32Array): number {
  const n = p.n;
  const iperm = new Int32Array(n);
  for (let k = 0; k < n; k++) iperm[perm[k]] = k;
  const L = new Uint8Array(n * n);
  for (let i = 0; i < n; i++) for (let q = p.rowPtr[i]; q < p.rowPtr[i + 1]; q++) {
    const a = iperm[i], b = iperm[p.colIdx[q]];
    L[Math.max(a, b) * n + Math.min(a, b)] = 1;
  }
  let count = 0;
  for (let k = 0; k < n; k++) {
    const below: number[] = [];
    for (let i = k + 1; i < n; i++) if (L[i * n + k]) below.push(i);
    count += 1 + below.length;
    for (const i of below) for (const j of below) if (j < i) L[i * n + j] = 1;
  }
  return count;
}

describe('fill-reducing orderings on larger patterns', () => {
  it('the fill the symbolic analysis counts is the fill of eliminating in its order (random patterns, a grid, both orderings)', () => {
    const cases: CsrMatrix[] = [randomDominant(150, 4, 11, 'positive'), randomDominant(200, 8, 12, 'positive'), gridStiffnessQ4(8, 6)];
    for (const A of cases) {
      for (const o of ['natural', 'mindegree', 'dissection'] as const) {
        const sym = analyze(A, { ordering: o });
        expect(sym.nnzLExact).toBe(denseFill(A, sym.perm));
      }
    }
  });

  it('a 90×60 clamped bilinear grid: both orderings solve to a 1e-10 residual, fill within a bound, same order twice', () => {
    const A = gridStiffnessQ4(90, 60);
    const b = new Float64Array(A.n).fill(1);
    const fills: Record<string, number> = {};
    for (const o of ['mindegree', 'dissection'] as const) {
      const perm = fillReducingOrder(A, o);
      expect(isPermutation(perm, A.n)).toBe(true);
      expect(Array.from(fillReducingOrder(A, o))).toEqual(Array.from(perm));
      const sym = analyze(A, { ordering: perm });
      fills[o] = sym.nnzLExact;
      const x = factorize(A, sym).solve(b);
      const r = matVec(A, x, new Float64Array(A.n));
      let res = 0;
      for (let i = 0; i < A.n; i++) res = Math.max(res, Math.abs(r[i] - b[i]));
      // relative to ‖b‖∞ = 1 (common practice for a well-conditioned stiffness in double precision)
      expect(res).toBeLessThan(1e-10);
    }
    // the banded (natural) order fills O(k³) on a k×k grid, a fill-reducing one O(k² log k) (from memory);
    // measured at this size: minimum degree 0.31 and dissection 0.30 of the banded fill
    const banded = analyze(A, { ordering: 'natural' }).nnzLExact;
    expect(fills.mindegree).toBeLessThan(0.35 * banded);
    expect(fills.dissection).toBeLessThan(0.35 * banded);
  });
});

describe('columns kept last through the postorder', () => {
  // A 5-point grid (the bulk) with a chain of marked nodes along its lower edge (faces) and a
  // branch of marked nodes tied only to the chain's first node: the elimination tree then has
  // two marked branches under one marked column, and a plain postorder (children ascending) puts
  // the branch without bulk below first. Kept last, every marked column ends in the trailing block.
  const k = 8, nb = k * k, chain = 5, branch = 4, n = nb + chain + branch;
  const rows: number[] = [], cols: number[] = [], vals: number[] = [];
  const tie = (a: number, b: number) => { rows.push(a, a, b, b); cols.push(a, b, b, a); vals.push(1, -1, 1, -1); };
  const g = gridLaplacian(k, false);
  for (let i = 0; i < nb; i++) for (let t = g.rowPtr[i]; t < g.rowPtr[i + 1]; t++) { rows.push(i); cols.push(g.colIdx[t]); vals.push(g.values[t]); }
  for (let c = 0; c < chain; c++) { tie(nb + c, c); if (c > 0) tie(nb + c, nb + c - 1); }
  for (let b = 0; b < branch; b++) tie(nb + chain + b, b === 0 ? nb : nb + chain + b - 1);
  for (let i = 0; i < n; i++) { rows.push(i); cols.push(i); vals.push(0.1); }
  const A = csrFromTriplets(n, rows, cols, vals, 'both');
  const last = new Uint8Array(n);
  for (let i = nb; i < n; i++) last[i] = 1;
  const order = fillReducingOrder(A, 'mindegree', {}, last);
  const lastFrom = order.findIndex((v) => last[v] === 1);
  const firstMarked = (perm: Int32Array) => perm.findIndex((v) => last[v] === 1);

  it('a plain postorder mixes them with the bulk; with lastFrom they stay last and the factor still solves', () => {
    expect(lastFrom).toBe(nb);
    expect(firstMarked(analyze(A, { ordering: order }).perm)).toBeLessThan(nb);
    const sym = analyze(A, { ordering: order, lastFrom });
    expect(firstMarked(sym.perm)).toBe(nb);
    const x = new Float64Array(n).map((_, i) => Math.sin(i + 1)), b = new Float64Array(n);
    matVec(A, x, b);
    const y = factorize(A, sym).solve(b);
    let err = 0;
    for (let i = 0; i < n; i++) err = Math.max(err, Math.abs(y[i] - x[i]));
    expect(err).toBeLessThan(1e-9);
  });
});

