// CSR patterns and block assembly against dense assembly.
import { describe, expect, it } from 'vitest';
import {
  assemblyMap,
  blockMapOffsets,
  csrFromTriplets,
  matVec,
  matrixOnPattern,
  patternFromBlocks,
  submatrix,
  submatrixInto,
  toDense,
} from '../src/linalg/index.js';
import { rng } from '../src/linalg/samples.js';

describe('block assembly (common practice: scatter of element matrices)', () => {
  it('equals dense assembly, skipping negative dofs, with a valid sorted symmetric pattern', () => {
    const r = rng(7);
    const n = 40;
    const nb = 30;
    const start = [0];
    const dofs: number[] = [];
    for (let b = 0; b < nb; b++) {
      const m = 1 + Math.floor(r() * 8);
      const used = new Set<number>();
      while (used.size < m) used.add(Math.floor(r() * (n + 5)) - 5);
      dofs.push(...[...used].map((d) => (d < 0 ? -1 : d)));
      start.push(dofs.length);
    }
    const blockStart = Int32Array.from(start);
    const blockDofs = Int32Array.from(dofs);
    const p = patternFromBlocks(n, blockStart, blockDofs);
    for (let i = 0; i < n; i++) {
      const row = Array.from(p.colIdx.subarray(p.rowPtr[i], p.rowPtr[i + 1]));
      expect(row).toContain(i);
      expect(row).toEqual([...row].sort((a, b) => a - b));
      expect(new Set(row).size).toBe(row.length);
    }
    const A = matrixOnPattern(p);
    const map = assemblyMap(p, blockStart, blockDofs);
    const off = blockMapOffsets(blockStart);
    const ref = new Float64Array(n * n);
    for (let b = 0; b < nb; b++) {
      const q0 = blockStart[b];
      const m = blockStart[b + 1] - q0;
      for (let a = 0; a < m; a++) {
        for (let c = 0; c < m; c++) {
          const v = r();
          const ra = blockDofs[q0 + a];
          const rc = blockDofs[q0 + c];
          const t = map[off[b] + a * m + c];
          if (ra < 0 || rc < 0) {
            expect(t).toBe(-1);
            continue;
          }
          A.values[t] += v;
          ref[ra * n + rc] += v;
        }
      }
    }
    const d = toDense(A);
    for (let k = 0; k < n * n; k++) expect(d[k]).toBeCloseTo(ref[k], 14);
    // no structural entries beyond those some block couples (diagonal excepted)
    for (let i = 0; i < n; i++) for (let q = p.rowPtr[i]; q < p.rowPtr[i + 1]; q++) {
      const j = p.colIdx[q];
      if (i !== j) expect(ref[i * n + j] !== 0).toBe(true);
    }
  });

  it('triplets sum duplicates and mirror one triangle; submatrix drops and refills', () => {
    const A = csrFromTriplets(4, [0, 1, 1, 3, 2, 0], [0, 0, 0, 2, 2, 3], [2, 1, 0.5, 4, 3, -1]);
    const d = toDense(A);
    expect(Array.from(d)).toEqual([2, 1.5, 0, -1, 1.5, 0, 0, 0, 0, 0, 3, 4, -1, 0, 4, 0]);
    const y = matVec(A, Float64Array.of(1, 2, 3, 4), new Float64Array(4));
    expect(Array.from(y)).toEqual([1, 1.5, 25, 11]);
    const keep = Int32Array.of(1, -1, 0, 2);
    const S = submatrix(A, keep, 3);
    expect(Array.from(toDense(S))).toEqual([3, 0, 4, 0, 2, -1, 4, -1, 0]);
    A.values[A.values.indexOf(3)] = 7;
    submatrixInto(A, S);
    expect(toDense(S)[0]).toBe(7);
  });
});
