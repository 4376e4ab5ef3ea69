// Cluster execution on Slurm: one job array, one array task per variant, each an ordinary
// `rupta run` of the variant's case file. Submitted with sbatch, followed with squeue
// (sacct asked at the end where the cluster keeps accounting), collected from the run
// folders when the array has left the queue.
import { execFile } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { InputError } from '../errors.js';
import { writeFileAtomic } from '../output/files.js';
import { cliEntry, isFinished, runStatus } from './layout.js';
import type { LocalTask } from './local.js';
import type { StudyEvent } from './study.js';

export interface SlurmOptions {
  partition?: string;
  /** Time limit per array task, as Slurm takes it: minutes, MM:SS, HH:MM:SS or D-HH:MM:SS. */
  time?: string;
  /** Memory per array task, as Slurm takes it: a number with K, M, G or T. */
  mem?: string;
  cpusPerTask?: number;
  /** At most this many array tasks at once (the %N of --array). */
  maxRunning?: number;
  /** Variants run one after the other in one array task (default 1): fewer, longer tasks where the scheduler is slow to start them. */
  perTask?: number;
  /** Seconds between looks at the queue (default 5). */
  pollSeconds?: number;
  dryRun?: boolean;
  /** The node program on the compute nodes (default: the one running this study). */
  node?: string;
}

const q = (s: string) => `'${s.replace(/'/g, `'\\''`)}'`;

export function checkSlurmOptions(o: SlurmOptions): void {
  if (o.time !== undefined && !/^(\d+-)?\d+(:\d{1,2}){0,2}$/.test(o.time)) throw new InputError(`--time must be a time limit per variant as Slurm takes it: minutes, HH:MM:SS or D-HH:MM:SS (found ${o.time})`);
  if (o.mem !== undefined && !/^\d+[KMGT]?$/i.test(o.mem)) throw new InputError(`--mem must be the memory per variant as a whole number with a unit K, M, G or T, e.g. 2G (found ${o.mem})`);
  if (o.partition !== undefined && !/^[\w.,-]+$/.test(o.partition)) throw new InputError(`--partition must be the name of a Slurm partition, letters, digits, dots, dashes and underscores (found ${o.partition})`);
  if (o.cpusPerTask !== undefined && !(Number.isInteger(o.cpusPerTask) && o.cpusPerTask >= 1)) throw new InputError(`--cpus-per-task must be a whole number of cores of at least 1 (found ${o.cpusPerTask})`);
  if (o.perTask !== undefined && !(Number.isInteger(o.perTask) && o.perTask >= 1)) throw new InputError(`--per-task must be a whole number of variants of at least 1 (found ${o.perTask})`);
  if (o.maxRunning !== undefined && !(Number.isInteger(o.maxRunning) && o.maxRunning >= 1)) throw new InputError(`--max-running must be a whole number of array tasks of at least 1 (found ${o.maxRunning})`);
}

/** The batch script of a study's job array. */
export function slurmScript(dir: string, name: string, tasks: LocalTask[], o: SlurmOptions): string {
  const abs = resolve(dir), per = o.perTask ?? 1, count = Math.ceil(tasks.length / per);
  const lines = [
    '#!/bin/bash',
    `# rupta study ${name}: a job array, each task an ordinary rupta run of cases/<variant>.yaml into runs/<variant>`
      + (per > 1 ? ` for ${per} variants in turn.` : '.'),
    `#SBATCH --job-name=${('rupta-' + name).replace(/[^\w.-]/g, '_').slice(0, 60)}`,
    `#SBATCH --array=0-${count - 1}${o.maxRunning ? `%${o.maxRunning}` : ''}`,
    `#SBATCH --chdir=${abs}`,
    `#SBATCH --output=${join(abs, 'logs', 'slurm-%A_%a.txt')}`,
    '#SBATCH --ntasks=1',
    `#SBATCH --cpus-per-task=${o.cpusPerTask ?? 1}`,
    ...(o.partition ? [`#SBATCH --partition=${o.partition}`] : []),
    ...(o.time ? [`#SBATCH --time=${o.time}`] : []),
    ...(o.mem ? [`#SBATCH --mem=${o.mem}`] : []),
    'set -u',
    `ids=(${tasks.map((t) => t.id).join(' ')})`,
    `resume=(${tasks.map((t) => (t.resume ? 1 : 0)).join(' ')})`,
    `per=${per}`,
    'first=$((SLURM_ARRAY_TASK_ID * per))',
    'status=0',
    'for ((k = first; k < first + per && k < ${#ids[@]}; k++)); do',
    '  id=${ids[$k]}',
    '  mode=--force',
    '  if [ "${resume[$k]}" = 1 ]; then mode=--resume; fi',
    `  ${q(o.node ?? process.execPath)} ${q(cliEntry())} run "cases/$id.yaml" --out "runs/$id" --quiet $mode > "logs/$id.txt" 2>&1 || status=$?`,
    'done',
    'exit $status',
    '',
  ];
  return lines.join('\n');
}

function cmd(file: string, args: string[]): Promise<{ code: number; out: string; err: string }> {
  return new Promise((res) => {
    execFile(file, args, { timeout: 60_000 }, (e, out, err) => {
      const code = e ? (typeof (e as NodeJS.ErrnoException).code === 'number' ? (e as unknown as { code: number }).code : ((e as NodeJS.ErrnoException).code === 'ENOENT' ? 127 : 1)) : 0;
      res({ code, out: String(out), err: String(err) });
    });
  });
}

const sleep = (s: number) => new Promise((r) => setTimeout(r, s * 1000));

/** The last line Slurm wrote for a variant's array task (a time limit or memory kill is told there). */
export function slurmNote(dir: string, jobId: string, index: number): string {
  const p = join(dir, 'logs', `slurm-${jobId}_${index}.txt`);
  if (!existsSync(p)) return '';
  return readFileSync(p, 'utf8').split('\n').map((l) => l.trim()).filter((l) => l !== '').pop() ?? '';
}

/** Submit the array and follow it until it leaves the queue (or only write the script on a dry run). */
export async function runSlurm(dir: string, name: string, tasks: LocalTask[], o: SlurmOptions, emit: (e: StudyEvent) => void,
  stopRequested?: () => boolean): Promise<{ dryRun: boolean; script: string; jobId?: string; states?: Record<string, string> }> {
  checkSlurmOptions(o);
  mkdirSync(join(dir, 'slurm'), { recursive: true });
  const script = join(dir, 'slurm', 'array.sh');
  writeFileAtomic(script, slurmScript(dir, name, tasks, o));
  emit({ kind: 'script', path: script });
  if (o.dryRun) return { dryRun: true, script };
  const sub = await cmd('sbatch', ['--parsable', script]);
  if (sub.code === 127) throw new InputError('--on slurm needs the Slurm command sbatch on the PATH (not found on this machine); --dry-run writes the batch script only');
  if (sub.code !== 0) throw new InputError(`sbatch refused the job array: ${(sub.err || sub.out).trim().split('\n').pop()} (the script is ${script})`);
  const jobId = sub.out.trim().split(';')[0]!;
  writeFileAtomic(join(dir, 'slurm', 'job-id'), jobId + '\n');
  emit({ kind: 'submitted', jobId });
  const poll = o.pollSeconds ?? 5;
  let cancelled = false;
  for (;;) {
    if (!cancelled && stopRequested?.()) {
      // tasks not yet started leave the queue; running ones end after their step, with a checkpoint
      cancelled = true;
      await cmd('scancel', ['--state=PENDING', jobId]);
      await cmd('scancel', ['--signal=TERM', '--full', jobId]);
    }
    const sq = await cmd('squeue', ['-h', '-r', '-j', jobId, '-o', '%T']);
    // an array that has left the queue: squeue lists nothing (or no longer knows the id)
    const states = sq.code === 0 ? sq.out.split('\n').map((s) => s.trim()).filter((s) => s !== '') : [];
    const finished = tasks.filter((t) => isFinished(runStatus(dir, t.id))).length;
    emit({ kind: 'queue', pending: states.filter((s) => s === 'PENDING').length, running: states.filter((s) => s === 'RUNNING' || s === 'COMPLETING').length, finished, toRun: tasks.length });
    if (states.length === 0) break;
    await sleep(poll);
  }
  // where the cluster keeps accounting, the end state of every task (timeouts, memory) is kept beside the logs
  const acct = await cmd('sacct', ['-n', '-P', '-X', '-j', jobId, '-o', 'JobID,State,Elapsed,ExitCode']);
  const states: Record<string, string> = {};
  if (acct.code === 0 && acct.out.trim()) {
    writeFileAtomic(join(dir, 'slurm', 'sacct.txt'), acct.out);
    for (const line of acct.out.split('\n')) {
      const [id, state] = line.split('|');
      const m = /_(\d+)$/.exec(id ?? '');
      if (m && state) tasks.forEach((t, i) => { if (Math.floor(i / (o.perTask ?? 1)) === Number(m[1])) states[t.id] = state.trim(); });
    }
  }
  return { dryRun: false, script, jobId, states };
}
