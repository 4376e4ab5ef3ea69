// Traction–separation laws of a mode-I cohesive crack: stress σ(w) on the softening
// branch from ft at w = 0 to zero at the critical opening w_c, each enclosing GF.
// Units: w in mm, σ in MPa, GF in N/mm (= MPa·mm).

import type { Softening } from '../case/model.js';
import { InputError } from '../errors.js';

export interface SofteningLaw {
  kind: Softening;
  /** Tensile strength, MPa. */
  ft: number;
  /** Fracture energy, N/mm: the area under σ(w). */
  GF: number;
  /** Critical opening, mm: σ = 0 from here on. */
  wc: number;
  /** Cohesive stress at opening w (ft for w ≤ 0, 0 for w ≥ wc). */
  stress(w: number): number;
  /** dσ/dw (right derivative at the kinks, 0 outside [0, wc)). */
  slope(w: number): number;
  /** ∫0^w σ dw in closed form (GF for w ≥ wc). */
  energy(w: number): number;
  /** Opening at which the softening branch carries sigma (0 for sigma ≥ ft, wc for sigma ≤ 0). */
  openingAt(sigma: number): number;
}

// Exponential law constants (Cornelissen, Hordijk, Reinhardt 1986).
const C1 = 3;
const C2 = 6.93;
const EC2 = Math.exp(-C2);
const C13 = C1 * C1 * C1;

/** ∫0^u x³ e^(−c x) dx in closed form. */
function cubicExpIntegral(u: number, c: number): number {
  const c2 = c * c, c3 = c2 * c, c4 = c3 * c;
  return 6 / c4 - Math.exp(-c * u) * (u * u * u / c + 3 * u * u / c2 + 6 * u / c3 + 6 / c4);
}

/** ∫0^u f(x) dx of the normalised exponential curve f = σ/ft, x = w/wc. */
function expCurveIntegral(u: number): number {
  return (1 - Math.exp(-C2 * u)) / C2 + C13 * cubicExpIntegral(u, C2) - 0.5 * u * u * (1 + C13) * EC2;
}

/**
 * ∫0^1 f(x) dx of the normalised exponential curve, ≈ 0.194702. The published w_c = 5.14 GF/ft
 * encloses 5.14·0.194702 = 1.00077 GF (0.077 % too much), so w_c is taken as GF/(ft·I) =
 * 5.136055 GF/ft, which encloses GF exactly.
 */
export const EXPONENTIAL_AREA = expCurveIntegral(1);

export function makeLaw(kind: Softening, ft: number, GF: number): SofteningLaw {
  if (!(ft > 0) || !Number.isFinite(ft)) throw new InputError(`material.ft must be a positive tensile strength in MPa (found ${ft})`);
  if (!(GF > 0) || !Number.isFinite(GF)) throw new InputError(`material.GF must be a positive fracture energy in N/mm (found ${GF})`);
  switch (kind) {
    case 'linear': return linearLaw(ft, GF);
    case 'bilinear': return bilinearLaw(ft, GF);
    case 'exponential': return exponentialLaw(ft, GF);
    default: throw new InputError(`material.softening must be linear, bilinear or exponential (found ${String(kind)})`);
  }
}

function linearLaw(ft: number, GF: number): SofteningLaw {
  const wc = 2 * GF / ft;
  const k = ft / wc;
  return {
    kind: 'linear', ft, GF, wc,
    stress: (w) => (w <= 0 ? ft : w >= wc ? 0 : ft - k * w),
    slope: (w) => (w < 0 || w >= wc ? 0 : -k),
    energy: (w) => (w <= 0 ? 0 : w >= wc ? GF : w * (ft - 0.5 * k * w)),
    openingAt: (s) => (s >= ft ? 0 : s <= 0 ? wc : (ft - s) / k),
  };
}

// Petersson (1981): kink at (0.8 GF/ft, ft/3), w_c = 3.6 GF/ft.
function bilinearLaw(ft: number, GF: number): SofteningLaw {
  const w1 = 0.8 * GF / ft;
  const wc = 3.6 * GF / ft;
  const s1 = ft / 3;
  const k1 = (ft - s1) / w1;
  const k2 = s1 / (wc - w1);
  const e1 = 0.5 * (ft + s1) * w1;
  return {
    kind: 'bilinear', ft, GF, wc,
    stress: (w) => (w <= 0 ? ft : w < w1 ? ft - k1 * w : w < wc ? s1 - k2 * (w - w1) : 0),
    slope: (w) => (w < 0 || w >= wc ? 0 : w < w1 ? -k1 : -k2),
    energy: (w) => {
      if (w <= 0) return 0;
      if (w <= w1) return w * (ft - 0.5 * k1 * w);
      if (w >= wc) return GF;
      const d = w - w1;
      return e1 + d * (s1 - 0.5 * k2 * d);
    },
    openingAt: (s) => (s >= ft ? 0 : s <= 0 ? wc : s >= s1 ? (ft - s) / k1 : w1 + (s1 - s) / k2),
  };
}

// Cornelissen, Hordijk, Reinhardt (1986): σ/ft = (1 + (c1 x)³) e^(−c2 x) − x (1 + c1³) e^(−c2), x = w/wc.
function exponentialLaw(ft: number, GF: number): SofteningLaw {
  const wc = GF / (ft * EXPONENTIAL_AREA);
  const f = (x: number): number => (1 + C13 * x * x * x) * Math.exp(-C2 * x) - x * (1 + C13) * EC2;
  const df = (x: number): number =>
    (3 * C13 * x * x - C2 * (1 + C13 * x * x * x)) * Math.exp(-C2 * x) - (1 + C13) * EC2;
  const stress = (w: number): number => (w <= 0 ? ft : w >= wc ? 0 : ft * f(w / wc));
  return {
    kind: 'exponential', ft, GF, wc,
    stress,
    slope: (w) => (w < 0 || w >= wc ? 0 : (ft / wc) * df(w / wc)),
    energy: (w) => (w <= 0 ? 0 : w >= wc ? GF : ft * wc * expCurveIntegral(w / wc)),
    openingAt: (s) => {
      if (s >= ft) return 0;
      if (s <= 0) return wc;
      // f decreases monotonically on [0, 1]: Newton steps kept inside a shrinking bracket.
      const target = s / ft;
      let lo = 0, hi = 1, x = 1 - target;
      for (let it = 0; it < 100; it++) {
        const r = f(x) - target;
        if (r > 0) lo = x; else hi = x;
        if (Math.abs(r) < 1e-15 || hi - lo < 1e-15) break;
        let xn = x - r / df(x);
        if (!(xn > lo && xn < hi)) xn = 0.5 * (lo + hi);
        x = xn;
      }
      return x * wc;
    },
  };
}
