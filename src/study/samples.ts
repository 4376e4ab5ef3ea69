// Seeded draws of material values: normal, lognormal and two-parameter Weibull, each
// given by its mean and coefficient of variation. A draw depends only on the study
// seed, the variant index and the key, so a variant can be rebuilt on its own.
import { prng, normalStream } from '../mesh/prng.js';
import type { Distribution } from './spec.js';

/** A 32-bit seed mixed from whole numbers (an integer hash, so near seeds give unrelated streams). */
export function mixSeed(...parts: number[]): number {
  let h = 0x811c9dc5;
  for (const p of parts) {
    let x = Math.floor(p) >>> 0;
    x = Math.imul(x ^ (x >>> 16), 0x7feb352d);
    x = Math.imul(x ^ (x >>> 15), 0x846ca68b);
    h = Math.imul(h ^ (x ^ (x >>> 16)), 0x01000193) >>> 0;
  }
  return h >>> 0;
}

/** A stable whole number for a text (FNV-1a), so a key names its own stream. */
export function textSeed(s: string): number {
  let h = 0x811c9dc5;
  for (let i = 0; i < s.length; i++) h = Math.imul(h ^ s.charCodeAt(i), 0x01000193) >>> 0;
  return h;
}

/** ln Γ(x) for x > 0 by the Lanczos approximation (g = 7, nine coefficients). */
export function lnGamma(x: number): number {
  if (x < 0.5) return Math.log(Math.PI / Math.sin(Math.PI * x)) - lnGamma(1 - x);
  const c = [0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
    12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7];
  x -= 1;
  let a = c[0]!;
  const t = x + 7.5;
  for (let i = 1; i < 9; i++) a += c[i]! / (x + i);
  return 0.5 * Math.log(2 * Math.PI) + (x + 0.5) * Math.log(t) - t + Math.log(a);
}

/** Weibull shape k and scale λ with the given mean and coefficient of variation. */
export function weibullParameters(mean: number, cov: number): { shape: number; scale: number } {
  // CoV² = Γ(1+2/k)/Γ(1+1/k)² − 1 falls as k grows: bisection on ln k
  const covOf = (k: number) => Math.sqrt(Math.exp(lnGamma(1 + 2 / k) - 2 * lnGamma(1 + 1 / k)) - 1);
  let lo = Math.log(0.3), hi = Math.log(500);
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi);
    if (covOf(Math.exp(mid)) > cov) lo = mid; else hi = mid;
  }
  const shape = Math.exp(0.5 * (lo + hi));
  return { shape, scale: mean / Math.exp(lnGamma(1 + 1 / shape)) };
}

/** A sampler of one distribution: `next()` gives the next draw. */
export function sampler(d: Distribution, seed: number): () => number {
  const u = prng(seed);
  const z = normalStream(u);
  switch (d.distribution) {
    case 'normal': return () => d.mean * (1 + d.cov * z());
    case 'lognormal': {
      const s2 = Math.log(1 + d.cov * d.cov), mu = Math.log(d.mean) - s2 / 2, s = Math.sqrt(s2);
      return () => Math.exp(mu + s * z());
    }
    case 'weibull': {
      const { shape, scale } = weibullParameters(d.mean, d.cov);
      return () => scale * Math.pow(-Math.log(1 - u()), 1 / shape);
    }
  }
}

/** The draw of `key` for variant `index` of a study with seed `studySeed`. */
export function drawFor(d: Distribution, studySeed: number, index: number, key: string): number {
  return sampler(d, mixSeed(studySeed, index, textSeed(key)))();
}

/** Mean and coefficient of variation of a sample (n − 1 in the variance). */
export function meanCov(x: ArrayLike<number>): { mean: number; sd: number; cov: number } {
  let s = 0;
  for (let i = 0; i < x.length; i++) s += x[i]!;
  const mean = s / x.length;
  let q = 0;
  for (let i = 0; i < x.length; i++) q += (x[i]! - mean) ** 2;
  const sd = Math.sqrt(q / Math.max(1, x.length - 1));
  return { mean, sd, cov: sd / mean };
}
