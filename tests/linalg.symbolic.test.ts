// The symbolic analysis on nodes (runs of equal rows, such as a mesh node's two dofs) against the
// same analysis column by column: no published values, the two must agree entry for entry.
import { describe, expect, it } from 'vitest';
import { analyze, factorize, fillReducingOrder, type CsrMatrix, type Symbolic } from '../src/linalg/index.js';
import { gridStiffnessQ4, plateCase } from '../cli/bench-matrix.js';
import { buildDomain } from '../src/geometry/domain.js';
import { generateMesh } from '../src/mesh/generate.js';
import { Analysis } from '../src/fracture/analysis.js';
import { rng } from '../src/linalg/samples.js';

/** Stiffness of a Voronoi mesh of a notched plate with a hole (supports eliminated), about 2.4k dofs. */
function plateStiffness(seed: number): CsrMatrix {
  const c = plateCase(26, 2, seed);
  return new Analysis(c, generateMesh(buildDomain(c), c.mesh)).stiffnessMatrix();
}

const FIELDS = ['perm', 'iperm', 'parent', 'nnzLExact', 'nnzL', 'nsuper', 'superStart', 'superParent', 'rowPtr', 'rowIdx',
  'lPtr', 'lSize', 'relPtr', 'relIdx', 'aMap', 'stackSize', 'maxRows', 'maxCols'] as const;

function expectSame(a: Symbolic, b: Symbolic): void {
  for (const f of FIELDS) {
    const x = a[f], y = b[f];
    if (typeof x === 'number') expect(x, f).toBe(y);
    else expect(Array.from(x as Int32Array), f).toEqual(Array.from(y as Int32Array));
  }
}

describe('symbolic analysis on nodes agrees with the column-by-column analysis', () => {
  const cases: [string, CsrMatrix][] = [['Voronoi plate, seed 1', plateStiffness(1)], ['Voronoi plate, seed 2', plateStiffness(2)], ['clamped bilinear grid 24×16', gridStiffnessQ4(24, 16)]];
  for (const [name, A] of cases) {
    it(`${name}: every ordering, with and without rows kept last, amalgamation on and off`, () => {
      const n = A.n;
      const next = rng(5);
      // rows kept last: a band of rows and a few single dofs whose node partner is not marked
      const last = new Uint8Array(n);
      for (let i = Math.floor(0.8 * n); i < n; i++) last[i] = 1;
      for (let k = 0; k < 5; k++) last[Math.floor(next() * n)] = 1;
      const withLast = fillReducingOrder(A, 'auto', {}, last);
      let lastFrom = n;
      for (let k = 0; k < n; k++) if (last[withLast[k]]) { lastFrom = k; break; }
      const shuffled = Int32Array.from({ length: n }, (_, i) => i);
      for (let i = n - 1; i > 0; i--) { const j = Math.floor(next() * (i + 1)); [shuffled[i], shuffled[j]] = [shuffled[j], shuffled[i]]; }
      const runs: { ordering: 'mindegree' | 'dissection' | 'natural' | Int32Array; lastFrom?: number; amalgamate?: boolean }[] = [
        { ordering: 'mindegree' }, { ordering: 'dissection' }, { ordering: 'natural' }, { ordering: shuffled },
        { ordering: withLast, lastFrom }, { ordering: withLast, lastFrom: lastFrom + 1 }, { ordering: 'dissection', amalgamate: false },
      ];
      for (const o of runs) {
        const nodes = analyze(A, o);
        const columns = analyze(A, { ...o, compress: false });
        expectSame(nodes, columns);
      }
      // the same structure gives the same factor, bitwise
      const sym = analyze(A, { ordering: withLast, lastFrom });
      const b = Float64Array.from({ length: n }, () => next() - 0.5);
      const x1 = factorize(A, sym).solve(b);
      const x2 = factorize(A, analyze(A, { ordering: withLast, lastFrom, compress: false })).solve(b);
      expect(Array.from(x1)).toEqual(Array.from(x2));
    });
  }
});
