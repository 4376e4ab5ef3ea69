// rupta study: many runs of one case (scatter, sweeps, size series) here or on Slurm.
import type { Command } from 'commander';
import { InputError } from '../src/errors.js';
import { loadStudy } from '../src/study/spec.js';
import { runStudy, type StudyEvent } from '../src/study/study.js';

function whole(name: string, v: string | undefined, min: number): number | undefined {
  if (v === undefined) return undefined;
  const x = Number(v);
  if (!Number.isInteger(x) || x < min) throw new InputError(`${name} must be a whole number of at least ${min} (found "${v}")`);
  return x;
}

function progressLine(quiet: boolean): (e: StudyEvent) => void {
  const t0 = performance.now();
  const say = (s: string) => { if (!quiet) process.stderr.write(s + '\n'); };
  return (e) => {
    const t = ((performance.now() - t0) / 1000).toFixed(1);
    switch (e.kind) {
      case 'plan': say(`study in ${e.dir}: ${e.total} variants, ${e.kept} finished before, ${e.toRun} to run`); break;
      case 'end': say(`${e.id} ${e.status} in ${e.seconds.toFixed(1)} s (${e.finished}/${e.toRun}, ${t} s)`); break;
      case 'script': say(`wrote ${e.path}`); break;
      case 'submitted': say(`submitted job array ${e.jobId}`); break;
      case 'queue': say(`job array: ${e.pending} pending, ${e.running} running, ${e.finished}/${e.toRun} finished (${t} s)`); break;
      default: break;
    }
  };
}

export function registerStudyCommand(program: Command): void {
  program
    .command('study')
    .description('run the variants of a study file (sweeps, scatter, random strength field, size series) and write study.csv, pictures and study.html')
    .argument('<study>', 'study file (YAML or JSON)')
    .option('--out <dir>', 'study folder (default out/<study name>)')
    .option('--on <where>', 'local (a pool of processes on this machine) or slurm (a job array)', 'local')
    .option('--jobs <n>', 'variants run at once on this machine (default 2)')
    .option('--resume', 'go on with the study in the folder: finished variants are kept')
    .option('--force', 'start afresh in a folder that holds a study')
    .option('--dry-run', 'slurm: write the batch script only, submit nothing')
    .option('--partition <name>', 'slurm: partition')
    .option('--time <limit>', 'slurm: time limit per variant (minutes, HH:MM:SS or D-HH:MM:SS)')
    .option('--mem <size>', 'slurm: memory per variant (e.g. 2G)')
    .option('--cpus-per-task <n>', 'slurm: cores per variant (default 1)')
    .option('--max-running <n>', 'slurm: at most this many array tasks at once')
    .option('--per-task <n>', 'slurm: variants run in turn by one array task (default 1)')
    .option('--poll <seconds>', 'slurm: seconds between looks at the queue (default 5)')
    .option('--quiet', 'no progress on stderr')
    .option('--json', 'print the study result (rows and counts) as JSON on stdout')
    .action(async (file: string, o: Record<string, string | boolean | undefined>) => {
      const on = o.on as string;
      if (on !== 'local' && on !== 'slurm') throw new InputError(`--on must be local or slurm (found "${on}")`);
      const spec = loadStudy(file);
      let stop = false;
      const onSignal = () => { if (stop) process.exit(3); stop = true; };
      process.on('SIGINT', onSignal); process.on('SIGTERM', onSignal);
      const poll = o.poll === undefined ? undefined : Number(o.poll);
      if (poll !== undefined && !(poll > 0)) throw new InputError(`--poll must be a number of seconds above 0 (found "${o.poll}")`);
      const r = await runStudy(spec, {
        out: o.out as string | undefined, on, jobs: whole('--jobs', o.jobs as string | undefined, 1),
        resume: Boolean(o.resume), force: Boolean(o.force), dryRun: Boolean(o.dryRun),
        slurm: {
          partition: o.partition as string | undefined, time: o.time as string | undefined, mem: o.mem as string | undefined,
          cpusPerTask: whole('--cpus-per-task', o.cpusPerTask as string | undefined, 1), maxRunning: whole('--max-running', o.maxRunning as string | undefined, 1),
          perTask: whole('--per-task', o.perTask as string | undefined, 1),
          pollSeconds: poll,
        },
        onEvent: progressLine(Boolean(o.quiet)),
        stopRequested: () => stop,
      });
      process.off('SIGINT', onSignal); process.off('SIGTERM', onSignal);
      if (r.script) {
        process.stdout.write(`wrote ${r.script}; submit it with: sbatch ${r.script}, then collect with: rupta study ${file} --out ${r.dir} --resume\n`);
        return;
      }
      if (o.json) process.stdout.write(JSON.stringify({ dir: r.dir, counts: r.counts, sizeEffect: r.sizeEffect, rows: r.rows }, null, 2) + '\n');
      else if (!o.quiet) {
        process.stdout.write(`${r.rows.length} variants: ${Object.entries(r.counts).map(([k, v]) => `${v} ${k}`).join(', ')}\n`);
        if (r.sizeEffect) process.stdout.write(`size effect law: B ${r.sizeEffect.B.toPrecision(3)}, D0 ${r.sizeEffect.D0.toPrecision(3)} mm (r² ${r.sizeEffect.r2.toFixed(3)})\n`);
        process.stdout.write(`results in ${r.dir} (study.csv, band.svg, paths.svg, peaks.svg, study.html)\n`);
      }
      if (stop) { process.stderr.write(`rupta: the study was interrupted; go on with: rupta study ${file} --out ${r.dir} --resume\n`); process.exitCode = 3; }
      else {
        // like a single run: anything short of complete is exit 3, with the rows kept
        const short = r.rows.filter((x) => x.status !== 'complete');
        if (short.length) {
          process.stderr.write(`rupta: ${short.length} of ${r.rows.length} variants did not complete (${short.slice(0, 5).map((x) => `${x.id} ${x.status}`).join(', ')}${short.length > 5 ? ', …' : ''}); see study.csv\n`);
          process.exitCode = 3;
        }
      }
    });
}
