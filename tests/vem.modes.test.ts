// An unrestrained stiffness matrix has exactly three zero-energy modes, two translations
// and one rotation (common practice); reference eigenvalues from ml-matrix.
import { describe, expect, it } from 'vitest';
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { elasticMatrix } from '../src/vem/material.js';
import { System } from '../src/solver/system.js';
import { toDense } from '../src/linalg/csr.js';
import { rectangleMesh } from './support/elastic.js';

describe('rigid-body modes of the assembled stiffness', () => {
  for (const seed of [1, 2]) {
    it(`Voronoi mesh, seed ${seed}: exactly three zero eigenvalues`, () => {
      const m = rectangleMesh(6, 4, 1, seed);
      const none = new Int32Array(0), noneF = new Float64Array(0);
      const sys = new System(m, elasticMatrix(30000, 0.2, 'plane-stress'), 10,
        { plus: none, minus: none, nx: noneF, ny: noneF, area: noneF },
        { fixed: none, load: none, loadW: noneF, gauge: none, gaugeW: noneF });
      const n = sys.kBulk.n, dense = toDense(sys.kBulk);
      const K = new Matrix(n, n);
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) K.set(i, j, dense[i * n + j]);
      const ev = new EigenvalueDecomposition(K, { assumeSymmetric: true }).realEigenvalues;
      const max = Math.max(...ev.map(Math.abs));
      expect(ev.filter((x) => Math.abs(x) < 1e-10 * max).length).toBe(3);
      expect(Math.min(...ev)).toBeGreaterThan(-1e-10 * max);
    });
  }
});
