// A study through a real single-node Slurm started by the test: a job array of three
// coarse variants (two array tasks), followed with squeue, collected into study.csv. Skipped, with the
// reason, where the Slurm and munge binaries are absent.
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ensureBuilt } from './support/cli.js';
import { slurmUnavailable, startSlurm, type TestSlurm } from './support/slurm.js';
import { studyFromData } from '../src/study/spec.js';
import { runStudy, type StudyEvent } from '../src/study/study.js';
import { coarseCase } from './study.helpers.js';

const why = slurmUnavailable();
if (why) console.warn(why);

describe.skipIf(why !== null)('rupta study on Slurm', () => {
  let slurm: TestSlurm | null = null;
  let dir = '';
  const saved = process.env.SLURM_CONF;
  beforeAll(async () => {
    ensureBuilt();
    dir = mkdtempSync(join(tmpdir(), 'rupta-study-slurm-'));
    slurm = await startSlurm();
    process.env.SLURM_CONF = slurm.conf;
  }, 120_000);
  afterAll(async () => {
    if (saved === undefined) delete process.env.SLURM_CONF; else process.env.SLURM_CONF = saved;
    await slurm?.stop();
    if (dir) rmSync(dir, { recursive: true, force: true });
  }, 60_000);

  it('runs a 3-variant study as a job array and collects it', async () => {
    const spec = studyFromData({ study: 1, case: coarseCase(), vary: { 'mesh.seed': [1, 2, 3] } }, 'cluster', dir);
    const out = join(dir, 'cluster');
    const events: StudyEvent[] = [];
    // two array tasks: the first runs two variants in turn, the second one
    const r = await runStudy(spec, { out, on: 'slurm', png: false, slurm: { pollSeconds: 0.5, time: '10:00', mem: '1G', perTask: 2 }, onEvent: (e) => events.push(e) });
    const script = readFileSync(join(out, 'slurm', 'array.sh'), 'utf8');
    expect(script).toMatch(/#SBATCH --array=0-1\n/);
    expect(script).toMatch(/#SBATCH --time=10:00\n/);
    expect(events.some((e) => e.kind === 'submitted')).toBe(true);
    expect(r.counts.complete).toBe(3);
    for (const id of ['v0001', 'v0002', 'v0003']) expect(existsSync(join(out, 'runs', id, 'summary.json'))).toBe(true);
    expect(readFileSync(join(out, 'study.csv'), 'utf8').trimEnd().split('\n')).toHaveLength(4);
    // each array task wrote its own Slurm output file
    expect(existsSync(join(out, 'logs'))).toBe(true);
  }, 300_000);
});

describe('rupta study --on slurm --dry-run', () => {
  it('writes the batch script only', async () => {
    const d = mkdtempSync(join(tmpdir(), 'rupta-study-dry-'));
    try {
      const spec = studyFromData({ study: 1, case: coarseCase(), vary: { 'mesh.seed': [1, 2, 3, 4] } }, 'dry', d);
      const r = await runStudy(spec, { out: join(d, 'dry'), on: 'slurm', dryRun: true, slurm: { partition: 'short', time: '0:30:00', mem: '2G', maxRunning: 2 } });
      const s = readFileSync(r.script!, 'utf8');
      expect(s).toMatch(/#SBATCH --array=0-3%2\n/);
      expect(s).toMatch(/#SBATCH --partition=short\n#SBATCH --time=0:30:00\n#SBATCH --mem=2G\n/);
      expect(s).toMatch(/ids=\(v0001 v0002 v0003 v0004\)/);
      expect(s).toMatch(/run "cases\/\$id\.yaml" --out "runs\/\$id" --quiet \$mode/);
      expect(existsSync(join(d, 'dry', 'runs', 'v0001', 'summary.json'))).toBe(false);
      const two = await runStudy(spec, { out: join(d, 'dry3'), on: 'slurm', dryRun: true, slurm: { perTask: 3 } });
      // four variants, three per task: two array tasks, the second runs one
      expect(readFileSync(two.script!, 'utf8')).toMatch(/#SBATCH --array=0-1\n[\s\S]*\nper=3\n/);
      await expect(runStudy(spec, { out: join(d, 'dry2'), on: 'slurm', dryRun: true, slurm: { time: 'soon' } })).rejects.toThrow(/--time must be a time limit per variant/);
    } finally { rmSync(d, { recursive: true, force: true }); }
  });
});
