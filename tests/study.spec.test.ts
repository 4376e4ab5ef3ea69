// Study files: expansion into variants, geometric scaling, one-sentence errors, and
// Bažant's size effect law fitted to synthetic points.
import { describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { InputError } from '../src/errors.js';
import { expandStudy, variantModel } from '../src/study/expand.js';
import { loadStudy, studyFromData } from '../src/study/spec.js';
import { fitSizeEffect, sizeEffectLaw } from '../src/study/sizeeffect.js';
import { prng } from '../src/mesh/prng.js';
import { coarseCase } from './study.helpers.js';

const ROOT = fileURLToPath(new URL('..', import.meta.url));
const errorOf = (f: () => unknown): string => {
  try { f(); } catch (e) { if (e instanceof InputError) return e.message; throw e; }
  return '(no error)';
};

describe('study variants', () => {
  it('are the product of the lists, the last varying fastest, each a valid case', () => {
    const s = studyFromData({ study: 1, case: coarseCase(), vary: { 'material.GF': [0.08, 0.11], 'mesh.seed': [1, 2, 3] } }, 'grid', '.');
    const v = expandStudy(s);
    expect(v.map((x) => [x.values['material.GF'], x.values['mesh.seed']])).toEqual([[0.08, 1], [0.08, 2], [0.08, 3], [0.11, 1], [0.11, 2], [0.11, 3]]);
    expect(v.map((x) => x.id)).toEqual(['v0001', 'v0002', 'v0003', 'v0004', 'v0005', 'v0006']);
    const m = variantModel(v[4]!, 'grid');
    expect(m.material.GF).toBe(0.11); expect(m.mesh.seed).toBe(2);
  });

  it('of a size series scale every length and keep the material', () => {
    const s = studyFromData({ study: 1, case: coarseCase(), sizes: { factors: [0.5, 2] } }, 'sizes', '.');
    const [a, b] = expandStudy(s).map((v) => variantModel(v, 'sizes'));
    expect(b!.geometry.outline[2]).toEqual([880, 200]);
    expect(a!.geometry.notches[0]).toEqual({ from: [110, 0], to: [110, 15], width: 1 });
    expect(b!.mesh.size / a!.mesh.size).toBeCloseTo(4, 12);
    expect(b!.crack!.growthStep / a!.crack!.growthStep).toBeCloseTo(4, 12);
    expect(b!.control.gauge).toEqual({ from: [438, 0], to: [442, 0] });
    expect(b!.probes[0]!.at).toEqual([440, 200]);
    expect(b!.material).toEqual(a!.material);
    expect(b!.thickness).toBe(a!.thickness);
    expect(expandStudy(s).map((v) => v.D)).toEqual([50, 200]);
  });

  it('carry a seeded strength field of their own', () => {
    const s = studyFromData({ study: 1, case: coarseCase(), samples: { count: 3 }, field: { ft: { cov: 0.1, correlationLength: 15 } } }, 'f', '.');
    const v = expandStudy(s);
    const seeds = v.map((x) => variantModel(x, 'f').material.strengthField!.seed);
    expect(new Set(seeds).size).toBe(3);
    expect(variantModel(v[0]!, 'f').material.strengthField).toMatchObject({ distribution: 'lognormal', cov: 0.1, correlationLength: 15, pointsPerLength: 2 });
  });

  it('come from the example study files in cases/studies', () => {
    for (const [f, n] of [['scatter-demo', 16], ['size-demo', 12], ['sweep-demo', 9]] as const) {
      const s = loadStudy(join(ROOT, 'cases', 'studies', `${f}.yaml`));
      const v = expandStudy(s);
      expect(v).toHaveLength(n);
      for (const x of v) variantModel(x, s.name);
    }
  });
});

describe('study file mistakes are one sentence naming the field, the expectation and the unit', () => {
  const base = () => ({ study: 1, case: coarseCase() });
  const cases: [string, Record<string, unknown>, RegExp][] = [
    ['unknown key', { vari: {} }, /has no key vari; known keys are study, title, case/],
    ['cov out of range', { samples: { count: 2, values: { 'material.ft': { distribution: 'weibull', mean: 3, cov: 5 } } } }, /samples\.values\.material\.ft\.cov must be a coefficient of variation from 0 to 2 \(no unit\) \(found 5\)/],
    ['correlation length', { field: { ft: { cov: 0.1, correlationLength: -3 } } }, /field\.ft\.correlationLength must be a length above 0 in mm \(found -3\)/],
    ['size factors', { sizes: { factors: [] } }, /sizes\.factors must be a list of scale factors above 0/],
    ['bad distribution', { samples: { count: 2, values: { 'material.GF': { distribution: 'gamma', mean: 0.1, cov: 0.1 } } } }, /distribution must be one of normal, lognormal, weibull/],
  ];
  it.each(cases)('%s', (_n, extra, re) => {
    expect(errorOf(() => studyFromData({ ...base(), ...extra }, 'bad', '.'))).toMatch(re);
  });
  it('a sample of a key that is not a number of the case', () => {
    const s = studyFromData({ ...base(), samples: { count: 2, values: { 'material.softening': { distribution: 'normal', mean: 1, cov: 0.1 } } } }, 'bad', '.');
    expect(errorOf(() => expandStudy(s))).toMatch(/samples\.values\.material\.softening must name a number of the case/);
  });
  it('a variant whose case is not valid names the variant and the case field', () => {
    const s = studyFromData({ ...base(), vary: { 'material.ft': [3, -1] } }, 'bad', '.');
    const v = expandStudy(s);
    expect(errorOf(() => variantModel(v[1]!, 'bad'))).toMatch(/^variant v0002 of the study: material\.ft must be a positive number in MPa/);
  });
});

describe("Bažant's size effect law", () => {
  it('fitted to synthetic points recovers B and D0 (Bažant 1984, σN = B·ft/√(1 + D/D0))', () => {
    const truth = { B: 1.8, D0: 120, ft: 3.5 };
    const D = [40, 80, 160, 320, 640];
    const exact = fitSizeEffect(D, D.map((d) => sizeEffectLaw(truth, d)), truth.ft)!;
    expect(exact.B).toBeCloseTo(truth.B, 10);
    expect(exact.D0).toBeCloseTo(truth.D0, 8);
    expect(exact.r2).toBeCloseTo(1, 12);
    // 2 % scatter on σN (three specimens per size): B and D0 within 5 % and 20 %
    const r = prng(9), Ds: number[] = [], s: number[] = [];
    for (const d of D) for (let k = 0; k < 3; k++) { Ds.push(d); s.push(sizeEffectLaw(truth, d) * (1 + 0.04 * (r() - 0.5))); }
    const noisy = fitSizeEffect(Ds, s, truth.ft)!;
    expect(Math.abs(noisy.B / truth.B - 1)).toBeLessThan(0.05);
    expect(Math.abs(noisy.D0 / truth.D0 - 1)).toBeLessThan(0.2);
  });
  it('gives no fit where the points rise with size', () => {
    expect(fitSizeEffect([50, 100, 200], [1, 1.1, 1.2], 3)).toBeNull();
  });
});

describe('size-effect picture', () => {
  it('draws the points, the fitted law and its two asymptotes on log axes', async () => {
    const { sizeEffectSvg } = await import('../src/study/pictures.js');
    const truth = { B: 1.8, D0: 120, ft: 3.5 }, D = [50, 100, 200, 400];
    const s = D.map((d) => sizeEffectLaw(truth, d));
    const svg = sizeEffectSvg(D, s, fitSizeEffect(D, s, truth.ft), 'Series');
    expect(svg).toContain('data-label="σN = B·ft/√(1 + D/D0): B 1.80, D0 120 mm"');
    expect(svg).toContain('data-label="strength limit B·ft"');
    expect(svg).toContain('data-label="LEFM limit ∝ D^−1/2"');
    expect(svg.match(/<circle/g)!.length).toBeGreaterThanOrEqual(4);
  });
});
