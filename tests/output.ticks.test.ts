import { describe, expect, it } from 'vitest';
import { formatTicks, formatValue, niceAxis, niceTicks } from '../src/output/ticks.js';

// Round steps of 1, 2, 2.5 or 5 × 10^k: common practice for chart axes.
const isRoundStep = (s: number): boolean => {
  const m = s / Math.pow(10, Math.floor(Math.log10(s) + 1e-9));
  return [1, 2, 2.5, 5, 10].some((r) => Math.abs(m - r) < 1e-6);
};

describe('niceTicks', () => {
  it('0 to 0.0037', () => {
    const t = niceTicks(0, 0.0037);
    expect(t).toEqual([0, 0.001, 0.002, 0.003]);
    expect(formatTicks(t)).toEqual(['0', '0.001', '0.002', '0.003']);
  });
  it('0 to 12345', () => {
    const t = niceTicks(0, 12345);
    expect(t).toEqual([0, 2500, 5000, 7500, 10000]);
    expect(formatTicks(t)).toEqual(['0', '2500', '5000', '7500', '10000']);
  });
  it('negative ranges, with a typographic minus', () => {
    expect(niceTicks(-7.3, -0.2)).toEqual([-6, -4, -2]);
    expect(formatTicks(niceTicks(-7.3, -0.2))).toEqual(['−6', '−4', '−2']);
    expect(niceTicks(-0.51, 0.49)).toEqual([-0.4, -0.2, 0, 0.2, 0.4]);
    expect(niceTicks(5, -3)).toEqual(niceTicks(-3, 5));
  });
  it('min == max gives a small span around the value', () => {
    const t = niceTicks(2, 2);
    expect(t.length).toBeGreaterThanOrEqual(2);
    expect(t[0]).toBeLessThanOrEqual(2);
    expect(t[t.length - 1]).toBeGreaterThanOrEqual(2);
    expect(niceTicks(0, 0)).toContain(0);
  });
  it('respects maxCount, stays inside the range and uses round steps on many ranges', () => {
    for (const [a, b] of [[0, 1], [0, 0.0037], [-1e-5, 3e-5], [0.1, 0.11], [-250, 17], [3, 1e6], [0, 7]]) {
      for (const max of [3, 5, 8]) {
        const t = niceTicks(a, b, max);
        expect(t.length).toBeLessThanOrEqual(max);
        expect(t.length).toBeGreaterThanOrEqual(1);
        expect(t[0]).toBeGreaterThanOrEqual(a - 1e-12);
        expect(t[t.length - 1]).toBeLessThanOrEqual(b + 1e-12);
        if (t.length > 1) expect(isRoundStep(t[1] - t[0])).toBe(true);
      }
    }
  });
  it('no floating noise in the values', () => {
    for (const v of niceTicks(0, 0.7, 8)) expect(String(v).length).toBeLessThanOrEqual(4);
  });
});

describe('niceAxis', () => {
  it('widens to labelled ends', () => {
    expect(niceAxis(0, 0.0037)).toMatchObject({ lo: 0, hi: 0.004 });
    expect(niceAxis(0, 12345)).toMatchObject({ lo: 0, hi: 12500 });
    const a = niceAxis(-0.51, 0.49);
    expect(a.ticks[0]).toBe(a.lo);
    expect(a.ticks[a.ticks.length - 1]).toBe(a.hi);
    expect(a.lo).toBeLessThanOrEqual(-0.51);
    expect(a.hi).toBeGreaterThanOrEqual(0.49);
  });
});

describe('labels', () => {
  it('share decimals and use powers of ten for extremes', () => {
    expect(formatTicks([0, 0.5, 1, 1.5])).toEqual(['0', '0.5', '1.0', '1.5']);
    expect(formatTicks([0, 0.25, 0.5])).toEqual(['0', '0.25', '0.50']);
    expect(formatTicks([0, 2e7, 4e7])).toEqual(['0', '2×10⁷', '4×10⁷']);
    expect(formatTicks([0, 1e-7, 2e-7])).toEqual(['0', '1×10⁻⁷', '2×10⁻⁷']);
    expect(formatValue(3498.7)).toBe('3500');
    expect(formatValue(-0.0123)).toBe('−0.0123');
  });
});
