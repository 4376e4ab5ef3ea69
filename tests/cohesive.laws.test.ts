import { describe, expect, it } from 'vitest';
import { EXPONENTIAL_AREA, makeLaw, type SofteningLaw } from '../src/cohesive/laws.js';
import type { Softening } from '../src/case/model.js';
import { InputError } from '../src/errors.js';

const ft = 3, GF = 0.1; // normal-strength concrete, MPa and N/mm (common practice)
const kinds: Softening[] = ['linear', 'bilinear', 'exponential'];

// 5-point Gauss–Legendre, composite over m equal parts of [a, b].
const GX = [0, -0.5384693101056831, 0.5384693101056831, -0.906179845938664, 0.906179845938664];
const GW = [0.5688888888888889, 0.4786286704993665, 0.4786286704993665, 0.2369268850561891, 0.2369268850561891];
function gauss(f: (x: number) => number, a: number, b: number, m = 64): number {
  let sum = 0;
  const h = (b - a) / m;
  for (let i = 0; i < m; i++) {
    const c = a + (i + 0.5) * h;
    for (let k = 0; k < 5; k++) sum += GW[k]! * f(c + 0.5 * h * GX[k]!);
  }
  return 0.5 * h * sum;
}
// Integrate piecewise so that no Gauss panel straddles a kink.
function area(law: SofteningLaw, w: number): number {
  const pieces = law.kind === 'bilinear' ? [0, 0.8 * GF / ft, w] : [0, w];
  let sum = 0;
  for (let i = 0; i + 1 < pieces.length; i++) {
    const a = pieces[i]!, b = Math.min(pieces[i + 1]!, w);
    if (b > a) sum += gauss(law.stress, a, b);
  }
  return sum;
}

describe('softening laws', () => {
  for (const kind of kinds) {
    const law = makeLaw(kind, ft, GF);
    it(`${kind}: encloses GF (GF is the area under the law, Hillerborg, Modéer, Petersson 1976)`, () => {
      expect(Math.abs(area(law, law.wc) - GF) / GF).toBeLessThan(1e-6);
      expect(Math.abs(law.energy(law.wc) - GF) / GF).toBeLessThan(1e-12);
    });
    it(`${kind}: energy() is the integral of stress() at partial openings (common practice)`, () => {
      for (const f of [0.05, 0.2, 0.5, 0.9]) {
        const w = f * law.wc;
        expect(law.energy(w)).toBeCloseTo(area(law, w), 10);
      }
    });
    it(`${kind}: starts at ft, ends at zero, stays zero (common practice)`, () => {
      expect(law.stress(0)).toBeCloseTo(ft, 12);
      expect(law.stress(law.wc)).toBe(0);
      expect(law.stress(2 * law.wc)).toBe(0);
      expect(law.slope(2 * law.wc)).toBe(0);
      expect(Math.abs(law.stress(law.wc * (1 - 1e-9)))).toBeLessThan(1e-6 * ft);
    });
    it(`${kind}: slope() matches central differences (common practice)`, () => {
      const h = 1e-7 * law.wc;
      for (const f of [0.01, 0.1, 0.3, 0.6, 0.95]) {
        const w = f * law.wc;
        const fd = (law.stress(w + h) - law.stress(w - h)) / (2 * h);
        expect(law.slope(w)).toBeCloseTo(fd, 4);
      }
    });
    it(`${kind}: openingAt inverts the softening branch (common practice)`, () => {
      for (const f of [0.99, 0.7, 1 / 3, 0.2, 0.01]) {
        const w = law.openingAt(f * ft);
        expect(law.stress(w)).toBeCloseTo(f * ft, 10);
      }
      expect(law.openingAt(ft)).toBe(0);
      expect(law.openingAt(0)).toBe(law.wc);
    });
  }

  it('linear: w_c = 2 GF/ft (Hillerborg, Modéer, Petersson 1976, linear law)', () => {
    expect(makeLaw('linear', ft, GF).wc).toBeCloseTo(2 * GF / ft, 14);
  });

  it('bilinear: kink at (0.8 GF/ft, ft/3), w_c = 3.6 GF/ft (Petersson 1981)', () => {
    const law = makeLaw('bilinear', ft, GF);
    const w1 = 0.8 * GF / ft;
    expect(law.wc).toBeCloseTo(3.6 * GF / ft, 14);
    expect(law.stress(w1)).toBeCloseTo(ft / 3, 12);
    expect(law.stress(w1 * (1 - 1e-12))).toBeCloseTo(ft / 3, 8); // continuous at the kink
    expect(law.slope(0.5 * w1)).toBeCloseTo(-(2 * ft / 3) / w1, 8);
    expect(law.slope(w1 + 0.5 * (law.wc - w1))).toBeCloseTo(-(ft / 3) / (law.wc - w1), 8);
  });

  it('exponential: formula values (Cornelissen, Hordijk, Reinhardt 1986)', () => {
    const law = makeLaw('exponential', ft, GF);
    const c1 = 3, c2 = 6.93;
    for (const x of [0.02, 0.1, 0.25, 0.5, 0.8]) {
      const ref = (1 + (c1 * x) ** 3) * Math.exp(-c2 * x) - x * (1 + c1 ** 3) * Math.exp(-c2);
      expect(law.stress(x * law.wc) / ft).toBeCloseTo(ref, 12);
    }
    // Cornelissen et al. 1986 evaluated by hand at x = 0.5: 4.375·e^−3.465 − 14·e^−6.93 = 0.1231.
    expect(law.stress(0.5 * law.wc) / ft).toBeCloseTo(0.1231, 3);
  });

  it('exponential: continuous, decreasing, and its w_c is within 0.1 % of 5.14 GF/ft (Cornelissen et al. 1986)', () => {
    const law = makeLaw('exponential', ft, GF);
    let prev = Infinity;
    for (let i = 0; i <= 2000; i++) {
      const s = law.stress((i / 2000) * law.wc);
      expect(s).toBeLessThanOrEqual(prev);
      if (i > 0) expect(prev - s).toBeLessThan(0.01 * ft); // no jumps at this sampling
      prev = s;
    }
    const ratio = law.wc * ft / GF;
    expect(Math.abs(ratio - 5.14) / 5.14).toBeLessThan(1e-3);
    expect(ratio).toBeCloseTo(1 / EXPONENTIAL_AREA, 12);
    expect(5.14 * EXPONENTIAL_AREA).toBeGreaterThan(1 + 1e-6); // 5.14 itself would not enclose GF to 1e-6
  });

  it('rejects a non-positive strength or fracture energy', () => {
    expect(() => makeLaw('linear', 0, GF)).toThrow(InputError);
    expect(() => makeLaw('bilinear', ft, -1)).toThrow(/material\.GF/);
  });
});
