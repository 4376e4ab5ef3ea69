// The unknowns of one topology and the map to the full displacement, u = T·q + λ·z:
// free dofs are unknowns themselves, supports are zero, load points follow λ, and the
// points of a platen or spreader follow their masters (linear multi-point constraints).
// The constraints are eliminated by this transformation, so Tᵀ K T stays symmetric positive
// definite and needs no multipliers; the reduced matrix is refilled from K by a scatter list.
import type { CsrMatrix } from '../linalg/index.js';
import { findEntry } from '../linalg/index.js';

/** Slaved dofs: u[slave[k]] = λ·slaveZ[k] + Σ masterW[j]·u[masterDof[j]], j in slaveStart[k]..slaveStart[k+1]. */
export interface Slaves {
  slave: Int32Array; slaveZ: Float64Array;
  slaveStart: Int32Array; masterDof: Int32Array; masterW: Float64Array;
}

export const noSlaves = (): Slaves => ({
  slave: new Int32Array(0), slaveZ: new Float64Array(0), slaveStart: new Int32Array(1), masterDof: new Int32Array(0), masterW: new Float64Array(0),
});

/** Tᵀ A T on the free unknowns, with the scatter list that refills it: out[dst] += coef·A[src]. */
export interface Reduced { matrix: CsrMatrix; src: Int32Array; dst: Int32Array; coef: Float64Array }

/** Images of a full dof in the unknowns: (index, coefficient) pairs. */
function images(d: number, freeOf: Int32Array, slaveOf: Int32Array, S: Slaves, q: number[], c: number[]): void {
  q.length = 0; c.length = 0;
  if (freeOf[d] >= 0) { q.push(freeOf[d]); c.push(1); return; }
  const k = slaveOf[d];
  if (k < 0) return;
  for (let j = S.slaveStart[k]; j < S.slaveStart[k + 1]; j++) { q.push(freeOf[S.masterDof[j]]); c.push(S.masterW[j]); }
}

export function reducedMatrix(A: CsrMatrix, freeOf: Int32Array, slaveOf: Int32Array, S: Slaves, nFree: number): Reduced {
  const rows: number[][] = Array.from({ length: nFree }, () => []);
  const qi: number[] = [], ci: number[] = [], qj: number[] = [], cj: number[] = [];
  const { rowPtr, colIdx } = A;
  const tr: number[] = [], tc: number[] = [], ts: number[] = [], tw: number[] = [];
  for (let r = 0; r < A.n; r++) {
    images(r, freeOf, slaveOf, S, qi, ci);
    if (qi.length === 0) continue;
    for (let k = rowPtr[r]; k < rowPtr[r + 1]; k++) {
      images(colIdx[k], freeOf, slaveOf, S, qj, cj);
      for (let a = 0; a < qi.length; a++) for (let b = 0; b < qj.length; b++) {
        rows[qi[a]].push(qj[b]); tr.push(qi[a]); tc.push(qj[b]); ts.push(k); tw.push(ci[a] * cj[b]);
      }
    }
  }
  const rowOut = new Int32Array(nFree + 1);
  const cols: number[] = [];
  for (let i = 0; i < nFree; i++) {
    const r = rows[i];
    r.push(i); // the diagonal is always present
    r.sort((x, y) => x - y);
    let last = -1;
    for (const j of r) if (j !== last) { cols.push(j); last = j; }
    rowOut[i + 1] = cols.length;
  }
  const matrix: CsrMatrix = { n: nFree, rowPtr: rowOut, colIdx: Int32Array.from(cols), values: new Float64Array(cols.length) };
  const dst = new Int32Array(tr.length);
  for (let t = 0; t < tr.length; t++) dst[t] = findEntry(matrix, tr[t], tc[t]);
  const red: Reduced = { matrix, src: Int32Array.from(ts), dst, coef: Float64Array.from(tw) };
  refill(A, red);
  return red;
}

export function refill(A: CsrMatrix, red: Reduced): CsrMatrix {
  const v = red.matrix.values, a = A.values, { src, dst, coef } = red;
  v.fill(0);
  for (let t = 0; t < src.length; t++) v[dst[t]] += coef[t] * a[src[t]];
  return red.matrix;
}
