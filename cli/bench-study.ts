// npm run bench -- --study [--variants N] [--jobs J] [--slurm]: a seed study of the demo
// beam on this machine's pool against N/J × one run, and (with --slurm, as root where
// slurm-wlm and munge are installed) the same study through a single-node Slurm: the
// overhead per variant beyond its own run, (J × wall − Σ run times) / N, on each.
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parse } from 'yaml';
import { studyFromData } from '../src/study/spec.js';
import { runStudy, type StudyResult } from '../src/study/study.js';
import { cliEntry } from '../src/study/layout.js';
import { slurmUnavailable, startSlurm } from '../tests/support/slurm.js';

const now = () => performance.now() / 1000;

function demoCase(): Record<string, unknown> {
  return parse(readFileSync(fileURLToPath(new URL('../../cases/beam-3pb-demo.yaml', import.meta.url)), 'utf8')) as Record<string, unknown>;
}

function report(label: string, r: StudyResult, wall: number, jobs: number): number {
  const runs = r.rows.map((x) => x.time_s ?? 0), sum = runs.reduce((a, b) => a + b, 0);
  const over = (jobs * wall - sum) / r.rows.length;
  console.log(`${label}: ${r.rows.length} variants in ${wall.toFixed(1)} s wall on ${jobs} at once; runs ${Math.min(...runs).toFixed(1)}–${Math.max(...runs).toFixed(1)} s each (Σ ${sum.toFixed(1)} s); overhead per variant beyond its run ${over.toFixed(2)} s`);
  return over;
}

export async function benchStudy(variants: number, jobs: number, slurm: boolean): Promise<void> {
  const dir = mkdtempSync(join(tmpdir(), 'rupta-bench-study-'));
  try {
    const spec = studyFromData({
      study: 1, title: 'bench seeds', case: demoCase(),
      set: { output: { frames: [], animation: 'none', pngWidth: 600 } },
      vary: { 'mesh.seed': Array.from({ length: variants }, (_, i) => i + 1) },
    }, 'bench', dir);
    // one run alone: the first variant's case through the command line
    const local = join(dir, 'local');
    await runStudy(spec, { out: local, dryRun: true, on: 'slurm' }).catch(() => undefined);
    let t0 = now();
    execFileSync(process.execPath, [cliEntry(), 'run', 'cases/v0001.yaml', '--out', join(dir, 'single'), '--quiet', '--force'], { cwd: local, stdio: 'ignore' });
    const single = now() - t0;
    console.log(`one run of the demo beam alone: ${single.toFixed(1)} s wall`);
    rmSync(local, { recursive: true, force: true });
    t0 = now();
    const r = await runStudy(spec, { out: local, jobs, png: false });
    const wall = now() - t0;
    report(`local pool`, r, wall, jobs);
    console.log(`  study wall / (${variants}/${jobs} × one run) = ${(wall / ((variants / jobs) * single)).toFixed(2)}`);
    if (slurm) {
      const why = slurmUnavailable();
      if (why) { console.log(why.replace('Slurm test skipped', 'Slurm bench skipped')); return; }
      const s = await startSlurm();
      const saved = process.env.SLURM_CONF;
      process.env.SLURM_CONF = s.conf;
      try {
        t0 = now();
        const rs = await runStudy(spec, { out: join(dir, 'slurm'), on: 'slurm', png: false, slurm: { pollSeconds: 0.5 } });
        report('single-node Slurm (2 CPUs)', rs, now() - t0, jobs);
      } finally {
        if (saved === undefined) delete process.env.SLURM_CONF; else process.env.SLURM_CONF = saved;
        await s.stop();
      }
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
