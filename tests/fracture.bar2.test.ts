// Cohesive interfaces of order 2 on a prescribed path: Hillerborg's bar (fictitious crack
// model; Hillerborg, Modéer, Petersson 1976), δ = σL/E + w(σ), with the faces' opening
// quadratic along each segment and the traction taken at the segment's three Newton–Cotes points.
import { describe, expect, it } from 'vitest';
import { Analysis } from '../src/fracture/analysis.js';
import { makeLaw } from '../src/cohesive/laws.js';
import { penaltyFor } from '../src/cohesive/interface.js';
import { gridMesh } from './support/grid.js';
import { BAR, barCase } from './support/bar.js';

const { L, H, T, E, FT } = BAR;

async function runBar(law: 'linear' | 'bilinear' | 'exponential', GF: number, nx: number, ny: number) {
  const sl = makeLaw(law, FT, GF);
  const c = barCase(law, GF, { target: sl.wc * 1.02, increments: 40, gaugeHalf: 10, mesh: '{size: 10, tipSize: 10, refineRadius: 10, coarsen: false}' });
  c.mesh.order = 2;
  const a = new Analysis(c, gridMesh(0, 0, L, H, nx, ny));
  a.tips.splice(0);
  a.addCohesiveCut([L / 2, 0], [L / 2, H]);
  const res = await a.run(() => {});
  return { res, sl, dofs: a.dofs.initial };
}

describe('cohesive bar of order 2 (Hillerborg fictitious crack model)', () => {
  for (const law of ['linear', 'exponential'] as const) {
    it(`${law} law on a 10 × 2 grid: every step within 1 % of the peak load, energy balanced within 1 %`, async () => {
      const { res, sl } = await runBar(law, 0.1, 10, 2);
      expect(res.status, res.reason).toBe('complete');
      const A = H * T, Fpeak = FT * A, w0 = FT / penaltyFor(E, 10);
      expect(res.peak.load_N).toBeGreaterThan(0.99 * Fpeak);
      expect(res.peak.load_N).toBeLessThan(1.01 * Fpeak);
      for (let i = 1; i < res.rows.length; i++) {
        const r = res.rows[i], sigma = r.load_N / A, w = r.cmod_mm! - sigma * 20 / E;
        const fAn = w <= 1.001 * w0 ? E * A * r.displacement_mm / L : A * sl.stress(w - w0);
        expect(Math.abs(r.load_N - fAn), `step ${r.step}`).toBeLessThan(0.01 * Fpeak);
        // work of the machine = stored + dissipated (definition of GF)
        expect(Math.abs(r.external_work_Nmm - r.elastic_energy_Nmm - r.dissipated_Nmm)).toBeLessThan(0.01 * Math.max(r.external_work_Nmm, 1e-9));
      }
      // fully separated at the end: the dissipated energy is GF times the section (REFERENCES.md)
      expect(res.rows.at(-1)!.dissipated_Nmm).toBeGreaterThan(0.98 * 0.1 * A);
    });
  }
});
