// Sample matrices for tests and benchmarks: seeded random sparse matrices and grid Laplacians.

import { csrFromTriplets, type CsrMatrix } from './csr.js';

/** Small seeded PRNG (mulberry32) returning numbers in [0, 1). */
export function rng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/**
 * Random symmetric matrix with about `perRow` off-diagonal entries a row and a strictly dominant diagonal.
 * signs = 'positive' gives SPD; 'mixed' gives an indefinite matrix whose every principal minor is nonzero.
 */
export function randomDominant(n: number, perRow: number, seed: number, signs: 'positive' | 'mixed'): CsrMatrix {
  const r = rng(seed);
  const rows: number[] = [];
  const cols: number[] = [];
  const vals: number[] = [];
  const rowSum = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    for (let t = 0; t < perRow / 2; t++) {
      const j = Math.floor(r() * n);
      if (j === i) continue;
      const v = r() * 2 - 1;
      rows.push(i);
      cols.push(j);
      vals.push(v);
      rowSum[i] += Math.abs(v);
      rowSum[j] += Math.abs(v);
    }
  }
  for (let i = 0; i < n; i++) {
    const sign = signs === 'mixed' && r() < 0.4 ? -1 : 1;
    rows.push(i);
    cols.push(i);
    vals.push(sign * (rowSum[i] + 0.5 + r()));
  }
  return csrFromTriplets(n, rows, cols, vals, 'one');
}

/** 5-point Laplacian on a k×k grid; with `ground` the first node is also tied to ground. */
export function gridLaplacian(k: number, ground: boolean): CsrMatrix {
  const rows: number[] = [];
  const cols: number[] = [];
  const vals: number[] = [];
  const id = (i: number, j: number): number => j * k + i;
  for (let j = 0; j < k; j++) {
    for (let i = 0; i < k; i++) {
      const a = id(i, j);
      for (const b of [i + 1 < k ? id(i + 1, j) : -1, j + 1 < k ? id(i, j + 1) : -1]) {
        if (b < 0) continue;
        rows.push(a, a, b, b);
        cols.push(a, b, b, a);
        vals.push(1, -1, 1, -1);
      }
    }
  }
  if (ground) {
    rows.push(0);
    cols.push(0);
    vals.push(1);
  }
  return csrFromTriplets(k * k, rows, cols, vals, 'both');
}
