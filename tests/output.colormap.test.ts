import { describe, expect, it } from 'vitest';
import { colorAt, damageMap, diverging, hexToOklab, luminance, sequential } from '../src/output/colormap.js';

const L = (hex: string): number => hexToOklab(hex)[0];

describe('OKLab conversion', () => {
  it('matches the published value for sRGB red and the white point', () => {
    // OKLab of #ff0000 ≈ (0.6280, 0.2249, 0.1258): Ottosson's OKLab definition (2020), from memory
    const [l, a, b] = hexToOklab('#ff0000');
    expect(l).toBeCloseTo(0.628, 3);
    expect(a).toBeCloseTo(0.2249, 3);
    expect(b).toBeCloseTo(0.1258, 3);
    expect(L('#ffffff')).toBeCloseTo(1, 6);
    expect(L('#000000')).toBeCloseTo(0, 6);
  });
});

describe('sequential map', () => {
  it('has strictly rising lightness and luminance (reads in greyscale)', () => {
    for (let i = 1; i < 256; i++) {
      expect(L(sequential.lut[i])).toBeGreaterThan(L(sequential.lut[i - 1]));
      expect(luminance(sequential.lut[i])).toBeGreaterThanOrEqual(luminance(sequential.lut[i - 1]));
    }
    expect(L(sequential.lut[255]) - L(sequential.lut[0])).toBeGreaterThan(0.7);
  });
  it('is close to uniform in lightness', () => {
    // equal steps of t give nearly equal steps of L: the definition of a perceptually ordered map (common practice)
    const d: number[] = [];
    for (let i = 16; i < 256; i += 16) d.push(L(sequential.lut[i]) - L(sequential.lut[i - 16]));
    expect(Math.max(...d) / Math.min(...d)).toBeLessThan(1.25);
  });
  it('damage map darkens monotonically', () => {
    for (let i = 1; i < 256; i++) expect(L(damageMap.lut[i])).toBeLessThan(L(damageMap.lut[i - 1]));
  });
});

describe('diverging map', () => {
  it('is lightest at the centre and darkens monotonically towards both ends', () => {
    for (let i = 1; i <= 127; i++) expect(L(diverging.lut[i])).toBeGreaterThan(L(diverging.lut[i - 1]));
    for (let i = 129; i < 256; i++) expect(L(diverging.lut[i])).toBeLessThan(L(diverging.lut[i - 1]));
    expect(L(colorAt(diverging, 0.5))).toBeGreaterThan(0.95);
    // the two ends look equally dark, so neither sign dominates
    expect(Math.abs(L(diverging.lut[0]) - L(diverging.lut[255]))).toBeLessThan(0.05);
  });
  it('has cool negatives and warm positives', () => {
    const [, , bNeg] = hexToOklab(colorAt(diverging, 0));
    const [aPos] = hexToOklab(colorAt(diverging, 1));
    expect(bNeg).toBeLessThan(0);
    expect(aPos).toBeGreaterThan(0);
  });
});

describe('colorAt', () => {
  it('returns #rrggbb, clamps and greys out NaN', () => {
    expect(colorAt(sequential, 0.3)).toMatch(/^#[0-9a-f]{6}$/);
    expect(colorAt(sequential, -2)).toBe(sequential.lut[0]);
    expect(colorAt(sequential, 7)).toBe(sequential.lut[255]);
    expect(colorAt(sequential, NaN)).toMatch(/^#[0-9a-f]{6}$/);
  });
});
