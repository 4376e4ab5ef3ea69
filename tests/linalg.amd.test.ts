// Approximate minimum degree ordering: validity and fill reduction.
import { describe, expect, it } from 'vitest';
import { amdOrder, analyze, csrFromTriplets, factorize, matVec } from '../src/linalg/index.js';
import { gridLaplacian, randomDominant } from '../src/linalg/samples.js';

function isPermutation(p: Int32Array, n: number): boolean {
  if (p.length !== n) return false;
  const seen = new Uint8Array(n);
  for (const v of p) {
    if (v < 0 || v >= n || seen[v]) return false;
    seen[v] = 1;
  }
  return true;
}

describe('amdOrder', () => {
  it('returns a permutation on random patterns, empty rows and a dense row', () => {
    for (const [n, perRow, seed] of [
      [1, 0, 1],
      [2, 1, 2],
      [50, 3, 3],
      [500, 10, 4],
      [2000, 3, 5], // sparse enough that the quotient graph storage gets compacted
    ]) {
      const A = randomDominant(n, perRow, seed, 'positive');
      expect(isPermutation(amdOrder(A), n)).toBe(true);
    }
    // node 0 coupled to all others (dense), plus isolated nodes
    const n = 600;
    const rows: number[] = [];
    const cols: number[] = [];
    for (let i = 0; i < n; i++) {
      rows.push(i);
      cols.push(i);
      if (i > 0 && i < 500) {
        rows.push(0);
        cols.push(i);
      }
      if (i > 1 && i < 500) {
        rows.push(i - 1);
        cols.push(i);
      }
    }
    const D = csrFromTriplets(n, rows, cols, rows.map(() => 1));
    const p = amdOrder(D);
    expect(isPermutation(p, n)).toBe(true);
  });

  it('on a 2D grid gives far less fill than natural (banded) order (from memory: O(k² log k) against O(k³))', () => {
    const A = gridLaplacian(40, true);
    const natural = analyze(A, { ordering: 'natural' }).nnzLExact;
    const amd = analyze(A, { ordering: 'amd' }).nnzLExact;
    // banded order fills the whole band: about k³ = 64,000 entries
    expect(natural).toBeGreaterThan(60000);
    expect(amd).toBeLessThan(0.5 * natural);
  });

  it('orders a random sparse matrix for less fill than natural order and a correct factorization (common practice: residual check)', () => {
    const A = randomDominant(2000, 3, 5, 'mixed');
    const sym = analyze(A);
    expect(sym.nnzLExact).toBeLessThan(0.5 * analyze(A, { ordering: 'natural' }).nnzLExact);
    const b = new Float64Array(A.n).fill(1);
    const x = factorize(A, sym).solve(b);
    const r = matVec(A, x, new Float64Array(A.n));
    let res = 0;
    for (let i = 0; i < A.n; i++) res = Math.max(res, Math.abs(r[i] - 1));
    expect(res).toBeLessThan(1e-12);
  });
});
