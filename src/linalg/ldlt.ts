// Supernodal multifrontal LDLᵀ without pivoting (D diagonal, negative pivots allowed) and its solves.
// Each supernode's block of L is a column-major m×k array; update matrices live on one stack.

import { SingularMatrixError } from '../errors.js';
import type { CsrMatrix } from './csr.js';
import type { Symbolic } from './symbolic.js';
import { simdKernels, type SimdKernels } from './simdkernel.js';

/** A factorization P A Pᵀ = L D Lᵀ ready to solve with. */
export interface Factor {
  readonly n: number;
  /** Stored entries of L (with D on its diagonal). */
  readonly nnzL: number;
  /** Number of negative entries of D (the inertia's negative count). */
  negativePivots: number;
  /** x = A⁻¹ b; allocates only when x is not given. */
  solve(b: Float64Array, x?: Float64Array): Float64Array;
  /** x1 = A⁻¹ b1 and x2 = A⁻¹ b2 in one sweep over L (each result as solve would give it). */
  solve2(b1: Float64Array, b2: Float64Array, x1: Float64Array, x2: Float64Array): void;
}

/** Pivots smaller than this times the largest diagonal entry of A count as zero. */
const PIVOT_TOLERANCE = 1e-12;

/**
 * Factors with at least this many stored entries keep L, D and the update stack in WebAssembly
 * memory and run the rank updates there with SIMD. Measured on grid stiffnesses: refactorizing
 * into the same storage takes 0.7–0.85 × the plain arrays' time from 34k entries up, but a
 * fresh memory per factor costs about 0.2 ms, more than it saves below some 250k entries
 * when a factor is used once; the tiniest factors stay on plain arrays.
 */
export const SIMD_FROM_ENTRIES = 1 << 15;

let simdAllowed = true;

/** Allow or forbid the SIMD kernels for factors made from now on (benchmarks and tests compare both); returns the previous setting. */
export function useSimdKernels(on: boolean): boolean {
  const was = simdAllowed;
  simdAllowed = on;
  return was;
}

class SupernodalFactor implements Factor {
  readonly n: number;
  readonly nnzL: number;
  negativePivots = 0;
  readonly lx: Float64Array;
  readonly d: Float64Array;
  readonly stack: Float64Array;
  readonly work: Float64Array;
  readonly work2: Float64Array;
  readonly childPos: Int32Array;
  readonly stacked: Int32Array;
  /** Where a trailing refactorization starts from (factorizeTrailing), or null. */
  mark: SweepMark | null = null;
  /**
   * The SIMD kernels when lx, d and stack are views on their memory (d from dBase, stack from sBase
   * there, and a copy of the symbolic relIdx as 32-bit integers from rBase), else null.
   */
  readonly kern: SimdKernels | null;
  readonly dBase: number;
  readonly sBase: number;
  readonly rBase: number;

  constructor(readonly sym: Symbolic) {
    this.n = sym.n;
    this.nnzL = sym.nnzL;
    if (sym.stackSize >= 2 ** 31) throw new RangeError(`the update stack would need ${sym.stackSize} entries, more than this solver can index`);
    const ls = sym.lSize, ss = Math.max(1, sym.stackSize);
    const nrel = sym.relIdx.length;
    this.kern = simdAllowed && ls >= SIMD_FROM_ENTRIES ? simdKernels(ls + sym.n + ss + Math.ceil(nrel / 2)) : null;
    this.dBase = ls;
    this.sBase = ls + sym.n;
    this.rBase = 2 * (ls + sym.n + ss);
    if (this.kern) {
      const all = this.kern.f64;
      this.lx = all.subarray(0, ls);
      this.d = all.subarray(this.dBase, this.dBase + sym.n);
      this.stack = all.subarray(this.sBase, this.sBase + ss);
      new Int32Array(all.buffer, 4 * this.rBase, nrel).set(sym.relIdx);
    } else {
      this.lx = new Float64Array(ls);
      this.d = new Float64Array(sym.n);
      this.stack = new Float64Array(ss);
    }
    this.work = new Float64Array(sym.n);
    this.work2 = new Float64Array(sym.n);
    this.childPos = new Int32Array(sym.nsuper);
    this.stacked = new Int32Array(sym.nsuper);
  }

  solve(b: Float64Array, x?: Float64Array): Float64Array {
    const sym = this.sym;
    const n = this.n;
    if (b.length < n) throw new RangeError(`right-hand side has ${b.length} entries for ${n} equations`);
    const out = x ?? new Float64Array(n);
    // the rows below a supernode's own columns are gathered into g once per supernode and
    // scattered back, so the inner loops run on contiguous memory; each entry still meets the
    // same operations in the same order (bitwise the result of the plain sweeps)
    const y = this.work, g = this.work2;
    const { perm, superStart, rowPtr, rowIdx, lPtr, nsuper } = sym;
    const lx = this.lx;
    const d = this.d;
    for (let i = 0; i < n; i++) y[i] = b[perm[i]];
    // forward: L y = b
    for (let s = 0; s < nsuper; s++) {
      const f = superStart[s];
      const k = superStart[s + 1] - f;
      let any = false;
      for (let j = 0; j < k; j++) if (y[f + j] !== 0) { any = true; break; }
      if (!any) continue;
      const r0 = rowPtr[s];
      const m = rowPtr[s + 1] - r0;
      const lp = lPtr[s];
      const nb = m - k, ri = r0 + k;
      for (let i = 0; i < nb; i++) g[i] = y[rowIdx[ri + i]];
      for (let j = 0; j < k; j++) {
        const yj = y[f + j];
        if (yj === 0) continue;
        const cb = lp + j * m;
        for (let i = j + 1; i < k; i++) y[f + i] -= lx[cb + i] * yj;
        const cr = cb + k;
        for (let i = 0; i < nb; i++) g[i] -= lx[cr + i] * yj;
      }
      for (let i = 0; i < nb; i++) y[rowIdx[ri + i]] = g[i];
    }
    for (let i = 0; i < n; i++) y[i] /= d[i];
    // backward: Lᵀ x = y
    for (let s = nsuper - 1; s >= 0; s--) {
      const f = superStart[s];
      const k = superStart[s + 1] - f;
      const r0 = rowPtr[s];
      const m = rowPtr[s + 1] - r0;
      const lp = lPtr[s];
      const nb = m - k, ri = r0 + k;
      for (let i = 0; i < nb; i++) g[i] = y[rowIdx[ri + i]];
      for (let j = k - 1; j >= 0; j--) {
        const cb = lp + j * m;
        let t = y[f + j];
        for (let i = j + 1; i < k; i++) t -= lx[cb + i] * y[f + i];
        const cr = cb + k;
        for (let i = 0; i < nb; i++) t -= lx[cr + i] * g[i];
        y[f + j] = t;
      }
    }
    for (let i = 0; i < n; i++) out[perm[i]] = y[i];
    return out;
  }

  solve2(b1: Float64Array, b2: Float64Array, x1: Float64Array, x2: Float64Array): void {
    const sym = this.sym;
    const n = this.n;
    if (b1.length < n || b2.length < n) throw new RangeError(`right-hand sides have ${b1.length} and ${b2.length} entries for ${n} equations`);
    const y = this.work, z = this.work2;
    const { perm, superStart, rowPtr, rowIdx, lPtr, nsuper } = sym;
    const lx = this.lx;
    const d = this.d;
    for (let i = 0; i < n; i++) { y[i] = b1[perm[i]]; z[i] = b2[perm[i]]; }
    // forward: L y = b, the same operations as solve for each right-hand side
    for (let s = 0; s < nsuper; s++) {
      const f = superStart[s];
      const k = superStart[s + 1] - f;
      const r0 = rowPtr[s];
      const m = rowPtr[s + 1] - r0;
      const lp = lPtr[s];
      for (let j = 0; j < k; j++) {
        const yj = y[f + j], zj = z[f + j];
        const cb = lp + j * m;
        if (yj !== 0 && zj !== 0) {
          for (let i = j + 1; i < k; i++) { const l = lx[cb + i]; y[f + i] -= l * yj; z[f + i] -= l * zj; }
          for (let i = k; i < m; i++) { const l = lx[cb + i], q = rowIdx[r0 + i]; y[q] -= l * yj; z[q] -= l * zj; }
        } else if (yj !== 0) {
          for (let i = j + 1; i < k; i++) y[f + i] -= lx[cb + i] * yj;
          for (let i = k; i < m; i++) y[rowIdx[r0 + i]] -= lx[cb + i] * yj;
        } else if (zj !== 0) {
          for (let i = j + 1; i < k; i++) z[f + i] -= lx[cb + i] * zj;
          for (let i = k; i < m; i++) z[rowIdx[r0 + i]] -= lx[cb + i] * zj;
        }
      }
    }
    for (let i = 0; i < n; i++) { y[i] /= d[i]; z[i] /= d[i]; }
    // backward: Lᵀ x = y
    for (let s = nsuper - 1; s >= 0; s--) {
      const f = superStart[s];
      const k = superStart[s + 1] - f;
      const r0 = rowPtr[s];
      const m = rowPtr[s + 1] - r0;
      const lp = lPtr[s];
      for (let j = k - 1; j >= 0; j--) {
        const cb = lp + j * m;
        let t = y[f + j], u = z[f + j];
        for (let i = j + 1; i < k; i++) { const l = lx[cb + i]; t -= l * y[f + i]; u -= l * z[f + i]; }
        for (let i = k; i < m; i++) { const l = lx[cb + i], q = rowIdx[r0 + i]; t -= l * y[q]; u -= l * z[q]; }
        y[f + j] = t; z[f + j] = u;
      }
    }
    for (let i = 0; i < n; i++) { x1[perm[i]] = y[i]; x2[perm[i]] = z[i]; }
  }
}

/** Numeric LDLᵀ of A on the analysed pattern; refactorizes into reuse's storage when it was made with the same analysis. */
export function factorize(A: CsrMatrix, sym: Symbolic, reuse?: Factor): Factor {
  checkPattern(A, sym);
  const F = reuse instanceof SupernodalFactor && reuse.sym === sym ? reuse : new SupernodalFactor(sym);
  F.mark = null;
  numeric(A, sym, F, null);
  return F;
}

/**
 * LDLᵀ of A when only entries in columns ≥ firstCol (the new numbering) change between calls:
 * the multifrontal sweep up to the supernode holding firstCol is kept from the first call
 * (its L, D and the update matrices then waiting on the stack), and later calls with reuse
 * redo only the trailing supernodes. The caller guarantees the rest of A is unchanged.
 */
export function factorizeTrailing(A: CsrMatrix, sym: Symbolic, firstCol: number, reuse?: Factor): Factor {
  checkPattern(A, sym);
  const F = reuse instanceof SupernodalFactor && reuse.sym === sym ? reuse : new SupernodalFactor(sym);
  let s0 = 0;
  while (s0 < sym.nsuper && sym.superStart[s0 + 1] <= firstCol) s0++;
  if (F.mark && F.mark.s0 === s0) numeric(A, sym, F, F.mark);
  else { F.mark = null; numeric(A, sym, F, s0); }
  return F;
}

function checkPattern(A: CsrMatrix, sym: Symbolic): void {
  if (A.n !== sym.n || A.colIdx.length !== sym.nnzA) {
    throw new RangeError(`matrix (order ${A.n}, ${A.colIdx.length} entries) does not match the analysed pattern (order ${sym.n}, ${sym.nnzA} entries)`);
  }
}

/** The multifrontal sweep's state on reaching supernode s0: what a trailing refactorization starts from. */
interface SweepMark {
  s0: number;
  /** Entries of A that land in the trailing supernodes' L blocks. */
  trailingA: Int32Array;
  stack: Float64Array; onStack: Int32Array; childPos: Int32Array;
  top: number; nStacked: number; negatives: number;
}

/**
 * Multifrontal sweep in postorder: assemble A, extend-add the children, factor the panel, push the
 * Schur complement. `from` null: the whole sweep; a number s0: the whole sweep, keeping its state at
 * s0 in F.mark; a mark: only the supernodes from the mark's s0 on, starting from its state.
 */
function numeric(A: CsrMatrix, sym: Symbolic, F: SupernodalFactor, from: number | SweepMark | null): void {
  const n = sym.n;
  const { superStart, superParent, rowPtr, lPtr, relPtr, relIdx, aMap, perm, nsuper } = sym;
  const lx = F.lx;
  const dd = F.d;
  const stack = F.stack;
  const childPos = F.childPos;
  const av = A.values;

  // scale for the zero-pivot test
  let maxDiag = 0;
  for (let i = 0; i < n; i++) {
    for (let q = A.rowPtr[i]; q < A.rowPtr[i + 1]; q++) {
      if (A.colIdx[q] === i) {
        const a = Math.abs(av[q]);
        if (a > maxDiag) maxDiag = a;
      }
    }
  }
  const tiny = PIVOT_TOLERANCE * maxDiag;

  let top = 0;
  let negatives = 0;
  const onStack = F.stacked; // supernodes whose update matrices wait on the stack, bottom first
  let nStacked = 0;
  let sStart = 0;
  if (from !== null && typeof from !== 'number') {
    // trailing supernodes only: their A entries afresh, the stack as it was on reaching them
    const t = from.trailingA;
    lx.fill(0, lPtr[from.s0]);
    for (let i = 0; i < t.length; i++) lx[aMap[t[i]]] += av[t[i]];
    stack.set(from.stack);
    onStack.set(from.onStack);
    childPos.set(from.childPos);
    top = from.top; nStacked = from.nStacked; negatives = from.negatives; sStart = from.s0;
  } else {
    lx.fill(0);
    for (let q = 0; q < aMap.length; q++) {
      const t = aMap[q];
      if (t >= 0) lx[t] += av[q];
    }
  }

  for (let s = sStart; s < nsuper; s++) {
    if (s === from) {
      const lp0 = lPtr[s], trailing: number[] = [];
      for (let q = 0; q < aMap.length; q++) if (aMap[q] >= lp0) trailing.push(q);
      F.mark = {
        s0: s, trailingA: Int32Array.from(trailing), stack: stack.slice(0, top), onStack: onStack.slice(),
        childPos: childPos.slice(), top, nStacked, negatives,
      };
    }
    const f = superStart[s];
    const k = superStart[s + 1] - f;
    const m = rowPtr[s + 1] - rowPtr[s];
    const r = m - k;
    const lp = lPtr[s];

    // children are the topmost stacked supernodes whose parent is s
    let firstChild = nStacked;
    while (firstChild > 0 && superParent[onStack[firstChild - 1]] === s) firstChild--;
    const base = firstChild < nStacked ? childPos[onStack[firstChild]] : top;
    const up = top; // own update matrix goes above the children for now
    const uEnd = up + r * r;
    stack.fill(0, up, uEnd);

    // extend-add the children's update matrices
    for (let t = firstChild; t < nStacked; t++) {
      const c = onStack[t];
      const rc = rowPtr[c + 1] - rowPtr[c] - (superStart[c + 1] - superStart[c]);
      if (F.kern) F.kern.extendAdd(childPos[c] + F.sBase, rc, relPtr[c] + F.rBase, lp, m, k, up + F.sBase, r);
      else extendAdd(stack, childPos[c], rc, relIdx, relPtr[c], lx, lp, m, k, up, r);
    }
    nStacked = firstChild;

    // dense LDLᵀ of the supernode's columns
    negatives += factorPanel(lx, lp, m, k, dd, f, tiny, perm, F);

    // Schur complement into the own update matrix, then slide it down over the children
    if (r > 0) {
      if (F.kern) F.kern.rankUpdate(lp + k, m, k, F.dBase + f, F.sBase + up, r, r, r);
      else rankUpdate(lx, lp + k, m, k, dd, f, stack, up, r, r, r);
      if (base !== up) stack.copyWithin(base, up, uEnd);
      childPos[s] = base;
      top = base + r * r;
      onStack[nStacked++] = s;
    } else {
      top = base;
    }
  }
  F.negativePivots = negatives;
}

/** Add a child's update (rc×rc, column-major, lower part) into the parent's L block and update matrix. */
function extendAdd(
  stack: Float64Array,
  cp: number,
  rc: number,
  relIdx: Int32Array,
  rp: number,
  lx: Float64Array,
  lp: number,
  m: number,
  k: number,
  up: number,
  r: number,
): void {
  for (let j = 0; j < rc; j++) {
    const pj = relIdx[rp + j];
    const src = cp + j * rc;
    if (pj < k) {
      const dst = lp + pj * m;
      for (let i = j; i < rc; i++) lx[dst + relIdx[rp + i]] += stack[src + i];
    } else {
      const dst = up + (pj - k) * r - k;
      for (let i = j; i < rc; i++) stack[dst + relIdx[rp + i]] += stack[src + i];
    }
  }
}

/** Columns factored together before their update is applied to the rest of the panel. */
const PANEL_BLOCK = 32;

/** Blocked LDLᵀ of the m×k panel (column-major, leading dimension m); returns the count of negative pivots. */
function factorPanel(
  lx: Float64Array,
  lp: number,
  m: number,
  k: number,
  dd: Float64Array,
  f: number,
  tiny: number,
  perm: Int32Array,
  F: SupernodalFactor,
): number {
  let neg = 0;
  for (let j0 = 0; j0 < k; j0 += PANEL_BLOCK) {
    const j1 = Math.min(k, j0 + PANEL_BLOCK);
    // left-looking inside the block: earlier blocks are already applied; column j's rows j.. take
    // the update of the block's columns j0..j − 1 (a one-column rank update)
    for (let j = j0; j < j1; j++) {
      const cj = lp + j * m;
      if (j > j0) {
        if (F.kern) F.kern.rankUpdate(lp + j0 * m + j, m, j - j0, F.dBase + f + j0, cj + j, m, m - j, 1);
        else rankUpdate(lx, lp + j0 * m + j, m, j - j0, dd, f + j0, lx, cj + j, m, m - j, 1);
      }
      const dj = lx[cj + j];
      if (!(Math.abs(dj) > tiny)) {
        const eq = perm[f + j];
        throw new SingularMatrixError(
          `the stiffness matrix is singular at equation ${eq}: pivot ${dj} — the specimen is not held against rigid-body motion, or a part of it is disconnected`,
          eq,
        );
      }
      if (dj < 0) neg++;
      dd[f + j] = dj;
      lx[cj + j] = 1;
      const inv = 1 / dj;
      for (let i = j + 1; i < m; i++) lx[cj + i] *= inv;
    }
    // the block's update of the remaining columns of the panel
    if (j1 < k) {
      if (F.kern) F.kern.rankUpdate(lp + j0 * m + j1, m, j1 - j0, F.dBase + f + j0, lp + j1 * m + j1, m, m - j1, k - j1);
      else rankUpdate(lx, lp + j0 * m + j1, m, j1 - j0, dd, f + j0, lx, lp + j1 * m + j1, m, m - j1, k - j1);
    }
  }
  return neg;
}

/**
 * Lower trapezoid update U −= S D Sᵀ: U has R rows and C ≤ R columns (leading dimension ldu, rows i ≥ column j);
 * S has np columns at src + p·lds, whose rows 0..R−1 line up with U's rows; D = dd[dOff..dOff+np).
 */
export function rankUpdate(
  x: Float64Array,
  src: number,
  lds: number,
  np: number,
  dd: Float64Array,
  dOff: number,
  u: Float64Array,
  up: number,
  ldu: number,
  R: number,
  C: number,
): void {
  let p = 0;
  for (; p + 3 < np; p += 4) {
    const c0 = src + p * lds;
    const c1 = c0 + lds;
    const c2 = c1 + lds;
    const c3 = c2 + lds;
    const d0 = dd[dOff + p];
    const d1 = dd[dOff + p + 1];
    const d2 = dd[dOff + p + 2];
    const d3 = dd[dOff + p + 3];
    let j = 0;
    // four target columns at a time; their top 3×3 triangle first, then full rows
    for (; j + 3 < C; j += 4) {
      const uj = up + j * ldu;
      for (let jj = j; jj < j + 3; jj++) {
        const w0 = x[c0 + jj] * d0;
        const w1 = x[c1 + jj] * d1;
        const w2 = x[c2 + jj] * d2;
        const w3 = x[c3 + jj] * d3;
        const ujj = up + jj * ldu;
        for (let i = jj; i < j + 3; i++) u[ujj + i] -= x[c0 + i] * w0 + x[c1 + i] * w1 + x[c2 + i] * w2 + x[c3 + i] * w3;
      }
      const w0 = x[c0 + j] * d0;
      const w1 = x[c1 + j] * d1;
      const w2 = x[c2 + j] * d2;
      const w3 = x[c3 + j] * d3;
      const v0 = x[c0 + j + 1] * d0;
      const v1 = x[c1 + j + 1] * d1;
      const v2 = x[c2 + j + 1] * d2;
      const v3 = x[c3 + j + 1] * d3;
      const t0 = x[c0 + j + 2] * d0;
      const t1 = x[c1 + j + 2] * d1;
      const t2 = x[c2 + j + 2] * d2;
      const t3 = x[c3 + j + 2] * d3;
      const s0 = x[c0 + j + 3] * d0;
      const s1 = x[c1 + j + 3] * d1;
      const s2 = x[c2 + j + 3] * d2;
      const s3 = x[c3 + j + 3] * d3;
      const uj1 = uj + ldu;
      const uj2 = uj1 + ldu;
      const uj3 = uj2 + ldu;
      for (let i = j + 3; i < R; i++) {
        const a0 = x[c0 + i];
        const a1 = x[c1 + i];
        const a2 = x[c2 + i];
        const a3 = x[c3 + i];
        u[uj + i] -= a0 * w0 + a1 * w1 + a2 * w2 + a3 * w3;
        u[uj1 + i] -= a0 * v0 + a1 * v1 + a2 * v2 + a3 * v3;
        u[uj2 + i] -= a0 * t0 + a1 * t1 + a2 * t2 + a3 * t3;
        u[uj3 + i] -= a0 * s0 + a1 * s1 + a2 * s2 + a3 * s3;
      }
    }
    for (; j < C; j++) {
      const w0 = x[c0 + j] * d0;
      const w1 = x[c1 + j] * d1;
      const w2 = x[c2 + j] * d2;
      const w3 = x[c3 + j] * d3;
      const uj = up + j * ldu;
      for (let i = j; i < R; i++) u[uj + i] -= x[c0 + i] * w0 + x[c1 + i] * w1 + x[c2 + i] * w2 + x[c3 + i] * w3;
    }
  }
  if (p + 1 < np) {
    // two source columns left (supernodes of two-dof nodes often end so)
    const c0 = src + p * lds;
    const c1 = c0 + lds;
    const d0 = dd[dOff + p];
    const d1 = dd[dOff + p + 1];
    let j = 0;
    for (; j + 3 < C; j += 4) {
      for (let jj = j; jj < j + 3; jj++) {
        const w0 = x[c0 + jj] * d0;
        const w1 = x[c1 + jj] * d1;
        const ujj = up + jj * ldu;
        for (let i = jj; i < j + 3; i++) u[ujj + i] -= x[c0 + i] * w0 + x[c1 + i] * w1;
      }
      const w0 = x[c0 + j] * d0;
      const w1 = x[c1 + j] * d1;
      const v0 = x[c0 + j + 1] * d0;
      const v1 = x[c1 + j + 1] * d1;
      const t0 = x[c0 + j + 2] * d0;
      const t1 = x[c1 + j + 2] * d1;
      const s0 = x[c0 + j + 3] * d0;
      const s1 = x[c1 + j + 3] * d1;
      const uj = up + j * ldu;
      const uj1 = uj + ldu;
      const uj2 = uj1 + ldu;
      const uj3 = uj2 + ldu;
      for (let i = j + 3; i < R; i++) {
        const a0 = x[c0 + i];
        const a1 = x[c1 + i];
        u[uj + i] -= a0 * w0 + a1 * w1;
        u[uj1 + i] -= a0 * v0 + a1 * v1;
        u[uj2 + i] -= a0 * t0 + a1 * t1;
        u[uj3 + i] -= a0 * s0 + a1 * s1;
      }
    }
    for (; j < C; j++) {
      const w0 = x[c0 + j] * d0;
      const w1 = x[c1 + j] * d1;
      const uj = up + j * ldu;
      for (let i = j; i < R; i++) u[uj + i] -= x[c0 + i] * w0 + x[c1 + i] * w1;
    }
    p += 2;
  }
  for (; p < np; p++) {
    const c0 = src + p * lds;
    const d0 = dd[dOff + p];
    for (let j = 0; j < C; j++) {
      const w0 = x[c0 + j] * d0;
      const uj = up + j * ldu;
      for (let i = j; i < R; i++) u[uj + i] -= x[c0 + i] * w0;
    }
  }
}

/**
 * The trailing block of L D Lᵀ, columns and rows ≥ firstCol (the elimination order), as a dense
 * row-major matrix of order n − firstCol: the Schur complement of the leading block of the
 * factored matrix onto the trailing unknowns.
 */
export function trailingSchur(F: Factor, firstCol: number, out: Float64Array): void {
  if (!(F instanceof SupernodalFactor)) throw new TypeError('trailingSchur needs a factor made by factorize');
  const { superStart, rowPtr, rowIdx, lPtr, nsuper } = F.sym;
  const nt = F.n - firstCol, lx = F.lx, d = F.d;
  out.fill(0, 0, nt * nt);
  const rows = new Int32Array(nt), vals = new Float64Array(nt);
  for (let s = 0; s < nsuper; s++) {
    const f = superStart[s], k = superStart[s + 1] - f;
    if (f + k <= firstCol) continue;
    const r0 = rowPtr[s], m = rowPtr[s + 1] - r0, lp = lPtr[s];
    for (let j = Math.max(0, firstCol - f); j < k; j++) {
      // column f+j of L: its unit diagonal, the rest of the supernode's columns, then its rows below
      const cb = lp + j * m;
      let cnt = 0;
      for (let i = j; i < k; i++) { rows[cnt] = f + i - firstCol; vals[cnt++] = i === j ? 1 : lx[cb + i]; }
      for (let i = k; i < m; i++) { rows[cnt] = rowIdx[r0 + i] - firstCol; vals[cnt++] = lx[cb + i]; }
      const dj = d[f + j];
      for (let a = 0; a < cnt; a++) {
        const w = dj * vals[a], o = rows[a] * nt;
        for (let b = 0; b <= a; b++) out[o + rows[b]] += w * vals[b];
      }
    }
  }
  // rows within a column ascend, so the lower triangle is filled: mirror it
  for (let i = 0; i < nt; i++) for (let j = 0; j < i; j++) out[j * nt + i] = out[i * nt + j];
}
