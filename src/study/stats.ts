// Statistics of a study: quantiles, the band of curves (mean and 5–95 % on a common
// opening axis) and the distribution of the peak.
import type { VariantCurve } from './collect.js';

/** Quantile q of sorted values, linear between order statistics (Hyndman & Fan type 7, common practice). */
export function quantileSorted(s: ArrayLike<number>, q: number): number {
  if (s.length === 0) return NaN;
  const h = (s.length - 1) * q, i = Math.floor(h), f = h - i;
  return i + 1 < s.length ? s[i]! + f * (s[i + 1]! - s[i]!) : s[i]!;
}

export function quantile(x: number[], q: number): number {
  return quantileSorted(Float64Array.from(x).sort(), q);
}

/** Load of a curve at opening x, at its first passage (a snap-back's return is skipped); null past its end. */
export function loadAt(xs: ArrayLike<number>, ys: ArrayLike<number>, x: number): number | null {
  if (xs.length === 0 || x < xs[0]!) return null;
  for (let i = 1; i < xs.length; i++) {
    const a = xs[i - 1]!, b = xs[i]!;
    if (b >= x && a <= x) return b > a ? ys[i - 1]! + ((x - a) / (b - a)) * (ys[i]! - ys[i - 1]!) : ys[i]!;
  }
  return x === xs[0] ? ys[0]! : null;
}

export interface Band { x: number[]; mean: number[]; lo: number[]; hi: number[]; count: number[]; axis: 'cmod' | 'displacement' }

/**
 * Mean and the 5 % and 95 % quantiles of the load over the curves at common openings; at
 * each opening only the curves that reach it count, and the band ends where fewer than
 * half of them (at least two) do.
 */
export function curveBand(curves: VariantCurve[], points = 120, qLo = 0.05, qHi = 0.95): Band | null {
  const axis = curves.length > 0 && curves.every((c) => c.cmod !== null) ? 'cmod' : 'displacement';
  const xs = curves.map((c) => (axis === 'cmod' ? c.cmod! : c.displacement));
  const ends = xs.map((x) => x.reduce((m, v) => Math.max(m, v), 0)).sort((a, b) => b - a);
  const need = Math.max(2, Math.ceil(curves.length / 2));
  if (curves.length < 2) return null;
  const xMax = ends[need - 1]!;
  if (!(xMax > 0)) return null;
  const band: Band = { x: [], mean: [], lo: [], hi: [], count: [], axis };
  for (let k = 0; k <= points; k++) {
    const x = (xMax * k) / points;
    const ys: number[] = [];
    for (let j = 0; j < curves.length; j++) { const y = loadAt(xs[j]!, curves[j]!.load, x); if (y !== null) ys.push(y); }
    if (ys.length < need) continue;
    ys.sort((a, b) => a - b);
    band.x.push(x); band.count.push(ys.length);
    band.mean.push(ys.reduce((s, v) => s + v, 0) / ys.length);
    band.lo.push(quantileSorted(ys, qLo)); band.hi.push(quantileSorted(ys, qHi));
  }
  return band.x.length > 1 ? band : null;
}

/** Sample summary of a list (n − 1 in the variance). */
export function describe(x: number[]): { n: number; mean: number; sd: number; cov: number; min: number; max: number; p05: number; p50: number; p95: number } {
  const n = x.length;
  const mean = x.reduce((s, v) => s + v, 0) / n;
  const sd = Math.sqrt(x.reduce((s, v) => s + (v - mean) ** 2, 0) / Math.max(1, n - 1));
  const s = Float64Array.from(x).sort();
  return { n, mean, sd, cov: sd / mean, min: s[0]!, max: s[n - 1]!, p05: quantileSorted(s, 0.05), p50: quantileSorted(s, 0.5), p95: quantileSorted(s, 0.95) };
}
