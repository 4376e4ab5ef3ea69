import { describe, expect, it } from 'vitest';
import { makeLaw } from '../src/cohesive/laws.js';
import { barCurve, snapBackLength } from '../src/cohesive/bar.js';

const E = 30000, ft = 3, GF = 0.1; // normal-strength concrete (common practice)
const lch = E * GF / (ft * ft); // Hillerborg, Modéer, Petersson 1976

describe('bar with one cohesive crack', () => {
  it('δ = σL/E + w(σ) from the peak to full separation (Hillerborg fictitious crack model)', () => {
    const law = makeLaw('bilinear', ft, GF);
    const L = 100;
    const c = barCurve(L, E, law, 101);
    expect(c.w.length).toBe(101);
    expect(c.w[0]).toBe(0);
    expect(c.w[100]).toBe(law.wc);
    expect(c.sigma[0]).toBeCloseTo(ft, 12);
    expect(c.delta[0]).toBeCloseTo(ft * L / E, 14);
    expect(c.delta[100]).toBeCloseTo(law.wc, 14);
    for (let i = 0; i < 101; i++) expect(c.delta[i]).toBeCloseTo(c.sigma[i]! * L / E + c.w[i]!, 14);
  });

  it('linear law: snap-back exactly when L > 2 l_ch, i.e. 1 + L/E·σ\'(0) < 0 (Hillerborg; common practice)', () => {
    const law = makeLaw('linear', ft, GF);
    expect(snapBackLength(E, law)).toBeCloseTo(2 * lch, 9);
    const long = barCurve(2.2 * lch, E, law, 200);
    const short = barCurve(1.8 * lch, E, law, 200);
    expect(long.delta[1]).toBeLessThan(long.delta[0]!);
    for (let i = 1; i < 200; i++) expect(short.delta[i]).toBeGreaterThan(short.delta[i - 1]!);
  });

  it('bilinear law: threshold L = 1.2 l_ch from the first slope (Petersson 1981 law; common practice)', () => {
    const law = makeLaw('bilinear', ft, GF);
    expect(snapBackLength(E, law)).toBeCloseTo(1.2 * lch, 9);
    expect(barCurve(1.3 * lch, E, law, 400).delta[1]).toBeLessThan(ft * 1.3 * lch / E);
    expect(barCurve(1.1 * lch, E, law, 400).delta[1]).toBeGreaterThan(ft * 1.1 * lch / E);
  });

  it('exponential law: the steep start snaps back in shorter bars than the bilinear law (Cornelissen et al. 1986)', () => {
    const law = makeLaw('exponential', ft, GF);
    const Lc = snapBackLength(E, law);
    // σ'(0) = −(ft/w_c)(c2 + (1 + c1³)e^−c2) from the published formula, w_c ≈ 5.136 GF/ft: L ≈ 0.738 l_ch.
    expect(Lc / lch).toBeCloseTo(5.136 / (6.93 + 28 * Math.exp(-6.93)), 3);
    expect(Lc).toBeLessThan(snapBackLength(E, makeLaw('bilinear', ft, GF)));
    const c = barCurve(1.1 * Lc, E, law, 2000);
    expect(c.delta[1]).toBeLessThan(c.delta[0]!);
  });
});
