// One row per variant from its run folder: the values that set it apart, how the run
// ended and the numbers a study compares (peak, opening at the peak, work of fracture,
// where the crack ended, time). Also each variant's curve and crack paths for pictures.
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { csvCell } from '../output/files.js';
import type { Value, Variant } from './expand.js';
import { runDir, runStatus, type RunStatus } from './layout.js';

export interface StudyRow {
  id: string;
  values: Record<string, Value>;
  D_mm: number | null;
  status: RunStatus;
  reason: string;
  peak_load_N: number | null;
  peak_displacement_mm: number | null;
  peak_cmod_mm: number | null;
  work_of_fracture_Nmm: number | null;
  GF_estimate_Nmm: number | null;
  crack_end_x_mm: number | null;
  crack_end_y_mm: number | null;
  crack_length_mm: number | null;
  steps: number | null;
  time_s: number | null;
}

export interface VariantCurve { id: string; load: number[]; displacement: number[]; cmod: number[] | null }

export interface VariantResult { row: StudyRow; curve: VariantCurve | null; paths: [number, number][][] }

const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);

/** The curve.csv of a run folder (columns by the pinned header). */
export function readCurve(dir: string, id: string): VariantCurve | null {
  const p = join(dir, 'curve.csv');
  if (!existsSync(p)) return null;
  const lines = readFileSync(p, 'utf8').split('\n').filter((l) => l.trim() !== '');
  const head = (lines.shift() ?? '').split(',');
  const iL = head.indexOf('load_N'), iD = head.indexOf('displacement_mm'), iC = head.indexOf('cmod_mm');
  const load: number[] = [], displacement: number[] = [], cmod: number[] = [];
  let gauge = iC >= 0;
  for (const l of lines) {
    const c = l.split(',');
    load.push(Number(c[iL])); displacement.push(Number(c[iD]));
    if (gauge && c[iC] === '') gauge = false; else if (gauge) cmod.push(Number(c[iC]));
  }
  return { id, load, displacement, cmod: gauge ? cmod : null };
}

/** What the run folder of a variant holds. */
export function collectVariant(studyDir: string, v: Variant, failure?: string): VariantResult {
  const dir = runDir(studyDir, v.id);
  const status = runStatus(studyDir, v.id);
  const row: StudyRow = {
    id: v.id, values: v.values, D_mm: v.D ?? null, status, reason: failure ?? (status === 'missing' ? 'not run (or ended without a summary)' : ''),
    peak_load_N: null, peak_displacement_mm: null, peak_cmod_mm: null, work_of_fracture_Nmm: null, GF_estimate_Nmm: null,
    crack_end_x_mm: null, crack_end_y_mm: null, crack_length_mm: null, steps: null, time_s: null,
  };
  let paths: [number, number][][] = [];
  if (status !== 'missing') {
    const s = JSON.parse(readFileSync(join(dir, 'summary.json'), 'utf8')) as Record<string, any>;
    row.reason = typeof s.reason === 'string' ? s.reason : row.reason;
    row.peak_load_N = num(s.peak?.load_N);
    row.peak_displacement_mm = num(s.peak?.displacement_mm);
    row.peak_cmod_mm = num(s.peak?.cmod_mm);
    row.work_of_fracture_Nmm = num(s.workOfFracture?.W_Nmm);
    row.GF_estimate_Nmm = num(s.workOfFracture?.GF_Nmm);
    row.steps = num(s.steps);
    row.time_s = num(s.timings_s?.total);
    paths = Array.isArray(s.crackPaths) ? s.crackPaths : [];
    // the crack end: the far end of the longest crack
    let best = -1;
    for (const p of paths) {
      let L = 0;
      for (let i = 1; i < p.length; i++) L += Math.hypot(p[i]![0] - p[i - 1]![0], p[i]![1] - p[i - 1]![1]);
      if (L > best && p.length > 0) { best = L; row.crack_end_x_mm = p[p.length - 1]![0]; row.crack_end_y_mm = p[p.length - 1]![1]; }
    }
    if (best >= 0) row.crack_length_mm = best;
  }
  return { row, curve: status === 'missing' ? null : readCurve(dir, v.id), paths };
}

const FIXED = ['status', 'peak_load_N', 'peak_displacement_mm', 'peak_cmod_mm', 'work_of_fracture_Nmm', 'GF_estimate_Nmm',
  'crack_end_x_mm', 'crack_end_y_mm', 'crack_length_mm', 'steps', 'time_s'] as const;

/** study.csv: id, the varied values (one column per key, in order of first appearance), the results, the reason. */
export function studyCsv(rows: StudyRow[]): string {
  const keys: string[] = [];
  for (const r of rows) for (const k of Object.keys(r.values)) if (!keys.includes(k)) keys.push(k);
  const head = ['variant', ...keys, ...FIXED, 'reason'];
  const out = [head.join(',')];
  for (const r of rows) {
    out.push([r.id, ...keys.map((k) => csvCell(r.values[k] === undefined ? null : typeof r.values[k] === 'boolean' ? String(r.values[k]) : (r.values[k] as number | string | null))),
      ...FIXED.map((k) => csvCell(r[k] as number | string | null)), csvCell(r.reason)].join(','));
  }
  return out.join('\n') + '\n';
}
