// A bar of length L in tension with one cohesive crack across its section (Hillerborg's
// fictitious crack model): the bulk stays elastic, so δ = σL/E + w(σ).

import type { SofteningLaw } from './laws.js';

/** The end displacement δ (mm) and stress σ (MPa) at n openings w evenly spaced over [0, wc]. */
export function barCurve(L: number, E: number, law: SofteningLaw, n: number): { w: Float64Array; sigma: Float64Array; delta: Float64Array } {
  if (!(n >= 2) || !Number.isInteger(n)) throw new RangeError(`barCurve needs at least 2 samples (found ${n})`);
  const w = new Float64Array(n), sigma = new Float64Array(n), delta = new Float64Array(n);
  const f = L / E;
  for (let i = 0; i < n; i++) {
    const wi = i === n - 1 ? law.wc : (law.wc * i) / (n - 1);
    const si = law.stress(wi);
    w[i] = wi;
    sigma[i] = si;
    delta[i] = si * f + wi;
  }
  return { w, sigma, delta };
}

/** Bar length (mm) beyond which the curve snaps back at the peak: dδ/dw = 1 + L/E·σ'(0⁺) < 0. */
export function snapBackLength(E: number, law: SofteningLaw): number {
  return E / -law.slope(0);
}
