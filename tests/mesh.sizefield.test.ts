import { describe, expect, it } from 'vitest';
import { GRADING, makeSizeField } from '../src/mesh/sizefield.js';
import { prng } from '../src/mesh/prng.js';

const s = { size: 10, tipSize: 1, refineRadius: 5, coarsen: false, seed: 1, lloyd: 0 };

describe('size field', () => {
  it('is tipSize within the radius, grows linearly with the grading, and caps at size', () => {
    const h = makeSizeField(s, [[0, 0]]);
    expect(h(3, 4)).toBe(1);
    expect(h(10, 0)).toBeCloseTo(1 + GRADING * 5, 12);
    expect(h(1000, 0)).toBe(10);
    // neighbouring cells differ by about 1.3× (the chosen grading, common practice)
    const a = h(20, 0), b = h(20 + a, 0);
    expect(b / a).toBeGreaterThan(1.05);
    expect(b / a).toBeLessThan(1.35);
  });

  it('is finer near extra points and segments, never below tipSize', () => {
    const h = makeSizeField(s, [], [[50, 50]], [[[0, 0], [100, 0]]]);
    expect(h(50, 50)).toBe(2);
    expect(h(30, 0)).toBe(2);
    expect(h(30, 100)).toBe(10);
    const r = prng(3);
    for (let k = 0; k < 1000; k++) { const v = h(200 * r() - 50, 200 * r() - 50); expect(v).toBeGreaterThanOrEqual(1); expect(v).toBeLessThanOrEqual(10); }
  });
});

describe('prng', () => {
  it('repeats for a seed, differs between seeds, stays in [0, 1)', () => {
    const a = prng(5), b = prng(5), c = prng(6);
    const xa = Array.from({ length: 100 }, a), xb = Array.from({ length: 100 }, b), xc = Array.from({ length: 100 }, c);
    expect(xa).toEqual(xb);
    expect(xa).not.toEqual(xc);
    expect(xa.every(v => v >= 0 && v < 1)).toBe(true);
    // mean of uniform numbers ≈ 1/2 (common practice)
    const r = prng(9);
    let m = 0;
    for (let k = 0; k < 20000; k++) m += r();
    expect(Math.abs(m / 20000 - 0.5)).toBeLessThan(0.01);
  });
});
