// The exact scalings of the cohesive model, and the small searches a fit runs on them.
//
// The bulk is linear elastic and the softening law reads σ = ft·f(w·ft/GF), so multiplying
// ft by b and GF/ft by λ while E·GF/ft² (the characteristic length l_ch, Hillerborg et al.
// 1976) stays put multiplies every load by b and every opening and displacement by λ: the
// same curve, scaled (the intact penalty ∝ E, the insertion threshold ∝ ft and the tolerances
// ∝ ft follow). A fit of E, ft and GF is then a search over l_ch alone, each simulated
// shape taking its best scaling without a simulation.

import type { Curve } from './compare.js';

export type Material3 = { E: number; ft: number; GF: number };

/** How log l_ch = log E + log GF − 2 log ft moves with the log of each parameter. */
export const SHAPE_WEIGHT = { E: 1, ft: -2, GF: 1 } as const;

/** log l_ch (mm) of a material. */
export function shapeOf(m: Material3): number {
  return Math.log((m.E * m.GF) / (m.ft * m.ft));
}

/** The material whose curve is the given one with loads × e^lb and openings × e^ll (same l_ch). */
export function scaledMaterial(m: Material3, lb: number, ll: number): Material3 {
  return { E: m.E * Math.exp(lb - ll), ft: m.ft * Math.exp(lb), GF: m.GF * Math.exp(lb + ll) };
}

/** A curve with loads × e^lb and openings × e^ll. */
export function scaledCurve(c: Curve, lb: number, ll: number): Curve {
  const b = Math.exp(lb), l = Math.exp(ll);
  return { x: Float64Array.from(c.x, (v) => v * l), y: Float64Array.from(c.y, (v) => v * b) };
}

/**
 * The scalings a fit may use, as directions in (log load factor, log opening factor): those
 * that leave every parameter not fitted as it is. E fixed ties the two factors, ft fixed
 * leaves the openings only, GF fixed makes them opposite.
 */
export function scalingDirections(fitted: readonly ('E' | 'ft' | 'GF')[]): [number, number][] {
  const has = (p: 'E' | 'ft' | 'GF') => fitted.includes(p);
  if (has('E') && has('ft') && has('GF')) return [[1, 0], [0, 1]];
  if (has('ft') && has('GF')) return [[1, 1]];
  if (has('E') && has('GF')) return [[0, 1]];
  if (has('E') && has('ft')) return [[1, -1]];
  return [];
}

/**
 * Nelder–Mead (Nelder & Mead 1965) on a cheap function of one or two variables: standard
 * coefficients, deterministic, closed when the simplex is smaller than tol.
 */
export function nelderMead(f: (x: number[]) => number, x0: number[], step: number, tol: number, maxEvals = 400): { x: number[]; f: number } {
  const n = x0.length;
  if (n === 0) return { x: [], f: f([]) };
  const s: { x: number[]; f: number }[] = [{ x: x0, f: f(x0) }];
  for (let j = 0; j < n; j++) { const x = x0.map((v, i) => (i === j ? v + step : v)); s.push({ x, f: f(x) }); }
  let evals = n + 1;
  const at = (c: number[], w: number[], t: number) => c.map((v, i) => v + t * (v - w[i]!));
  // an infinite value (outside the bounds) sorts last and is never a centroid's anchor
  const order = () => s.sort((a, b) => (a.f === b.f ? 0 : !(a.f <= b.f) ? 1 : !(b.f <= a.f) ? -1 : a.f - b.f));
  for (;;) {
    order();
    const size = Math.max(...s.slice(1).map((p) => Math.max(...p.x.map((v, i) => Math.abs(v - s[0]!.x[i]!)))));
    if (size < tol || evals >= maxEvals) break;
    const cen = x0.map((_, i) => s.slice(0, n).reduce((a, p) => a + p.x[i]!, 0) / n);
    const w = s[n]!.x, xr = at(cen, w, 1), fr = f(xr); evals++;
    if (fr < s[0]!.f) {
      const xe = at(cen, w, 2), fe = f(xe); evals++;
      s[n] = fe < fr ? { x: xe, f: fe } : { x: xr, f: fr };
    } else if (fr < s[n - 1]!.f) s[n] = { x: xr, f: fr };
    else {
      const out = fr < s[n]!.f, xc = at(cen, w, out ? 0.5 : -0.5), fc = f(xc); evals++;
      if (fc < (out ? fr : s[n]!.f)) s[n] = { x: xc, f: fc };
      else for (let k = 1; k <= n; k++) { const x = s[k]!.x.map((v, i) => s[0]!.x[i]! + 0.5 * (v - s[0]!.x[i]!)); s[k] = { x, f: f(x) }; evals++; }
    }
  }
  order();
  return s[0]!;
}

/** The abscissa of the vertex of the parabola through three points (null when they lie on a line or it opens downward). */
export function parabolaVertex(a: [number, number], b: [number, number], c: [number, number]): number | null {
  const [x1, y1] = a, [x2, y2] = b, [x3, y3] = c;
  const d1 = (y2 - y1) / (x2 - x1), d2 = (y3 - y2) / (x3 - x2), curv = (d2 - d1) / (x3 - x1);
  if (!(curv > 0)) return null;
  return 0.5 * (x1 + x2) - d1 / (2 * curv);
}

/** The value at x of the parabola through three points. */
export function parabolaAt(a: [number, number], b: [number, number], c: [number, number], x: number): number {
  const [x1, y1] = a, [x2, y2] = b, [x3, y3] = c;
  const d1 = (y2 - y1) / (x2 - x1), d2 = (y3 - y2) / (x3 - x2), curv = (d2 - d1) / (x3 - x1);
  return y1 + d1 * (x - x1) + curv * (x - x1) * (x - x2);
}
