// Matrix Market files: exact round trip and input errors.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { InputError } from '../src/errors.js';
import { readMatrixMarket, writeMatrixMarket } from '../src/linalg/index.js';
import { randomDominant } from '../src/linalg/samples.js';

const dir = mkdtempSync(join(tmpdir(), 'linalg-mtx-'));

describe('Matrix Market files', () => {
  it('round trip is exact, bit for bit (common practice: shortest round-trip decimals)', () => {
    const A = randomDominant(120, 6, 5, 'mixed');
    // awkward values on a diagonal entry and on a mirrored pair
    const at = (i: number, j: number): number => A.rowPtr[i] + Array.from(A.colIdx.subarray(A.rowPtr[i], A.rowPtr[i + 1])).indexOf(j);
    A.values[at(0, 0)] = 1 / 3;
    const j = A.colIdx[A.rowPtr[5]];
    A.values[at(5, j)] = -1e-300;
    A.values[at(j, 5)] = -1e-300;
    const f = join(dir, 'a.mtx');
    writeMatrixMarket(A, f, 'test matrix\nsecond line');
    const B = readMatrixMarket(f);
    expect(B.n).toBe(A.n);
    expect(Array.from(B.rowPtr)).toEqual(Array.from(A.rowPtr));
    expect(Array.from(B.colIdx)).toEqual(Array.from(A.colIdx));
    const same = A.values.every((v, q) => Object.is(v, B.values[q]));
    expect(same).toBe(true);
  });

  it('reads the upper triangle and general symmetric files to the same matrix', () => {
    const lower = join(dir, 'l.mtx');
    const upper = join(dir, 'u.mtx');
    const general = join(dir, 'g.mtx');
    writeFileSync(lower, '%%MatrixMarket matrix coordinate real symmetric\n3 3 4\n1 1 4\n2 1 -1\n2 2 5\n3 3 6\n');
    writeFileSync(upper, '%%MatrixMarket matrix coordinate real symmetric\n% comment\n3 3 4\n1 1 4\n1 2 -1\n2 2 5\n3 3 6\n');
    writeFileSync(general, '%%MatrixMarket matrix coordinate real general\n3 3 5\n1 1 4\n1 2 -1\n2 1 -1\n2 2 5\n3 3 6\n');
    const a = readMatrixMarket(lower);
    for (const f of [upper, general]) {
      const b = readMatrixMarket(f);
      expect(Array.from(b.colIdx)).toEqual(Array.from(a.colIdx));
      expect(Array.from(b.values)).toEqual(Array.from(a.values));
    }
    expect(Array.from(a.values)).toEqual([4, -1, -1, 5, 6]);
  });

  it('bad files give an InputError naming the line', () => {
    const bad = join(dir, 'bad.mtx');
    writeFileSync(bad, '%%MatrixMarket matrix coordinate real symmetric\n3 3 2\n1 1 4\n4 1 2\n');
    expect(() => readMatrixMarket(bad)).toThrow(InputError);
    expect(() => readMatrixMarket(bad)).toThrow(/line 4/);
    writeFileSync(bad, '%%MatrixMarket matrix array real general\n3 3\n');
    expect(() => readMatrixMarket(bad)).toThrow(/line 1/);
    writeFileSync(bad, '%%MatrixMarket matrix coordinate real general\n2 2 2\n1 2 1\n2 1 3\n');
    expect(() => readMatrixMarket(bad)).toThrow(/not symmetric/);
  });
});
