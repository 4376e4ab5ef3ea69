// A study from start to end: expand the variants, write each as a case file, run the
// ones not yet finished (here on a pool of processes, or as a Slurm job array), then
// gather study.csv, the pictures and the page. Every variant is an ordinary run folder.
import { existsSync, mkdirSync, readFileSync, readdirSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { stringify } from 'yaml';
import type { CaseModel } from '../case/model.js';
import { InputError } from '../errors.js';
import { writeFileAtomic } from '../output/files.js';
import { svgToPng } from '../output/png.js';
import { collectVariant, studyCsv, type StudyRow, type VariantResult } from './collect.js';
import { expandStudy, variantModel, type Variant } from './expand.js';
import { STUDY_FILE, caseFile, isFinished, logFile, runStatus } from './layout.js';
import { runPool } from './local.js';
import { bandSvg, pathsSvg, peaksSvg, sizeEffectSvg } from './pictures.js';
import { fitSizeEffect, nominalStrength, type SizeEffectFit } from './sizeeffect.js';
import { checkSlurmOptions, runSlurm, slurmNote, type SlurmOptions } from './slurm.js';
import type { StudySpec } from './spec.js';
import { studyHtml } from './html.js';
import { describe } from './stats.js';

export type StudyEvent =
  | { kind: 'plan'; dir: string; total: number; toRun: number; kept: number }
  | { kind: 'start'; id: string }
  | { kind: 'end'; id: string; status: StudyRow['status']; seconds: number; finished: number; toRun: number }
  | { kind: 'script'; path: string }
  | { kind: 'submitted'; jobId: string }
  | { kind: 'queue'; pending: number; running: number; finished: number; toRun: number }
  | { kind: 'written'; path: string };

export interface StudyOptions {
  /** Study folder (default out/<study name>). */
  out?: string;
  on?: 'local' | 'slurm';
  /** Variants run at once on this machine (default 2). */
  jobs?: number;
  /** Go on with the study in the folder: finished variants are kept. */
  resume?: boolean;
  /** Start afresh in a folder that holds a study. */
  force?: boolean;
  /** Slurm: write the batch script only. */
  dryRun?: boolean;
  slurm?: SlurmOptions;
  onEvent?: (e: StudyEvent) => void;
  /** Polled about once a second; true stops the study (running variants end after their step, resumable). */
  stopRequested?: () => boolean;
  /** Write the PNG twins of the pictures (default true). */
  png?: boolean;
}

export interface StudyResult {
  dir: string;
  rows: StudyRow[];
  /** complete, stopped, failed, interrupted, missing: how many of each. */
  counts: Record<string, number>;
  /** True when every variant has a finished run. */
  finished: boolean;
  sizeEffect: SizeEffectFit | null;
  /** Files written into the study folder (names). */
  files: string[];
  /** Slurm dry run: the script written, nothing submitted. */
  script?: string;
}

interface StudyRecord { format: 1; name: string; title: string; seed: number; variants: { id: string; values: Variant['values']; D?: number; case: Record<string, unknown> }[] }

/** Plan a study folder: refuse to mix with another study or other files unless asked. */
function prepareFolder(dir: string, rec: StudyRecord, opt: StudyOptions): void {
  const own = join(dir, STUDY_FILE);
  if (opt.resume && opt.force) throw new InputError('--resume goes on with the study in the folder and --force starts it afresh: give one of them, not both');
  if (existsSync(own)) {
    if (opt.force) {
      for (const sub of ['cases', 'runs', 'logs', 'slurm']) rmSync(join(dir, sub), { recursive: true, force: true });
    } else if (opt.resume) {
      let old: StudyRecord;
      try { old = JSON.parse(readFileSync(own, 'utf8')) as StudyRecord; } catch { throw new InputError(`${own} is damaged (not valid JSON); start the study again with --force`); }
      const same = old.variants.length === rec.variants.length && old.variants.every((v, i) => v.id === rec.variants[i]!.id && JSON.stringify(v.case) === JSON.stringify(rec.variants[i]!.case));
      if (!same) throw new InputError(`the study in ${dir} has other variants than this study file (${old.variants.length} against ${rec.variants.length}, or their cases differ); start it afresh with --force or give another --out folder`);
    } else throw new InputError(`${dir} already holds a study: give --resume to go on with it or --force to start it afresh`);
  } else if (existsSync(dir) && readdirSync(dir).length > 0 && !opt.force) {
    throw new InputError(`${dir} is not empty and holds no study: give an empty or new --out folder (or --force to write into it)`);
  }
  for (const sub of ['cases', 'runs', 'logs']) mkdirSync(join(dir, sub), { recursive: true });
  writeFileAtomic(own, JSON.stringify(rec, null, 1) + '\n');
}

/** Last non-empty line of a variant's log: why a run ended without a summary. */
function lastLogLine(dir: string, id: string): string {
  const p = logFile(dir, id);
  if (!existsSync(p)) return '';
  const lines = readFileSync(p, 'utf8').split('\n').map((l) => l.trim()).filter((l) => l !== '');
  return (lines.pop() ?? '').replace(/^rupta:\s*/, '');
}

export async function runStudy(spec: StudySpec, opt: StudyOptions = {}): Promise<StudyResult> {
  const emit = opt.onEvent ?? (() => {});
  const variants = expandStudy(spec);
  const models: CaseModel[] = variants.map((v) => variantModel(v, spec.name));
  const dir = opt.out ?? join('out', spec.name);
  if (dir.trim() === '') throw new InputError('--out needs the name of a folder (found an empty one)');
  const jobs = Math.floor(opt.jobs ?? 2);
  if (!(jobs >= 1 && jobs <= 256)) throw new InputError(`--jobs must be a whole number of variants run at once from 1 to 256 (found ${opt.jobs})`);
  if (opt.dryRun && (opt.on ?? 'local') !== 'slurm') throw new InputError('--dry-run writes the batch script of a Slurm study: give it with --on slurm');
  if (opt.on === 'slurm') checkSlurmOptions(opt.slurm ?? {});
  const title = spec.title ?? `Study ${spec.name}`;
  const rec: StudyRecord = { format: 1, name: spec.name, title, seed: spec.seed, variants: variants.map((v) => ({ id: v.id, values: v.values, ...(v.D !== undefined ? { D: v.D } : {}), case: v.data })) };
  prepareFolder(dir, rec, opt);
  for (const v of variants) {
    const text = `# ${title}, variant ${v.id}: written by rupta study; run it alone with\n#   rupta run cases/${v.id}.yaml --out runs/${v.id}\n` + stringify(v.data);
    const p = caseFile(dir, v.id);
    if (!existsSync(p) || readFileSync(p, 'utf8') !== text) writeFileAtomic(p, text);
  }
  const todo = variants.filter((v) => !isFinished(runStatus(dir, v.id)));
  emit({ kind: 'plan', dir, total: variants.length, toRun: todo.length, kept: variants.length - todo.length });

  let script: string | undefined;
  const notes = new Map<string, string>();
  if (todo.length > 0) {
    if ((opt.on ?? 'local') === 'slurm') {
      const r = await runSlurm(dir, spec.name, todo.map((v) => ({ id: v.id, resume: runStatus(dir, v.id) === 'interrupted' })), { ...opt.slurm, dryRun: opt.dryRun }, emit, opt.stopRequested);
      script = r.dryRun ? r.script : undefined;
      todo.forEach((v, i) => {
        const note = [r.states?.[v.id] ? `Slurm state ${r.states[v.id]}` : '', r.jobId ? slurmNote(dir, r.jobId, Math.floor(i / (opt.slurm?.perTask ?? 1))) : ''].filter((x) => x).join('; ');
        if (note) notes.set(v.id, note);
      });
      if (r.dryRun) return { dir, rows: [], counts: {}, finished: false, sizeEffect: null, files: [r.script], script: r.script };
    } else {
      let finished = 0;
      const pool = runPool(dir, todo.map((v) => ({ id: v.id, resume: runStatus(dir, v.id) === 'interrupted' })), jobs, {
        onStart: (id) => emit({ kind: 'start', id }),
        onEnd: (e) => { finished++; emit({ kind: 'end', id: e.id, status: runStatus(dir, e.id), seconds: e.seconds, finished, toRun: todo.length }); },
      });
      const poll = opt.stopRequested ? setInterval(() => { if (opt.stopRequested!()) pool.stop(); }, 200) : null;
      try { await pool.done; } finally { if (poll) clearInterval(poll); }
    }
  }
  return gather(spec, dir, variants, models, title, opt.png ?? true, emit, notes, script);
}

/** study.csv, pictures and page from the run folders as they are. */
async function gather(spec: StudySpec, dir: string, variants: Variant[], models: CaseModel[], title: string, png: boolean,
  emit: (e: StudyEvent) => void, notes: Map<string, string>, script?: string): Promise<StudyResult> {
  const results: VariantResult[] = variants.map((v) => {
    const r = collectVariant(dir, v);
    if (r.row.status === 'missing') {
      const why = [lastLogLine(dir, v.id), notes.get(v.id) ?? ''].filter((x) => x).join('; ');
      if (why) r.row.reason = why;
    }
    return r;
  });
  const rows = results.map((r) => r.row);
  const files: string[] = [];
  const write = async (name: string, svg?: string, textOut?: string) => {
    const p = join(dir, name);
    writeFileAtomic(p, svg ?? textOut ?? '');
    files.push(name); emit({ kind: 'written', path: p });
    if (svg && png) { await svgToPng(svg, p.replace(/\.svg$/, '.png')); files.push(name.replace(/\.svg$/, '.png')); }
  };
  await write('study.csv', undefined, studyCsv(rows));
  const done = results.filter((r) => r.row.status === 'complete' || r.row.status === 'stopped');
  const band = bandSvg(done, title);
  await write('band.svg', band.svg);
  const factors = variants.map((v) => (typeof v.values['size.factor'] === 'number' ? v.values['size.factor'] : null));
  const paths = pathsSvg(baseModelFor(models, factors), results, factors, title);
  await write('paths.svg', paths);
  const peaks = done.map((r) => r.row.peak_load_N).filter((p): p is number => p !== null);
  const peaksPicture = peaksSvg(peaks, title);
  await write('peaks.svg', peaksPicture);
  let fit: SizeEffectFit | null = null;
  let sizeSvg: string | null = null;
  const D: number[] = [], sigma: number[] = [];
  if (spec.sizes) {
    results.forEach((r, i) => {
      if ((r.row.status === 'complete' || r.row.status === 'stopped') && r.row.peak_load_N !== null && variants[i]!.D !== undefined) {
        D.push(variants[i]!.D!); sigma.push(nominalStrength(r.row.peak_load_N, models[i]!.thickness, variants[i]!.D!));
      }
    });
    const ft = models[0]!.material.ft;
    fit = fitSizeEffect(D, sigma, ft);
    sizeSvg = sizeEffectSvg(D, sigma, fit, title);
    await write('size-effect.svg', sizeSvg);
  }
  const counts: Record<string, number> = {};
  for (const r of rows) counts[r.status] = (counts[r.status] ?? 0) + 1;
  const html = studyHtml({
    title, name: spec.name, rows, counts, band: band.band, bandSvg: band.svg,
    pathsSvg: paths, peaksSvg: peaksPicture,
    peaks: peaks.length ? describe(peaks) : null, sizeSvg, fit, D, sigma, seed: spec.seed, script,
  });
  await write('study.html', undefined, html);
  return { dir, rows, counts, finished: rows.every((r) => isFinished(r.status)), sizeEffect: fit, files };
}

/** The model drawn under the paths: the variant at size factor 1 when there is one, else the first. */
function baseModelFor(models: CaseModel[], factors: (number | null)[]): CaseModel {
  const i = factors.findIndex((f) => f === null || f === 1);
  if (i >= 0) return models[i]!;
  const f = factors[0]!, m = models[0]!;
  // draw at the base size: scale the first variant's outline back
  return { ...m, geometry: { ...m.geometry, outline: m.geometry.outline.map(([x, y]) => [x / f, y / f]), holes: [], notches: m.geometry.notches.map((n) => ({ from: [n.from[0] / f, n.from[1] / f], to: [n.to[0] / f, n.to[1] / f], width: n.width / f })) } };
}
