// Seeded draws and the random strength field of a study.
import { describe, expect, it } from 'vitest';
import { drawFor, lnGamma, meanCov, sampler, weibullParameters } from '../src/study/samples.js';
import { fieldAt, gaussianOnGrid, gridFactor, strengthGrid } from '../src/cohesive/strength.js';
import { expandStudy } from '../src/study/expand.js';
import { studyFromData } from '../src/study/spec.js';
import { coarseCase } from './study.helpers.js';

describe('material samples', () => {
  it('reproduce exactly from the study seed and the variant index', () => {
    const d = { distribution: 'weibull' as const, mean: 3.1, cov: 0.15 };
    const a = Array.from({ length: 50 }, (_, i) => drawFor(d, 7, i, 'material.ft'));
    const b = Array.from({ length: 50 }, (_, i) => drawFor(d, 7, i, 'material.ft'));
    expect(b).toEqual(a);
    // another seed, another key: other numbers
    expect(drawFor(d, 8, 0, 'material.ft')).not.toBe(a[0]);
    expect(drawFor(d, 7, 0, 'material.GF')).not.toBe(a[0]);
    // the study's variants carry the same draws however often the study is expanded
    const spec = studyFromData({ study: 1, case: coarseCase(), seed: 11, samples: { count: 5, values: { 'material.GF': { distribution: 'lognormal', mean: 0.11, cov: 0.2 } } } }, 's', '.');
    expect(expandStudy(spec).map((v) => v.values['material.GF'])).toEqual(expandStudy(spec).map((v) => v.values['material.GF']));
  });

  it('ln Γ matches known values (Γ(5) = 24, Γ(1/2) = √π; from memory)', () => {
    expect(Math.exp(lnGamma(5))).toBeCloseTo(24, 10);
    expect(Math.exp(lnGamma(0.5))).toBeCloseTo(Math.sqrt(Math.PI), 10);
  });

  // Sampling error of 2000 draws (common practice): the mean within 4 standard errors
  // σ/√n, the coefficient of variation within 4·CoV/√(2n) (normal-theory error of a
  // standard deviation; generous for the skewed laws).
  for (const distribution of ['normal', 'lognormal', 'weibull'] as const) {
    it(`${distribution}: mean and CoV of 2000 draws within sampling error`, () => {
      const d = { distribution, mean: 3.1, cov: 0.15 }, n = 2000;
      const next = sampler(d, 2026);
      const x = Array.from({ length: n }, next);
      const s = meanCov(x);
      expect(Math.abs(s.mean - d.mean)).toBeLessThan(4 * d.mean * d.cov / Math.sqrt(n));
      expect(Math.abs(s.cov - d.cov)).toBeLessThan(4 * d.cov / Math.sqrt(2 * n) * 1.5);
      if (distribution !== 'normal') expect(Math.min(...x)).toBeGreaterThan(0);
    });
  }

  it('Weibull shape for a CoV of 0.15 is about 8 (tabled Γ-function relation; common practice)', () => {
    const { shape, scale } = weibullParameters(3.1, 0.15);
    expect(shape).toBeGreaterThan(7.5); expect(shape).toBeLessThan(8.3);
    expect(scale * Math.exp(lnGamma(1 + 1 / shape))).toBeCloseTo(3.1, 10);
  });
});

describe('random strength field', () => {
  it('has an empirical correlation near e⁻¹ at one correlation length (exponential covariance, by definition)', () => {
    // 30 × 30 grid, 4 nodes per correlation length: lag 4 is one length
    const nx = 30, ny = 30, ell = 8, h = ell / 4, lag = 4, R = 100;
    const L = gridFactor(nx, ny, h, ell);
    let sum = 0, sum0 = 0, pairs = 0, cells = 0;
    for (let r = 0; r < R; r++) {
      const y = gaussianOnGrid(L, nx * ny, 1000 + r);
      for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++) {
        const k = j * nx + i;
        sum0 += y[k]! * y[k]!; cells++;
        if (i + lag < nx) { sum += y[k]! * y[k + lag]!; pairs++; }
        if (j + lag < ny) { sum += y[k]! * y[k + lag * nx]!; pairs++; }
      }
    }
    const variance = sum0 / cells, rho = sum / pairs / variance;
    expect(variance).toBeGreaterThan(0.9); expect(variance).toBeLessThan(1.1);
    expect(Math.abs(rho - Math.exp(-1))).toBeLessThan(0.05);
  });

  it('gives a strength of the asked mean and CoV, the same for the same seed', () => {
    const p = { distribution: 'lognormal' as const, cov: 0.2, correlationLength: 10, seed: 5 };
    const box = { x0: 0, y0: 0, x1: 400, y1: 100 };
    const a = strengthGrid(p, 3, box), b = strengthGrid(p, 3, box);
    expect(Array.from(b.values)).toEqual(Array.from(a.values));
    const c = strengthGrid({ ...p, seed: 6 }, 3, box);
    expect(Array.from(c.values)).not.toEqual(Array.from(a.values));
    // one realization over 40 × 10 correlation lengths: mean within a few per cent
    const s = meanCov(a.values);
    expect(Math.abs(s.mean / 3 - 1)).toBeLessThan(0.05);
    expect(s.cov).toBeGreaterThan(0.15); expect(s.cov).toBeLessThan(0.25);
    // bilinear reading hits the nodes and stays between neighbours
    expect(fieldAt(a, a.x0 + 3 * a.h, a.y0 + 2 * a.h)).toBeCloseTo(a.values[2 * a.nx + 3]!, 12);
  });
});
