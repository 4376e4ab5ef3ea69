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

/** CPU seconds of this process's finished children (Linux: cutime + cstime of /proc/self/stat), or NaN. */
function childCpu(): number {
  try {
    const f = readFileSync('/proc/self/stat', 'utf8').split(') ')[1]!.split(' ');
    // after the command name: state is field 3, cutime and cstime are fields 16 and 17, in ticks of 1/100 s
    return (Number(f[13]) + Number(f[14])) / 100;
  } catch { return NaN; }
}
const load = () => { try { return readFileSync('/proc/loadavg', 'utf8').split(' ')[0]; } catch { return '?'; } };

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
    let c0 = childCpu(), t0 = now();
    execFileSync(process.execPath, [cliEntry(), 'run', 'cases/v0001.yaml', '--out', join(dir, 'single'), '--quiet', '--force'], { cwd: local, stdio: 'ignore' });
    const single = now() - t0, singleCpu = childCpu() - c0;
    console.log(`one run of the demo beam alone: ${single.toFixed(1)} s wall, ${singleCpu.toFixed(1)} s CPU (load average ${load()})`);
    rmSync(local, { recursive: true, force: true });
    c0 = childCpu(); t0 = now();
    const r = await runStudy(spec, { out: local, jobs, png: false });
    const wall = now() - t0, cpu = childCpu() - c0;
    report(`local pool`, r, wall, jobs);
    console.log(`  study wall / (${variants}/${jobs} × one run) = ${(wall / ((variants / jobs) * single)).toFixed(2)}; CPU ${cpu.toFixed(1)} s = ${(cpu / variants / singleCpu).toFixed(2)} × one run's per variant; CPU/wall ${(cpu / wall).toFixed(2)} of ${jobs} (load average ${load()})`);
    if (slurm) {
      const why = slurmUnavailable();
      if (why) { console.log(why.replace('Slurm test skipped', 'Slurm bench skipped')); return; }
      const s = await startSlurm();
      const saved = process.env.SLURM_CONF;
      process.env.SLURM_CONF = s.conf;
      try {
        // the scheduler alone: an array of tasks that do nothing, followed the way a study follows it
        const env = { ...process.env, SLURM_CONF: s.conf };
        t0 = now();
        const id = execFileSync('sbatch', ['--parsable', `--array=0-${variants - 1}`, `--output=${join(dir, 'noop-%a.txt')}`, '--wrap=true'], { env, encoding: 'utf8' }).trim();
        while (execFileSync('squeue', ['-h', '-r', '-j', id, '-o', '%T'], { env, encoding: 'utf8' }).trim() !== '') await new Promise((res) => setTimeout(res, 200));
        const noop = now() - t0;
        console.log(`single-node Slurm: an array of ${variants} empty tasks in ${noop.toFixed(1)} s, ${(jobs * noop / variants).toFixed(2)} s per task on ${jobs} CPUs (submission to leaving the queue)`);
        c0 = childCpu(); t0 = now();
        const rs = await runStudy(spec, { out: join(dir, 'slurm'), on: 'slurm', png: false, slurm: { pollSeconds: 0.5 } });
        report('single-node Slurm (2 CPUs)', rs, now() - t0, jobs);
        console.log(`  (load average ${load()})`);
      } finally {
        if (saved === undefined) delete process.env.SLURM_CONF; else process.env.SLURM_CONF = saved;
        await s.stop();
      }
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
