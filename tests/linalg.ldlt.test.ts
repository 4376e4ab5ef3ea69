// Supernodal LDLᵀ against dense reference solves.
import { describe, expect, it } from 'vitest';
import { Matrix, solve as denseSolve, EigenvalueDecomposition } from 'ml-matrix';
import { SingularMatrixError } from '../src/errors.js';
import { analyze, factorize, factorizeTrailing, fillReducingOrder, matVec, toDense, type CsrMatrix } from '../src/linalg/index.js';
import { gridStiffnessQ4 } from '../cli/bench-matrix.js';
import { gridLaplacian, randomDominant, rng } from '../src/linalg/samples.js';

function dense(A: CsrMatrix): Matrix {
  const d = toDense(A);
  const M = new Matrix(A.n, A.n);
  for (let i = 0; i < A.n; i++) for (let j = 0; j < A.n; j++) M.set(i, j, d[i * A.n + j]);
  return M;
}

function rhs(n: number, seed: number): Float64Array {
  const r = rng(seed);
  return Float64Array.from({ length: n }, () => r() * 2 - 1);
}

function maxDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i] - b[i]));
  return m;
}

describe('sparse LDLᵀ agrees with the dense LU solve of the reference library (ml-matrix, REFERENCES.md)', () => {
  for (const signs of ['positive', 'mixed'] as const) {
    for (const ordering of ['natural', 'mindegree', 'dissection'] as const) {
      for (const amalgamate of [true, false]) {
        it(`${signs === 'positive' ? 'SPD' : 'indefinite'} matrices, ${ordering} ordering, amalgamation ${amalgamate}`, () => {
          for (const [n, perRow, seed] of [
            [1, 0, 1],
            [7, 3, 2],
            [60, 4, 3],
            [150, 8, 4],
          ]) {
            const A = randomDominant(n, perRow, seed, signs);
            const b = rhs(n, seed + 100);
            const F = factorize(A, analyze(A, { ordering, amalgamate }));
            const x = F.solve(b);
            const ref = denseSolve(dense(A), Matrix.columnVector(Array.from(b))).to1DArray();
            expect(maxDiff(x, ref)).toBeLessThan(1e-10);
            // Sylvester's law of inertia: negative pivots = negative eigenvalues (reference library)
            const eig = new EigenvalueDecomposition(dense(A), { assumeSymmetric: true }).realEigenvalues;
            expect(F.negativePivots).toBe(eig.filter((v) => v < 0).length);
          }
        });
      }
    }
  }

  it('a caller-given permutation gives the same solution as natural order', () => {
    const A = randomDominant(80, 6, 9, 'mixed');
    const b = rhs(80, 10);
    const r = rng(11);
    const perm = Int32Array.from({ length: 80 }, (_, i) => i);
    for (let i = 79; i > 0; i--) {
      const j = Math.floor(r() * (i + 1));
      [perm[i], perm[j]] = [perm[j], perm[i]];
    }
    const x1 = factorize(A, analyze(A, { ordering: perm })).solve(b);
    const x2 = factorize(A, analyze(A, { ordering: 'natural' })).solve(b);
    expect(maxDiff(x1, x2)).toBeLessThan(1e-12);
  });

  it('refactorization into reused storage with the same analysis gives the fresh result', () => {
    const A = randomDominant(200, 6, 21, 'positive');
    const sym = analyze(A);
    const F = factorize(A, sym);
    const b = rhs(200, 22);
    const x0 = Float64Array.from(F.solve(b));
    // other values on the same pattern, then back
    const B: CsrMatrix = { ...A, values: A.values.map((v, q) => v * (1 + 0.1 * Math.sin(q))) };
    const G = factorize(B, sym, F);
    expect(G).toBe(F);
    const xb = new Float64Array(200);
    G.solve(b, xb);
    const fresh = factorize(B, analyze(B)).solve(b);
    expect(maxDiff(xb, fresh)).toBeLessThan(1e-12);
    factorize(A, sym, F);
    expect(maxDiff(F.solve(b), x0)).toBe(0);
  });

  it('rows ordered last and refactorized alone give the bitwise result of a full refactorization', () => {
    const n = 300;
    const A = randomDominant(n, 6, 31, 'mixed');
    // the rows that change: every seventh one, eliminated after all the others
    const last = Uint8Array.from({ length: n }, (_, i) => (i % 7 === 3 ? 1 : 0));
    const sym = analyze(A, { ordering: fillReducingOrder(A, 'mindegree', {}, last) });
    let first = n;
    for (let i = 0; i < n; i++) if (last[i]) first = Math.min(first, sym.iperm[i]);
    for (let i = 0; i < n; i++) if (!last[i]) expect(sym.iperm[i]).toBeLessThan(first);
    const F = factorizeTrailing(A, sym, first);
    const b = rhs(n, 32);
    for (let round = 1; round <= 3; round++) {
      // change only entries whose row and column are both marked (as the face pairs do), symmetrically
      const B: CsrMatrix = {
        ...A, values: A.values.map((v, q) => {
          let i = 0;
          while (A.rowPtr[i + 1] <= q) i++;
          const j = A.colIdx[q];
          return last[i] && last[j] ? v * (1 + 0.3 * Math.sin(Math.min(i, j) * n + Math.max(i, j) + round)) : v;
        }),
      };
      const G = factorizeTrailing(B, sym, first, F);
      expect(G).toBe(F);
      const full = factorize(B, sym);
      expect(Array.from(G.solve(b))).toEqual(Array.from(full.solve(b)));
      expect(G.negativePivots).toBe(full.negativePivots);
      expect(maxDiff(G.solve(b), denseSolve(dense(B), Matrix.columnVector(Array.from(b))).to1DArray())).toBeLessThan(1e-10);
    }
  });

  it('two right-hand sides in one sweep give what two solves give', () => {
    const A = randomDominant(150, 8, 41, 'mixed');
    const F = factorize(A, analyze(A));
    const b1 = rhs(150, 42), b2 = rhs(150, 43);
    b2[5] = 0; b2[77] = 0; // zeros skip work in one of the two sweeps only
    const x1 = new Float64Array(150), x2 = new Float64Array(150);
    F.solve2(b1, b2, x1, x2);
    expect(Array.from(x1)).toEqual(Array.from(F.solve(b1)));
    expect(Array.from(x2)).toEqual(Array.from(F.solve(b2)));
  });

  it('the clamped bilinear grid stiffness is solved to a small residual (common practice)', () => {
    const A = gridStiffnessQ4(30, 20);
    const F = factorize(A, analyze(A));
    const b = new Float64Array(A.n).fill(1);
    const x = F.solve(b);
    const r = matVec(A, x, new Float64Array(A.n));
    expect(maxDiff(r, b)).toBeLessThan(1e-9);
    expect(F.negativePivots).toBe(0);
  });
});

describe('singular matrices are reported (common practice: an unrestrained stiffness has rigid-body modes)', () => {
  it('a grid Laplacian without a grounded node throws SingularMatrixError', () => {
    const A = gridLaplacian(12, false);
    expect(() => factorize(A, analyze(A))).toThrow(SingularMatrixError);
    const grounded = gridLaplacian(12, true);
    expect(() => factorize(grounded, analyze(grounded))).not.toThrow();
  });

  it('the free bilinear grid stiffness throws SingularMatrixError naming an equation', () => {
    const A = gridStiffnessQ4(6, 5, false);
    for (const ordering of ['mindegree', 'dissection', 'natural'] as const) {
      try {
        factorize(A, analyze(A, { ordering }));
        expect.unreachable('free stiffness must be singular');
      } catch (e) {
        expect(e).toBeInstanceOf(SingularMatrixError);
        const eq = (e as SingularMatrixError).equation;
        expect(eq).toBeGreaterThanOrEqual(0);
        expect(eq).toBeLessThan(A.n);
        expect((e as Error).message).toMatch(/^the stiffness matrix is singular at equation \d+: /);
      }
    }
  });
});
