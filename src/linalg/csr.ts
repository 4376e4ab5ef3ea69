// Compressed sparse row storage for symmetric matrices: both triangles stored,
// columns sorted in every row, diagonal always present.

/** Sparsity pattern of a symmetric matrix (both triangles, sorted columns, diagonal present). */
export interface CsrPattern {
  n: number;
  rowPtr: Int32Array;
  colIdx: Int32Array;
}

/** Symmetric matrix on a CsrPattern. */
export interface CsrMatrix extends CsrPattern {
  values: Float64Array;
}

/** Submatrix that remembers where each of its entries came from, so it can be refilled cheaply. */
export interface SubMatrix extends CsrMatrix {
  /** Index into the parent's values for every entry. */
  source: Int32Array;
}

/** Inverse lists: for every dof, the blocks that hold it. */
function dofBlocks(n: number, blockStart: Int32Array, blockDofs: Int32Array): { ptr: Int32Array; blk: Int32Array } {
  const nb = blockStart.length - 1;
  const ptr = new Int32Array(n + 1);
  for (let b = 0; b < nb; b++) {
    for (let q = blockStart[b]; q < blockStart[b + 1]; q++) {
      const d = blockDofs[q];
      if (d >= 0) ptr[d + 1]++;
    }
  }
  for (let i = 0; i < n; i++) ptr[i + 1] += ptr[i];
  const blk = new Int32Array(ptr[n]);
  const fill = ptr.slice(0, n);
  for (let b = 0; b < nb; b++) {
    for (let q = blockStart[b]; q < blockStart[b + 1]; q++) {
      const d = blockDofs[q];
      if (d >= 0) blk[fill[d]++] = b;
    }
  }
  return { ptr, blk };
}

/** Pattern of a matrix assembled from dense blocks; block b couples dofs blockDofs[blockStart[b]..blockStart[b+1]), negative dofs skipped. */
export function patternFromBlocks(n: number, blockStart: Int32Array, blockDofs: Int32Array): CsrPattern {
  const { ptr, blk } = dofBlocks(n, blockStart, blockDofs);
  const mark = new Int32Array(n).fill(-1);
  const rowPtr = new Int32Array(n + 1);
  // pass 1: count distinct neighbours per row
  for (let i = 0; i < n; i++) {
    mark[i] = i;
    let cnt = 1;
    for (let t = ptr[i]; t < ptr[i + 1]; t++) {
      const b = blk[t];
      for (let q = blockStart[b]; q < blockStart[b + 1]; q++) {
        const j = blockDofs[q];
        if (j >= 0 && mark[j] !== i) {
          mark[j] = i;
          cnt++;
        }
      }
    }
    rowPtr[i + 1] = rowPtr[i] + cnt;
  }
  const raw = new Int32Array(rowPtr[n]);
  mark.fill(-1);
  // pass 2: fill each row, unsorted
  for (let i = 0; i < n; i++) {
    let w = rowPtr[i];
    mark[i] = i;
    raw[w++] = i;
    for (let t = ptr[i]; t < ptr[i + 1]; t++) {
      const b = blk[t];
      for (let q = blockStart[b]; q < blockStart[b + 1]; q++) {
        const j = blockDofs[q];
        if (j >= 0 && mark[j] !== i) {
          mark[j] = i;
          raw[w++] = j;
        }
      }
    }
  }
  // the transpose of a symmetric pattern is itself, and comes out with sorted rows
  const colIdx = new Int32Array(rowPtr[n]);
  const next = rowPtr.slice(0, n);
  for (let i = 0; i < n; i++) for (let q = rowPtr[i]; q < rowPtr[i + 1]; q++) colIdx[next[raw[q]]++] = i;
  return { n, rowPtr, colIdx };
}

/** Offsets of each block's m×m local matrix in the assembly map: mapStart[b] = Σ_{k<b} m_k². */
export function blockMapOffsets(blockStart: Int32Array): Int32Array {
  const nb = blockStart.length - 1;
  const off = new Int32Array(nb + 1);
  for (let b = 0; b < nb; b++) {
    const m = blockStart[b + 1] - blockStart[b];
    off[b + 1] = off[b] + m * m;
  }
  return off;
}

/** Position of column j in row i, or −1. */
export function findEntry(p: CsrPattern, i: number, j: number): number {
  const colIdx = p.colIdx;
  let lo = p.rowPtr[i];
  let hi = p.rowPtr[i + 1] - 1;
  while (lo <= hi) {
    const mid = (lo + hi) >> 1;
    const c = colIdx[mid];
    if (c < j) lo = mid + 1;
    else if (c > j) hi = mid - 1;
    else return mid;
  }
  return -1;
}

/**
 * Positions into values for every block's row-major m×m local matrix, at offsets blockMapOffsets(blockStart);
 * assembly is values[map[o + k]] += Ke[k]; entries touching a negative dof are −1.
 */
export function assemblyMap(p: CsrPattern, blockStart: Int32Array, blockDofs: Int32Array): Int32Array {
  const n = p.n;
  const { rowPtr, colIdx } = p;
  const nb = blockStart.length - 1;
  const off = blockMapOffsets(blockStart);
  const map = new Int32Array(off[nb]).fill(-1);
  const owner = new Int32Array(blockDofs.length);
  for (let b = 0; b < nb; b++) for (let q = blockStart[b]; q < blockStart[b + 1]; q++) owner[q] = b;
  // every (dof, block) slot, grouped by dof
  const ptr = new Int32Array(n + 1);
  for (let q = 0; q < blockDofs.length; q++) if (blockDofs[q] >= 0) ptr[blockDofs[q] + 1]++;
  for (let i = 0; i < n; i++) ptr[i + 1] += ptr[i];
  const slot = new Int32Array(ptr[n]);
  const fill = ptr.slice(0, n);
  for (let q = 0; q < blockDofs.length; q++) if (blockDofs[q] >= 0) slot[fill[blockDofs[q]]++] = q;
  // row by row: scatter the row's positions once, then read them for every block row on it
  const pos = new Int32Array(n);
  for (let r = 0; r < n; r++) {
    const r0 = rowPtr[r];
    const r1 = rowPtr[r + 1];
    for (let t = r0; t < r1; t++) pos[colIdx[t]] = t;
    for (let u = ptr[r]; u < ptr[r + 1]; u++) {
      const q = slot[u];
      const b = owner[q];
      const q0 = blockStart[b];
      const m = blockStart[b + 1] - q0;
      const o = off[b] + (q - q0) * m;
      for (let c = 0; c < m; c++) {
        const s = blockDofs[q0 + c];
        if (s < 0) continue;
        const t = pos[s];
        if (t < r0 || t >= r1 || colIdx[t] !== s) throw new RangeError(`pattern lacks entry (${r}, ${s}) that block ${b} couples`);
        map[o + c] = t;
      }
    }
  }
  return map;
}

/** A matrix of zeros on the given pattern. */
export function matrixOnPattern(p: CsrPattern): CsrMatrix {
  return { n: p.n, rowPtr: p.rowPtr, colIdx: p.colIdx, values: new Float64Array(p.colIdx.length) };
}

/** Set every stored value to zero (pattern kept). */
export function zeroValues(A: CsrMatrix): void {
  A.values.fill(0);
}

/** y = A x. */
export function matVec(A: CsrMatrix, x: Float64Array, y: Float64Array): Float64Array {
  const { n, rowPtr, colIdx, values } = A;
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let q = rowPtr[i]; q < rowPtr[i + 1]; q++) s += values[q] * x[colIdx[q]];
    y[i] = s;
  }
  return y;
}

/** Rows and columns with keep[old] ≥ 0, renumbered to keep[old] in 0..nNew−1 (e.g. free dofs after removing supports). */
export function submatrix(A: CsrMatrix, keep: Int32Array, nNew: number): SubMatrix {
  const { n, rowPtr, colIdx } = A;
  const oldOf = new Int32Array(nNew).fill(-1);
  for (let i = 0; i < n; i++) if (keep[i] >= 0) oldOf[keep[i]] = i;
  const outPtr = new Int32Array(nNew + 1);
  for (let r = 0; r < nNew; r++) {
    const i = oldOf[r];
    let cnt = 0;
    if (i >= 0) for (let q = rowPtr[i]; q < rowPtr[i + 1]; q++) if (keep[colIdx[q]] >= 0) cnt++;
    outPtr[r + 1] = outPtr[r] + cnt;
  }
  const outCol = new Int32Array(outPtr[nNew]);
  const source = new Int32Array(outPtr[nNew]);
  for (let r = 0; r < nNew; r++) {
    const i = oldOf[r];
    if (i < 0) continue;
    const w0 = outPtr[r];
    let w = w0;
    for (let q = rowPtr[i]; q < rowPtr[i + 1]; q++) {
      const c = keep[colIdx[q]];
      if (c < 0) continue;
      // insertion keeps columns sorted when keep is not monotone
      let t = w++;
      while (t > w0 && outCol[t - 1] > c) {
        outCol[t] = outCol[t - 1];
        source[t] = source[t - 1];
        t--;
      }
      outCol[t] = c;
      source[t] = q;
    }
  }
  const sub: SubMatrix = { n: nNew, rowPtr: outPtr, colIdx: outCol, values: new Float64Array(outCol.length), source };
  submatrixInto(A, sub);
  return sub;
}

/** Refill a submatrix from its parent's current values (same pattern as when it was made). */
export function submatrixInto(A: CsrMatrix, sub: SubMatrix): SubMatrix {
  const src = sub.source;
  const v = sub.values;
  const a = A.values;
  for (let k = 0; k < src.length; k++) v[k] = a[src[k]];
  return sub;
}

/**
 * Symmetric matrix from coordinate triplets, duplicates summed.
 * triangles = 'one' (default): each off-diagonal triplet stands for both (i,j) and (j,i), so give each pair once, from either triangle.
 * triangles = 'both': triplets are the full matrix as given; the pattern is made symmetric with explicit zeros where needed.
 */
export function csrFromTriplets(
  n: number,
  rows: ArrayLike<number>,
  cols: ArrayLike<number>,
  vals: ArrayLike<number>,
  triangles: 'one' | 'both' = 'one',
): CsrMatrix {
  const nt = rows.length;
  const cnt = new Int32Array(n + 1);
  for (let t = 0; t < nt; t++) {
    const i = rows[t];
    const j = cols[t];
    if (!(i >= 0 && i < n && j >= 0 && j < n)) throw new RangeError(`triplet ${t} (${i}, ${j}) lies outside a ${n}×${n} matrix`);
    cnt[i + 1]++;
    if (i !== j) cnt[j + 1]++;
  }
  for (let i = 0; i < n; i++) cnt[i + 1] += cnt[i] + 1;
  // raw rows with duplicates; slot 0 of every row holds the diagonal
  const rawCol = new Int32Array(cnt[n]);
  const rawVal = new Float64Array(cnt[n]);
  const fill = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    rawCol[cnt[i]] = i;
    fill[i] = cnt[i] + 1;
  }
  const both = triangles === 'both';
  for (let t = 0; t < nt; t++) {
    const i = rows[t];
    const j = cols[t];
    const v = vals[t];
    let q = fill[i]++;
    rawCol[q] = j;
    rawVal[q] = v;
    if (i !== j) {
      q = fill[j]++;
      rawCol[q] = i;
      rawVal[q] = both ? 0 : v;
    }
  }
  const rowPtr = new Int32Array(n + 1);
  const mark = new Int32Array(n).fill(-1);
  const acc = new Float64Array(n);
  const colTmp = new Int32Array(cnt[n]);
  const valTmp = new Float64Array(cnt[n]);
  let w = 0;
  for (let i = 0; i < n; i++) {
    const w0 = w;
    for (let q = cnt[i]; q < fill[i]; q++) {
      const j = rawCol[q];
      if (mark[j] !== i) {
        mark[j] = i;
        acc[j] = 0;
        colTmp[w++] = j;
      }
      acc[j] += rawVal[q];
    }
    colTmp.subarray(w0, w).sort();
    for (let q = w0; q < w; q++) valTmp[q] = acc[colTmp[q]];
    rowPtr[i + 1] = w;
  }
  return { n, rowPtr, colIdx: colTmp.slice(0, w), values: valTmp.slice(0, w) };
}

/** Dense copy (row-major n×n), for tests and small problems. */
export function toDense(A: CsrMatrix): Float64Array {
  const { n, rowPtr, colIdx, values } = A;
  const d = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let q = rowPtr[i]; q < rowPtr[i + 1]; q++) d[i * n + colIdx[q]] += values[q];
  return d;
}
