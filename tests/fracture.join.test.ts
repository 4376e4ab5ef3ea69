// Cracks meeting things: a crack that reaches a hole or another crack joins it, and a new
// crack starts on the far side of a reached hole where the stress there reaches the strength,
// so the specimen separates and its load falls (common practice: a specimen cut through carries
// no load). Energy balance at every step: external work = elastic energy + dissipated energy
// (definition of GF).
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { parseCase } from '../src/case/index.js';
import type { CaseModel } from '../src/case/model.js';
import { Analysis, type AnalysisResult } from '../src/fracture/analysis.js';
import { meshCase } from '../src/run.js';
import { curvePeaks, runWarnings } from '../src/output/warnings.js';
import { coarseBeam } from './support/beam.js';

async function run(c: CaseModel): Promise<{ a: Analysis; res: AnalysisResult }> {
  const a = new Analysis(c, meshCase(c).mesh);
  return { a, res: await a.run(() => {}) };
}

function worstGap(res: AnalysisResult): number {
  const Wend = res.rows.at(-1)!.external_work_Nmm;
  let worst = 0;
  for (const r of res.rows) {
    if (r.external_work_Nmm < 1e-3 * Wend) continue;
    worst = Math.max(worst, Math.abs(r.external_work_Nmm - r.elastic_energy_Nmm - r.dissipated_Nmm) / r.external_work_Nmm);
  }
  return worst;
}

// the demo beam (coarse) with a hole of 20 mm on the ligament, 20 mm above the notch tip
const HOLE: [number, number, number] = [220, 60, 10];

describe('a crack through a hole on the ligament of a notched beam', () => {
  for (const start of ['notch-tips', 'anywhere']) {
    it(`joins the hole, starts again on its far side and loses its load (crack.start: ${start})`, async () => {
      const c = coarseBeam({ target: 0.6, increments: 60, hole: HOLE, start });
      const { a, res } = await run(c);
      expect(res.status, res.reason).toBe('complete');
      // the crack from the notch ends on the hole, its tip consumed
      expect(a.tips.some((t) => !t.active && t.end === 'hole')).toBe(true);
      // a crack starts on the rim, on the side of the hole away from the notch
      const rimStarts = res.crackPaths.filter((p) => Math.abs(Math.hypot(p[0][0] - HOLE[0], p[0][1] - HOLE[1]) - HOLE[2]) < 0.5);
      expect(rimStarts.length).toBeGreaterThan(0);
      for (const p of rimStarts) expect(p[0][1]).toBeGreaterThan(HOLE[1]);
      // and runs on toward the top face
      expect(Math.max(...rimStarts.flatMap((p) => p.map((q) => q[1])))).toBeGreaterThan(85);
      // the load falls after the first peak and does not rise again: no warning
      const pk = curvePeaks(res.rows);
      expect(Math.abs(res.rows.at(-1)!.load_N)).toBeLessThan(0.2 * Math.abs(pk.peak.load_N));
      expect(pk.later).toBeNull();
      expect(runWarnings(c, res, null)).toEqual([]);
      // measured 1.50 % (notch tips) and 2.07 % (anywhere): the hole's rim is refined and the
      // new crack beyond it starts under load, so those mesh changes move some strain energy
      expect(worstGap(res)).toBeLessThan(0.025);
    }, 120_000);
  }
});

describe('two cracks that meet', () => {
  it('double-edge-notched tension: the cracks from both notches join and the panel comes apart', async () => {
    const text = readFileSync(new URL('../cases/den-tension-example.yaml', import.meta.url), 'utf8')
      .replace(/^mesh:.*$/m, 'mesh: {size: 20, tipSize: 7, refineRadius: 25, seed: 1, lloyd: 6}')
      .replace(/growthStep: \d+/, 'growthStep: 14').replace(/averagingRadius: \d+/, 'averagingRadius: 21')
      .replace(/increments: 100/, 'increments: 40').replace(/^output:.*$/m, 'output: {frames: [], animation: none}');
    const c = parseCase(text, 'den.yaml');
    const { a, res } = await run(c);
    expect(res.status, res.reason).toBe('complete');
    // both tips end on the other crack's faces
    const grown = a.tips.filter((t) => t.crack >= 0);
    expect(grown.length).toBe(2);
    for (const t of grown) { expect(t.active).toBe(false); expect(t.end).toBe('crack'); }
    const pk = curvePeaks(res.rows);
    expect(Math.abs(res.rows.at(-1)!.load_N)).toBeLessThan(0.2 * Math.abs(pk.peak.load_N));
    expect(pk.later).toBeNull();
    // measured 0.05 %: checked at the 1 % the beam tests ask of a ligament meshed fine from the start
    expect(worstGap(res)).toBeLessThan(0.01);
  }, 120_000);
});
