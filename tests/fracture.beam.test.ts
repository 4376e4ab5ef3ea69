// Notched beam in three-point bending: energy balance at every step (definition of GF:
// external work = elastic energy + dissipated energy), a crack on the plane of symmetry
// (common practice) on several mesh seeds, and a peak load that does not depend on the
// seed or the mesh size by more than 3 % (mesh objectivity of the cohesive model).
import { describe, expect, it } from 'vitest';
import { Analysis, type AnalysisResult } from '../src/fracture/analysis.js';
import { meshCase } from '../src/run.js';
import { coarseBeam } from './support/beam.js';
import { penaltyFor } from '../src/cohesive/interface.js';

async function run(c: ReturnType<typeof coarseBeam>): Promise<AnalysisResult> {
  return new Analysis(c, meshCase(c).mesh).run(() => {});
}

describe('notched beam in three-point bending', () => {
  const results: { seed: number; tip: number; res: AnalysisResult }[] = [];

  it('runs on three seeds and two mesh sizes', async () => {
    for (const [seed, tip] of [[1, 3], [2, 3], [3, 3], [1, 2]] as const) {
      const res = await run(coarseBeam({ seed, tip }));
      expect(res.status).toBe('complete');
      results.push({ seed, tip, res });
    }
  });

  // Here the mesh is refined as the crack runs (12 mm cells, 3 mm tips): each mesh change
  // alters the discrete model (the virtual element spaces before and after are not nested)
  // and the re-solve at the same control level moves strain energy no interface accounts
  // for. The loop therefore refines the whole line ahead of a tip to the outline before
  // loading and leaves the cells at the rig alone once loaded (growth.ts), so a straight
  // crack meets no mesh change on its way. Measured 0.09–0.59 % on these runs (1.5–3.0 %
  // with the disc around the tip alone); the check is the balance itself (definition of GF).
  it('energy balance on the adaptive coarse beam: within 1 % at every step (definition of GF)', () => {
    for (const { res } of results) {
      const Wend = res.rows.at(-1)!.external_work_Nmm;
      for (const r of res.rows) {
        if (r.external_work_Nmm < 1e-3 * Wend) continue;
        const gap = r.external_work_Nmm - r.elastic_energy_Nmm - r.dissipated_Nmm;
        expect(Math.abs(gap) / r.external_work_Nmm, `step ${r.step} of a run with peak ${res.peak.load_N.toFixed(0)} N`).toBeLessThan(0.01);
      }
    }
  });

  it('the crack stays on the plane of symmetry (within 1.5 tip cells) up to 85 % of the depth, on every seed', () => {
    for (const { tip, res } of results) {
      const path = res.crackPaths[0];
      expect(path.length).toBeGreaterThan(3);
      const top = Math.max(...path.map((p) => p[1]));
      expect(top).toBeGreaterThan(70);
      for (const [x, y] of path) if (y <= 85) expect(Math.abs(x - 220)).toBeLessThan(1.5 * tip);
    }
  });

  it('the peak load varies by less than 3 % between seeds and between two mesh sizes', () => {
    const peaks = results.map((r) => r.res.peak.load_N);
    const mean = peaks.reduce((a, b) => a + b) / peaks.length;
    for (const p of peaks) expect(Math.abs(p / mean - 1)).toBeLessThan(0.03);
  });
});

// External work = elastic energy + dissipated energy (energy balance), and at the end the
// energy dissipated is GF times the crack face area that has cracked (definition of GF;
// RILEM TC 50-FMC work of fracture). The ligament is meshed at 4 mm from the start (no
// refinement during the run) and the beam opened to a CMOD of 3 mm, about 23 critical
// openings. The crack runs through to the load point; of the faces that have cracked,
// nearly all have fully separated.
describe('notched beam opened far into the tail, ligament meshed at the tip size', () => {
  for (const seed of [1, 2]) {
    it(`seed ${seed}: work = elastic + dissipated within 1 % at every step; dissipation = GF × cracked area within 5 %`, async () => {
      const tip = 4;
      const c = coarseBeam({ seed, tip, radius: 18, target: 3, increments: 100, stop: 0 });
      const a = new Analysis(c, meshCase(c).mesh);
      const res = await a.run(() => {});
      expect(res.status, res.reason).toBe('complete');
      const last = res.rows.at(-1)!;
      for (const r of res.rows) {
        if (r.external_work_Nmm < 1e-3 * last.external_work_Nmm) continue;
        const gap = r.external_work_Nmm - r.elastic_energy_Nmm - r.dissipated_Nmm;
        expect(Math.abs(gap) / r.external_work_Nmm, `step ${r.step}`).toBeLessThan(0.01);
      }
      // the crack has crossed the ligament up to the load point
      expect(last.tip_y_mm!).toBeGreaterThan(100 - 2 * tip);
      expect(res.crackPaths[0].at(-1)).toEqual([220, 100]);
      const { reached_mm2, separated_mm2 } = a.faceAreas();
      expect(separated_mm2).toBeGreaterThan(0.85 * 70 * c.thickness);
      expect(separated_mm2).toBeGreaterThan(0.9 * reached_mm2);
      // every face point past ft has dissipated between nothing and GF (+ the penalty energy
      // ½ft²/kp lost at the peak), the fully separated ones all of GF
      const GF = c.material.GF, kp = penaltyFor(c.material.E, c.mesh.tipSize);
      expect(last.dissipated_Nmm).toBeGreaterThanOrEqual(GF * separated_mm2);
      // (the bound is reached when every such point has fully separated: allow the round-off of the sums)
      expect(last.dissipated_Nmm).toBeLessThanOrEqual((GF + 0.5 * c.material.ft ** 2 / kp) * reached_mm2 * (1 + 1e-12));
      expect(Math.abs(last.dissipated_Nmm / (GF * reached_mm2) - 1)).toBeLessThan(0.05);
    });
  }
});

// The tail of the bending test against an independent computation of the same beam whose
// cohesive interface is cut along the whole ligament, notch tip to loaded face, before
// loading (Hillerborg, Modéer, Petersson 1976: the fictitious crack carries the whole
// softening; the path on the plane of symmetry is common practice). At nine times the
// opening of the peak the grown crack, which now runs through to the load point, must give
// the same load: a last cell under the load point left uncracked acts as a hinge and was
// measured at 1.43 times the reference load there on seed 1.
describe('notched beam: the crack runs up to the loaded face and the tail follows the whole-ligament interface', () => {
  const loadAt = (rows: AnalysisResult['rows'], cmod: number): number => {
    for (let i = 1; i < rows.length; i++) {
      const a = rows[i - 1], b = rows[i];
      if (b.cmod_mm! >= cmod) return a.load_N + (b.load_N - a.load_N) * (cmod - a.cmod_mm!) / (b.cmod_mm! - a.cmod_mm!);
    }
    return NaN;
  };
  for (const seed of [1]) {
    it(`seed ${seed}: load at 9× the peak opening and at the end within 10 % of the pre-cut ligament; energy balance within 1 %`, async () => {
      const c = coarseBeam({ seed, tip: 4, radius: 18, target: 0.4, increments: 40, stop: 0 });
      const grown = await run(c);
      const ref = new Analysis(c, meshCase(c).mesh);
      ref.tips.splice(0);
      ref.addCohesiveCut([220, 30], [220, 100]);
      const cut = await ref.run(() => {});
      for (const res of [grown, cut]) expect(res.status, res.reason).toBe('complete');
      expect(grown.crackPaths[0].at(-1)).toEqual([220, 100]);
      const at9 = 9 * grown.peak.cmod_mm!;
      expect(Math.abs(loadAt(grown.rows, at9) / loadAt(cut.rows, at9) - 1)).toBeLessThan(0.1);
      expect(Math.abs(grown.rows.at(-1)!.load_N / cut.rows.at(-1)!.load_N - 1)).toBeLessThan(0.1);
      // the tail keeps falling: no later maximum
      expect(grown.rows.at(-1)!.load_N).toBeLessThan(loadAt(grown.rows, at9));
      const Wend = grown.rows.at(-1)!.external_work_Nmm;
      for (const r of grown.rows) {
        if (r.external_work_Nmm < 1e-3 * Wend) continue;
        expect(Math.abs(r.external_work_Nmm - r.elastic_energy_Nmm - r.dissipated_Nmm) / r.external_work_Nmm, `step ${r.step}`).toBeLessThan(0.01);
      }
    });
  }
});
