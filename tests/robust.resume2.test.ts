// Resuming a run of order 2: the checkpoint carries the edge-midpoint displacements with the
// vertex ones, so a run resumed from any checkpoint repeats the uninterrupted run bit for bit
// (common practice for restartable simulations: a restart repeats the same floating-point
// sequence), also from a step that grew the crack, after which Newton starts from the state
// as it stands rather than from a predictor.
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { Analysis, type AnalysisState } from '../src/fracture/analysis.js';
import { decodeCheckpoint, encodeCheckpoint } from '../src/fracture/checkpoint.js';
import { meshCase, runCase } from '../src/run.js';
import { coarseBeam } from './support/beam.js';

const root = mkdtempSync(join(tmpdir(), 'rupta-resume2-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

const beam = () => {
  const c = coarseBeam({ tip: 6, size: 20, target: 0.2, increments: 40 });
  c.mesh.order = 2;
  return c;
};

describe('resuming a run of order 2', () => {
  it('from checkpoints after a growth and after a plain step, through the checkpoint text: the same rows and crack, bit for bit (common practice)', async () => {
    const c = beam(), states: AnalysisState[] = [];
    const whole = new Analysis(c, meshCase(c).mesh, { checkpointEvery: 1 });
    const res = await whole.run(() => {}, (s) => { states.push(s); });
    expect(res.status, res.reason).toBe('complete');
    // after a step that grew the crack (no predictor: Newton starts from the carried state), and after one that did not
    const grew = states.filter((s) => s.loop.step > 5 && s.trend === null && s.growthLog.length > 1);
    const plain = states.filter((s) => s.loop.step > 5 && s.trend && s.growthLog.length > 1);
    expect(grew.length).toBeGreaterThan(0);
    expect(plain.length).toBeGreaterThan(0);
    for (const s of [grew[0], plain[plain.length >> 1]]) {
      // every edge of the last topology has its two midpoint values in the checkpoint
      expect(s.mid!.u.length).toBe(2 * s.mid!.key.length);
      const back = decodeCheckpoint(encodeCheckpoint(c, s), c, 'the test');
      const again = new Analysis(c, meshCase(c).mesh, { checkpointEvery: 1 });
      again.restore(back);
      const r = await again.run(() => {});
      expect(r.status).toBe('complete');
      expect(r.rows).toEqual(res.rows);
      expect(r.crackPaths).toEqual(res.crackPaths);
    }
  });

  it('rupta run --resume is taken at order 2: stopped and resumed, the same curve.csv bytes (common practice)', async () => {
    const whole = await runCase(beam(), { out: join(root, 'whole') });
    expect(whole.result.status, whole.result.reason).toBe('complete');
    let steps = 0;
    const cut = await runCase(beam(), { out: join(root, 'cut'), onStep: () => { steps++; }, stopRequested: () => steps > 30 });
    expect(cut.result.status).toBe('interrupted');
    const resumed = await runCase(beam(), { out: join(root, 'cut'), resume: true });
    expect(resumed.result.status, resumed.result.reason).toBe('complete');
    const curve = (name: string) => readFileSync(join(root, name, 'curve.csv'), 'utf8');
    expect(curve('cut')).toBe(curve('whole'));
  });
});
