// A random strength field softens the cohesive faces where it is read: each face pair's law
// takes the ft of the field at its place and the case's GF (so w_c = k·GF/ft as the law
// defines it). Checked on Hillerborg's bar with one cohesive crack across its section
// (fictitious crack model, Hillerborg, Modéer, Petersson 1976): δ = σL/E + w(σ) with the
// local law, and once the section has separated the energy dissipated is GF × its area
// (definition of GF, REFERENCES.md).
import { describe, expect, it } from 'vitest';
import { Analysis } from '../src/fracture/analysis.js';
import { makeLaw } from '../src/cohesive/laws.js';
import { penaltyFor } from '../src/cohesive/interface.js';
import { strengthOf } from '../src/cohesive/strength.js';
import type { CaseModel, StrengthFieldSettings } from '../src/case/model.js';
import { gridMesh } from './support/grid.js';
import { BAR, barCase } from './support/bar.js';

const { L, H, T, E, FT } = BAR;
const GF = 0.1, A = H * T;

/** The bar with 1 mm cells (order 1) or a 10 × 2 grid (order 2, gauge over the whole bar). */
function fieldBar(law: 'linear' | 'bilinear', field: StrengthFieldSettings | null, target: number, order: 1 | 2 = 1): CaseModel {
  const c = order === 1
    ? barCase(law, GF, { target, increments: 60, gaugeHalf: 1, mesh: '{size: 1, tipSize: 1, refineRadius: 1, coarsen: false}' })
    : barCase(law, GF, { target, increments: 40, gaugeHalf: 10, mesh: '{size: 10, tipSize: 10, refineRadius: 10, coarsen: false}' });
  c.mesh.order = order;
  if (field) c.material.strengthField = field;
  return c;
}

async function runBar(c: CaseModel) {
  const a = new Analysis(c, c.mesh.order === 2 ? gridMesh(0, 0, L, H, 10, 2) : gridMesh(0, 0, L, H, 100, 10));
  a.tips.splice(0); // no growth: the one crack lies across the section from the start
  a.addCohesiveCut([L / 2, 0], [L / 2, H]);
  return a.run(() => {});
}

/** The field's ft at the face pairs of the crack (x = L/2, one vertex per mm of height) and each pair's face area. */
function pairStrengths(c: CaseModel): { ft: number[]; area: number[] } {
  const at = strengthOf(c)!, ft: number[] = [], area: number[] = [];
  for (let j = 0; j <= H; j++) { ft.push(at(L / 2, j)); area.push((j === 0 || j === H ? 0.5 : 1) * T); }
  return { ft, area };
}

describe('cohesive faces soften with the strength field read at their place', () => {
  for (const order of [1, 2] as const) it(`order ${order}: a field nearly uniform over the bar (ℓ = 1000 mm) gives the Hillerborg bar of the local ft, every step within 1 % of its peak`, async () => {
    const field: StrengthFieldSettings = { distribution: 'lognormal', cov: 0.2, correlationLength: 1000, seed: 3, pointsPerLength: 2 };
    const probe = fieldBar('bilinear', field, 1);
    const { ft } = pairStrengths(probe);
    const f0 = ft.reduce((s, v) => s + v, 0) / ft.length;
    // the seed was chosen so that the field is well away from the mean here (measured: 2.798 MPa), and flat over the section
    expect(Math.abs(f0 / FT - 1)).toBeGreaterThan(0.05);
    expect((Math.max(...ft) - Math.min(...ft)) / f0).toBeLessThan(1e-3);
    const sl = makeLaw('bilinear', f0, GF);
    const res = await runBar(fieldBar('bilinear', field, 1.02 * sl.wc, order));
    expect(res.status, res.reason).toBe('complete');
    const Fpeak = f0 * A, w0 = f0 / penaltyFor(E, order === 1 ? 1 : 10), gauge = order === 1 ? 2 : 20;
    // peak of the local strength, not of the case's mean (3 MPa: 7 % higher)
    expect(Math.abs(res.peak.load_N / Fpeak - 1)).toBeLessThan(0.01);
    for (let i = 1; i < res.rows.length; i++) {
      const r = res.rows[i], sigma = r.load_N / A, w = r.cmod_mm! - sigma * gauge / E;
      const fAn = w <= 1.001 * w0 ? E * A * r.displacement_mm / L : A * sl.stress(w - w0);
      expect(Math.abs(r.load_N - fAn), `step ${r.step}: load ${r.load_N}, local law ${fAn}`).toBeLessThan(0.01 * Fpeak);
    }
    // the whole section has separated: dissipated = GF·A (+ the penalty energy ½ft²/kp per area, 1e-6 of it here)
    const last = res.rows.at(-1)!;
    expect(Math.abs(last.dissipated_Nmm / ((GF + 0.5 * f0 * w0) * A) - 1)).toBeLessThan(0.01);
  });

  it('a field varying across the section (ℓ = 3 mm, CoV 0.2): the peak between the weakest pair and the sum of the pairs\' strengths, energy balanced, dissipated = GF·A; the same numbers again', async () => {
    const field: StrengthFieldSettings = { distribution: 'lognormal', cov: 0.2, correlationLength: 3, seed: 1, pointsPerLength: 2 };
    const { ft, area } = pairStrengths(fieldBar('linear', field, 1));
    const wcMax = Math.max(...ft.map((f) => 2 * GF / f)); // linear law: w_c = 2 GF/ft
    const c = fieldBar('linear', field, 1.1 * wcMax);
    const res = await runBar(c);
    expect(res.status, res.reason).toBe('complete');
    // statics: nothing softens before the weakest pair reaches its ft under the uniform stress
    // of the bar, and no pair carries more than its own ft (common practice)
    const lower = Math.min(...ft) * A, upper = ft.reduce((s, f, j) => s + f * area[j], 0);
    expect(upper / lower).toBeGreaterThan(1.1); // the field does vary here
    expect(res.peak.load_N).toBeGreaterThan(0.995 * lower);
    expect(res.peak.load_N).toBeLessThan(upper * (1 + 1e-6));
    const last = res.rows.at(-1)!;
    for (const r of res.rows) {
      if (r.external_work_Nmm < 1e-3 * last.external_work_Nmm) continue;
      // work of the machine = stored + dissipated, with each pair's own law in both (energy balance)
      expect(Math.abs(r.external_work_Nmm - r.elastic_energy_Nmm - r.dissipated_Nmm) / r.external_work_Nmm, `step ${r.step}`).toBeLessThan(0.01);
    }
    expect(last.load_N).toBeLessThan(1e-3 * res.peak.load_N);
    const kp = penaltyFor(E, 1), expected = ft.reduce((s, f, j) => s + (GF + 0.5 * f * f / kp) * area[j], 0);
    expect(Math.abs(last.dissipated_Nmm / expected - 1)).toBeLessThan(0.01);
    expect(Math.abs(last.dissipated_Nmm / (GF * A) - 1)).toBeLessThan(0.01);
    // deterministic: the same case and field seed give the same numbers
    const again = await runBar(fieldBar('linear', field, 1.1 * wcMax));
    expect(again.rows).toEqual(res.rows);
  });

  it('a field of no scatter (normal, CoV 0) gives the rows of the bar without a field, to round-off', async () => {
    const sl = makeLaw('linear', FT, GF);
    const plain = await runBar(fieldBar('linear', null, 1.02 * sl.wc));
    const flat = await runBar(fieldBar('linear', { distribution: 'normal', cov: 0, correlationLength: 10, seed: 1, pointsPerLength: 2 }, 1.02 * sl.wc));
    expect(plain.status).toBe('complete');
    expect(flat.rows.length).toBe(plain.rows.length);
    // the bilinear reading of a flat field is ft to an ulp or so, so each pair's law is the mean's to round-off
    for (const k of ['load_N', 'displacement_mm', 'cmod_mm', 'external_work_Nmm', 'dissipated_Nmm'] as const) {
      const scale = Math.max(...plain.rows.map((r) => Math.abs(r[k] ?? 0)));
      plain.rows.forEach((r, i) => expect(Math.abs((flat.rows[i][k] ?? 0) - (r[k] ?? 0)), `${k}, step ${r.step}`).toBeLessThan(1e-9 * scale));
    }
  });
});
