// The WebAssembly SIMD rank update against a dense reference and against the scalar update,
// and the factorization on WebAssembly memory against the one on plain arrays.
import { describe, expect, it } from 'vitest';
import { analyze, factorize, factorizeTrailing, matVec } from '../src/linalg/index.js';
import { SIMD_FROM_ENTRIES, rankUpdate, useSimdKernels } from '../src/linalg/ldlt.js';
import { simdKernels } from '../src/linalg/simdkernel.js';
import { moduleBytes, FunctionBody } from '../src/linalg/wasm.js';
import { gridStiffnessQ4 } from '../cli/bench-matrix.js';
import { rng } from '../src/linalg/samples.js';

const probe = simdKernels(1);
const maybe = probe ? it : it.skip;
if (!probe) console.warn('WebAssembly SIMD is not available in this runtime: the SIMD kernel tests are skipped');

describe('the binary writer makes modules the runtime accepts', () => {
  it('an empty function in a module importing a memory validates (WebAssembly core specification 2.0)', () => {
    const wasm = (globalThis as unknown as { WebAssembly: { validate(b: Uint8Array): boolean } }).WebAssembly;
    expect(wasm.validate(moduleBytes([{ name: 'f', body: new FunctionBody(3) }]))).toBe(true);
  });
});

describe('SIMD rank update U −= S D Sᵀ (lower trapezoid; dense reference: the definition, common practice)', () => {
  const shapes: [number, number, number][] = []; // np, R, C
  for (const np of [1, 2, 3, 4, 5, 6, 7, 9, 12]) for (const [R, C] of [[1, 1], [2, 1], [2, 2], [5, 3], [8, 8], [9, 4], [13, 13], [16, 7]]) shapes.push([np, R, C]);

  maybe('matches the definition within rounding and the scalar update bit for bit, leaving the upper part alone', () => {
    const r = rng(7);
    for (const [np, R, C] of shapes) {
      const lds = R + 3, ldu = R + 1;
      const src = 5, dOff = src + np * lds + 1, up = dOff + np + 3;
      const size = up + C * ldu + 2;
      const k = simdKernels(size)!;
      const mem = k.f64;
      for (let i = 0; i < size; i++) mem[i] = r() * 2 - 1;
      const before = Float64Array.from(mem.subarray(0, size));
      // the scalar update on a copy, and the definition
      const scalar = Float64Array.from(before);
      rankUpdate(scalar, src, lds, np, scalar, dOff, scalar, up, ldu, R, C);
      k.rankUpdate(src, lds, np, dOff, up, ldu, R, C);
      for (let j = 0; j < C; j++) {
        for (let i = 0; i < ldu; i++) {
          const at = up + j * ldu + i;
          if (i < j || i >= R) { expect(mem[at]).toBe(before[at]); continue; }
          let s = before[at];
          for (let p = 0; p < np; p++) s -= before[src + p * lds + i] * before[dOff + p] * before[src + p * lds + j];
          expect(Math.abs(mem[at] - s)).toBeLessThan(1e-13 * (1 + np));
          expect(mem[at]).toBe(scalar[at]);
        }
      }
      // nothing outside U moved
      for (let i = 0; i < up; i++) expect(mem[i]).toBe(before[i]);
    }
  });
});

describe('factorization on WebAssembly memory (rank updates and extend-adds there)', () => {
  maybe('gives the bits of the plain-array factorization and a small residual (common practice) on a grid stiffness', () => {
    const A = gridStiffnessQ4(60, 40);
    const sym = analyze(A, { ordering: 'dissection' });
    expect(sym.lSize).toBeGreaterThanOrEqual(SIMD_FROM_ENTRIES);
    const b = Float64Array.from({ length: A.n }, (_, i) => Math.sin(i + 1));
    const was = useSimdKernels(false);
    const plain = factorize(A, sym).solve(b);
    useSimdKernels(true);
    const F = factorize(A, sym);
    useSimdKernels(was);
    const x = F.solve(b);
    expect(Array.from(x)).toEqual(Array.from(plain));
    const res = matVec(A, x, new Float64Array(A.n));
    let m = 0, bm = 0;
    for (let i = 0; i < A.n; i++) { m = Math.max(m, Math.abs(res[i] - b[i])); bm = Math.max(bm, Math.abs(b[i])); }
    expect(m / bm).toBeLessThan(1e-9);
    // a trailing refactorization from the kept state gives the full one's bits
    const T = factorizeTrailing(A, sym, A.n - 50);
    factorizeTrailing(A, sym, A.n - 50, T);
    expect(Array.from(T.solve(b))).toEqual(Array.from(x));
  });
});
