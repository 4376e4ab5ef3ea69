// The supernodal factorization's rank update U −= S D Sᵀ as a WebAssembly SIMD (f64x2) kernel on
// one memory that holds L, D, the update stack and the relative row indices: two rows per vector,
// two target columns per pass sharing the loads of S. Each entry of U receives exactly the
// operations of the scalar update in ldlt.ts, in the same order (source columns in groups of 4,
// then 2, then 1; products summed left to right; no fused multiply-add), so both give the same
// bits. The extend-add of a child's update matrix is there too (scalar, without bounds checks).

import { F64, FunctionBody, I32, V128, moduleBytes } from './wasm.js';

// the part of the runtime's WebAssembly API used here (the project's type libraries leave it out)
interface WasmMemory { readonly buffer: ArrayBuffer }
interface WasmModule { readonly kind?: 'module' }
declare const WebAssembly: {
  validate(bytes: Uint8Array): boolean;
  Module: new (bytes: Uint8Array) => WasmModule;
  Instance: new (mod: WasmModule, imports: object) => { exports: Record<string, unknown> };
  Memory: new (d: { initial: number }) => WasmMemory;
};

// opcodes (WebAssembly core specification 2.0, and the SIMD numbers after the 0xfd prefix)
const I32_LOAD = 0x28, I32_ADD = 0x6a, I32_SUB = 0x6b, I32_MUL = 0x6c, I32_SHL = 0x74, I32_LT_S = 0x48, I32_GE_S = 0x4e, I32_LT_U = 0x49, I32_GE_U = 0x4f;
const F64_LOAD = 0x2b, F64_STORE = 0x39, F64_ADD = 0xa0, F64_SUB = 0xa1, F64_MUL = 0xa2;
const V128_LOAD = 0, V128_STORE = 11, F64X2_SPLAT = 20, F64X2_ADD = 240, F64X2_SUB = 241, F64X2_MUL = 242;

/**
 * rank_update(src, lds, np, dOff, up, ldu, R, C), all in doubles from the memory's start: U (R rows,
 * C ≤ R columns at up + j·ldu, rows i ≥ j only) −= S D Sᵀ, S's np columns at src + p·lds, D at dOff.
 */
function rankUpdateBody(): FunctionBody {
  const f = new FunctionBody(8);
  const SRC = 0, LDS = 1, NP = 2, DOFF = 3, UP = 4, LDU = 5, R = 6, C = 7;
  const p = f.local(I32), j = f.local(I32), ib = f.local(I32), end = f.local(I32);
  const uj = f.local(I32), uj1 = f.local(I32), jb = f.local(I32), ldu8 = f.local(I32);
  const c = [0, 1, 2, 3].map(() => f.local(I32));
  const d = [0, 1, 2, 3].map(() => f.local(F64));
  const ws = [0, 1, 2, 3].map(() => f.local(F64));
  const vs = [0, 1, 2, 3].map(() => f.local(F64));
  const W = [0, 1, 2, 3].map(() => f.local(V128));
  const V = [0, 1, 2, 3].map(() => f.local(V128));
  const A = [0, 1, 2, 3].map(() => f.local(V128));

  const addr = (base: number, row: number) => f.get(base).get(row).op(I32_ADD);
  // u[row] −= Σ_q x_q[row]·w_q, scalar
  const scalarRow = (u: number, row: number, w: number[], g: number) => {
    addr(u, row);
    addr(u, row).mem(F64_LOAD, 3);
    for (let q = 0; q < g; q++) {
      addr(c[q], row).mem(F64_LOAD, 3).get(w[q]).op(F64_MUL);
      if (q > 0) f.op(F64_ADD);
    }
    f.op(F64_SUB).mem(F64_STORE, 3);
  };
  // u[row, row+1] −= Σ_q A_q·w_q, two rows at once
  const vectorRows = (u: number, w: number[], g: number) => {
    addr(u, ib);
    addr(u, ib).simdMem(V128_LOAD, 3);
    for (let q = 0; q < g; q++) {
      f.get(A[q]).get(w[q]).simd(F64X2_MUL);
      if (q > 0) f.simd(F64X2_ADD);
    }
    f.simd(F64X2_SUB).simdMem(V128_STORE, 3);
  };
  const loadA = (g: number) => { for (let q = 0; q < g; q++) addr(c[q], ib).simdMem(V128_LOAD, 3).set(A[q]); };
  // column j's start in U, in bytes
  const columnStart = () => f.get(UP).get(j).get(LDU).op(I32_MUL).op(I32_ADD).i32(3).op(I32_SHL).set(uj);
  const weights = (w: number[], splat: number[], g: number, offset: number) => {
    for (let q = 0; q < g; q++) addr(c[q], jb).mem(F64_LOAD, 3, offset).get(d[q]).op(F64_MUL).set(w[q]).get(w[q]).simd(F64X2_SPLAT).set(splat[q]);
  };

  const group = (g: number) => {
    for (let q = 0; q < g; q++) {
      f.get(SRC).get(p).i32(q).op(I32_ADD).get(LDS).op(I32_MUL).op(I32_ADD).i32(3).op(I32_SHL).set(c[q]);
      f.get(DOFF).get(p).op(I32_ADD).i32(3).op(I32_SHL).mem(F64_LOAD, 3, 8 * q).set(d[q]);
    }
    f.i32(0).set(j);
    // target columns in pairs
    f.whileNot(() => f.get(j).i32(1).op(I32_ADD).get(C).op(I32_GE_S), () => {
      f.get(j).i32(3).op(I32_SHL).set(jb);
      columnStart();
      f.get(uj).get(ldu8).op(I32_ADD).set(uj1);
      weights(ws, W, g, 0);
      weights(vs, V, g, 8);
      scalarRow(uj, jb, ws, g); // row j belongs to column j only
      f.get(jb).i32(8).op(I32_ADD).set(ib);
      f.whileNot(() => f.get(ib).i32(8).op(I32_ADD).get(end).op(I32_GE_U), () => {
        loadA(g);
        vectorRows(uj, W, g);
        vectorRows(uj1, V, g);
        f.get(ib).i32(16).op(I32_ADD).set(ib);
      });
      f.get(ib).get(end).op(I32_LT_U).when(() => { scalarRow(uj, ib, ws, g); scalarRow(uj1, ib, vs, g); });
      f.get(j).i32(2).op(I32_ADD).set(j);
    });
    // the last column when C is odd
    f.get(j).get(C).op(I32_LT_S).when(() => {
      f.get(j).i32(3).op(I32_SHL).set(jb);
      columnStart();
      weights(ws, W, g, 0);
      f.get(jb).set(ib);
      f.whileNot(() => f.get(ib).i32(8).op(I32_ADD).get(end).op(I32_GE_U), () => {
        loadA(g);
        vectorRows(uj, W, g);
        f.get(ib).i32(16).op(I32_ADD).set(ib);
      });
      f.get(ib).get(end).op(I32_LT_U).when(() => scalarRow(uj, ib, ws, g));
    });
  };

  f.get(R).i32(3).op(I32_SHL).set(end);
  f.get(LDU).i32(3).op(I32_SHL).set(ldu8);
  f.i32(0).set(p);
  f.whileNot(() => f.get(p).i32(3).op(I32_ADD).get(NP).op(I32_GE_S), () => { group(4); f.get(p).i32(4).op(I32_ADD).set(p); });
  f.get(p).i32(1).op(I32_ADD).get(NP).op(I32_LT_S).when(() => { group(2); f.get(p).i32(2).op(I32_ADD).set(p); });
  f.whileNot(() => f.get(p).get(NP).op(I32_GE_S), () => { group(1); f.get(p).i32(1).op(I32_ADD).set(p); });
  return f;
}

/**
 * extend_add(cp, rc, rp, lp, m, k, up, r): the child's rc×rc update matrix at cp (doubles, lower
 * part, column-major) added into the parent's L block at lp (m rows, k columns) and update matrix
 * at up (r×r); its rows' places in the parent's row list are the 32-bit integers from rp.
 */
function extendAddBody(): FunctionBody {
  const f = new FunctionBody(8);
  const CP = 0, RC = 1, RP = 2, LP = 3, M = 4, K = 5, UP = 6, R = 7;
  const j = f.local(I32), pj = f.local(I32), dst = f.local(I32), ri = f.local(I32), rend = f.local(I32), si = f.local(I32), a = f.local(I32);
  f.get(RP).get(RC).op(I32_ADD).i32(2).op(I32_SHL).set(rend);
  f.i32(0).set(j);
  f.whileNot(() => f.get(j).get(RC).op(I32_GE_S), () => {
    f.get(RP).get(j).op(I32_ADD).i32(2).op(I32_SHL).set(ri);
    f.get(ri).mem(I32_LOAD, 2).set(pj);
    // column pj of the parent: in L when pj < k, else in the update matrix (row i at dst + i)
    f.get(UP).get(pj).get(K).op(I32_SUB).get(R).op(I32_MUL).op(I32_ADD).get(K).op(I32_SUB).set(dst);
    f.get(pj).get(K).op(I32_LT_S).when(() => { f.get(LP).get(pj).get(M).op(I32_MUL).op(I32_ADD).set(dst); });
    f.get(dst).i32(3).op(I32_SHL).set(dst);
    f.get(CP).get(j).get(RC).op(I32_MUL).op(I32_ADD).get(j).op(I32_ADD).i32(3).op(I32_SHL).set(si);
    f.whileNot(() => f.get(ri).get(rend).op(I32_GE_U), () => {
      f.get(dst).get(ri).mem(I32_LOAD, 2).i32(3).op(I32_SHL).op(I32_ADD).set(a);
      f.get(a).get(a).mem(F64_LOAD, 3).get(si).mem(F64_LOAD, 3).op(F64_ADD).mem(F64_STORE, 3);
      f.get(ri).i32(4).op(I32_ADD).set(ri);
      f.get(si).i32(8).op(I32_ADD).set(si);
    });
    f.get(j).i32(1).op(I32_ADD).set(j);
  });
  return f;
}

/** The kernels of one memory, and that memory seen as doubles. */
export interface SimdKernels {
  readonly memory: WasmMemory;
  readonly f64: Float64Array;
  extendAdd(cp: number, rc: number, rp: number, lp: number, m: number, k: number, up: number, r: number): void;
  rankUpdate(src: number, lds: number, np: number, dOff: number, up: number, ldu: number, R: number, C: number): void;
}

let compiled: WasmModule | null | undefined;

/** The compiled module, or null where this runtime has no WebAssembly SIMD. */
function kernelModule(): WasmModule | null {
  if (compiled === undefined) {
    compiled = null;
    try {
      const bytes = moduleBytes([{ name: 'rank_update', body: rankUpdateBody() }, { name: 'extend_add', body: extendAddBody() }]);
      if (typeof WebAssembly !== 'undefined' && WebAssembly.validate(bytes)) compiled = new WebAssembly.Module(bytes);
    } catch {
      compiled = null;
    }
  }
  return compiled;
}

/** Byte addresses stay below 2³¹ so that the kernel's signed loop counters cannot wrap. */
const MAX_DOUBLES = 2 ** 28 - 1;

/** Kernels on a fresh memory of at least `doubles` zeroed doubles; null where WebAssembly SIMD or the memory is not to be had. */
export function simdKernels(doubles: number): SimdKernels | null {
  const mod = kernelModule();
  if (!mod || doubles > MAX_DOUBLES) return null;
  try {
    const memory = new WebAssembly.Memory({ initial: Math.max(1, Math.ceil((doubles * 8) / 65536)) });
    const inst = new WebAssembly.Instance(mod, { env: { memory } });
    return {
      memory,
      f64: new Float64Array(memory.buffer),
      rankUpdate: inst.exports.rank_update as SimdKernels['rankUpdate'],
      extendAdd: inst.exports.extend_add as SimdKernels['extendAdd'],
    };
  } catch {
    return null; // the address space or memory is short: the caller keeps plain arrays
  }
}
