// Matrix Market coordinate files for symmetric real matrices.

import { readFileSync } from 'node:fs';
import { writeFileAtomic } from '../output/files.js';
import { InputError } from '../errors.js';
import { csrFromTriplets, type CsrMatrix } from './csr.js';

/** Write the lower triangle, 1-based, with shortest round-trip decimal values (exact on reading back). */
export function writeMatrixMarket(A: CsrMatrix, file: string, comment?: string): void {
  const { n, rowPtr, colIdx, values } = A;
  let nnz = 0;
  for (let i = 0; i < n; i++) for (let q = rowPtr[i]; q < rowPtr[i + 1]; q++) if (colIdx[q] <= i) nnz++;
  const parts: string[] = ['%%MatrixMarket matrix coordinate real symmetric\n'];
  if (comment) for (const line of comment.split('\n')) parts.push(`% ${line}\n`);
  parts.push(`${n} ${n} ${nnz}\n`);
  let chunk = '';
  for (let i = 0; i < n; i++) {
    for (let q = rowPtr[i]; q < rowPtr[i + 1]; q++) {
      const j = colIdx[q];
      if (j > i) break;
      chunk += `${i + 1} ${j + 1} ${values[q]}\n`;
    }
    if (chunk.length > 1 << 16) {
      parts.push(chunk);
      chunk = '';
    }
  }
  parts.push(chunk);
  // never through a link planted at the name, never half written
  writeFileAtomic(file, parts.join(''));
}

/** Read a coordinate real matrix, 'symmetric' (either triangle) or 'general' (must be symmetric). */
export function readMatrixMarket(file: string): CsrMatrix {
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (e) {
    throw new InputError(`matrix file ${file} could not be read (${(e as Error).message}).`);
  }
  const lines = text.split('\n');
  const header = (lines[0] ?? '').trim().toLowerCase().split(/\s+/);
  if (header[0] !== '%%matrixmarket' || header[1] !== 'matrix' || header[2] !== 'coordinate' || header[3] !== 'real' || (header[4] !== 'symmetric' && header[4] !== 'general')) {
    throw new InputError(`line 1 of ${file} must read "%%MatrixMarket matrix coordinate real symmetric" (or "general"), found "${(lines[0] ?? '').trim()}".`);
  }
  const general = header[4] === 'general';
  let li = 1;
  while (li < lines.length && (lines[li].startsWith('%') || lines[li].trim() === '')) li++;
  const size = (lines[li] ?? '').trim().split(/\s+/).map(Number);
  if (size.length !== 3 || !size.every((v) => Number.isInteger(v) && v >= 0) || size[0] !== size[1]) {
    throw new InputError(`line ${li + 1} of ${file} must give "rows columns entries" of a square matrix, found "${(lines[li] ?? '').trim()}".`);
  }
  const [n, , nnz] = size;
  const rows = new Int32Array(nnz);
  const cols = new Int32Array(nnz);
  const vals = new Float64Array(nnz);
  let t = 0;
  for (li++; li < lines.length; li++) {
    const line = lines[li];
    if (line.length === 0 || line.charCodeAt(0) === 37 /* % */) continue;
    // single spaces are the common case; anything else takes the general split
    let f = line.split(' ');
    if (f.length !== 3 || f[0] === '' || f[1] === '') f = line.trim().split(/\s+/);
    if (f.length === 1 && f[0] === '') continue;
    const i = Number(f[0]);
    const j = Number(f[1]);
    const v = Number(f[2]);
    if (f.length !== 3 || !Number.isInteger(i) || !Number.isInteger(j) || i < 1 || i > n || j < 1 || j > n || !Number.isFinite(v)) {
      throw new InputError(`line ${li + 1} of ${file} must be "row column value" with indices in 1..${n} and a finite value, found "${line.trim()}".`);
    }
    if (t >= nnz) throw new InputError(`line ${li + 1} of ${file} is an entry beyond the ${nnz} announced in the size line.`);
    rows[t] = i - 1;
    cols[t] = j - 1;
    vals[t] = v;
    t++;
  }
  if (t !== nnz) throw new InputError(`${file} announces ${nnz} entries in its size line but holds ${t}.`);
  const A = csrFromTriplets(n, rows, cols, vals, general ? 'both' : 'one');
  if (general) checkSymmetric(A, file);
  return A;
}

/** A 'general' file must still hold a symmetric matrix. */
function checkSymmetric(A: CsrMatrix, file: string): void {
  const { n, rowPtr, colIdx, values } = A;
  let scale = 0;
  for (let q = 0; q < values.length; q++) scale = Math.max(scale, Math.abs(values[q]));
  for (let i = 0; i < n; i++) {
    for (let q = rowPtr[i]; q < rowPtr[i + 1]; q++) {
      const j = colIdx[q];
      if (j >= i) break;
      let lo = rowPtr[j];
      let hi = rowPtr[j + 1] - 1;
      while (lo < hi) {
        const mid = (lo + hi) >> 1;
        if (colIdx[mid] < i) lo = mid + 1;
        else hi = mid;
      }
      if (Math.abs(values[q] - values[lo]) > 1e-12 * scale) {
        throw new InputError(`${file} is declared general but is not symmetric: entry (${i + 1}, ${j + 1}) is ${values[q]} and (${j + 1}, ${i + 1}) is ${values[lo]}.`);
      }
    }
  }
}
