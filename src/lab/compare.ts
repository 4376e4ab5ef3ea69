// Measured curves against a prediction: peak, opening at peak, RMSE and area between the
// curves over their common range, and the fracture energy from the work of fracture.

import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { InputError } from '../errors.js';
import { plotSvg, PALETTE, type Series } from '../output/plot.js';
import type { LabCurve } from './import.js';
import { rilemGF, workOfFracture } from './work.js';

/** A curve as two arrays of equal length (mm and N). */
export interface Curve { x: Float64Array; y: Float64Array }

export type XAxis = 'cmod' | 'displacement';

/** The prediction of a run folder: the curve.csv columns that matter here. */
export interface RunCurve {
  load: Float64Array;
  displacement: Float64Array;
  /** null when the run had no gauge. */
  cmod: Float64Array | null;
  title: string;
  ligamentArea_mm2: number | null;
}

/** Index of the largest value. */
export function peakIndex(y: ArrayLike<number>): number {
  let k = 0;
  for (let i = 1; i < y.length; i++) if (y[i]! > y[k]!) k = i;
  return k;
}

/** The part of a curve along which x keeps increasing (backward jitter and snap-back dropped). */
export function monotone(c: Curve): Curve {
  const xs: number[] = [], ys: number[] = [];
  let top = -Infinity;
  for (let i = 0; i < c.x.length; i++) {
    const x = c.x[i]!, y = c.y[i]!;
    if (!Number.isFinite(x) || !Number.isFinite(y) || !(x > top)) continue;
    xs.push(x); ys.push(y); top = x;
  }
  return { x: Float64Array.from(xs), y: Float64Array.from(ys) };
}

/**
 * A measured curve as a function of its opening. Jitter of the gauge (backward steps under
 * 1 % of the range) is sorted out, since dropping the points that step back would keep only
 * those with positive noise; larger reversals (snap-back, unloading) keep the forward path.
 */
export function measuredFunction(c: Curve): Curve {
  let top = -Infinity, back = 0, lo = Infinity;
  for (let i = 0; i < c.x.length; i++) {
    const x = c.x[i]!;
    if (!Number.isFinite(x) || !Number.isFinite(c.y[i]!)) continue;
    if (x < lo) lo = x;
    if (x > top) top = x; else back = Math.max(back, top - x);
  }
  if (!(back <= 0.01 * (top - lo))) return monotone(c);
  const idx: number[] = [];
  for (let i = 0; i < c.x.length; i++) if (Number.isFinite(c.x[i]!) && Number.isFinite(c.y[i]!)) idx.push(i);
  idx.sort((a, b) => c.x[a]! - c.x[b]! || a - b);
  return { x: Float64Array.from(idx, (i) => c.x[i]!), y: Float64Array.from(idx, (i) => c.y[i]!) };
}

/** Linear interpolation on an increasing x; NaN outside the range. */
export function interpAt(c: Curve, x: number): number {
  const n = c.x.length;
  if (n === 0 || x < c.x[0]! || x > c.x[n - 1]!) return NaN;
  let lo = 0, hi = n - 1;
  while (hi - lo > 1) { const m = (lo + hi) >> 1; if (c.x[m]! <= x) lo = m; else hi = m; }
  const x0 = c.x[lo]!, x1 = c.x[hi]!;
  return x1 === x0 ? c.y[hi]! : c.y[lo]! + ((c.y[hi]! - c.y[lo]!) * (x - x0)) / (x1 - x0);
}

export interface Difference {
  lo: number; hi: number;
  /** √(∫(a − b)² dx / (hi − lo)) in N. */
  rmse: number;
  /** ∫|a − b| dx (N·mm). */
  area: number;
  /** ∫|b| dx (N·mm), the reference for a normalised area. */
  refArea: number;
}

/**
 * Exact integrals of the difference of two piecewise-linear curves (x increasing) over
 * [lo, hi]: every vertex of either curve is a breakpoint and sign changes are split, so the
 * result does not depend on any sampling.
 */
export function curveDifference(a: Curve, b: Curve, lo: number, hi: number): Difference {
  const xs: number[] = [lo, hi];
  for (const c of [a, b]) for (let i = 0; i < c.x.length; i++) if (c.x[i]! > lo && c.x[i]! < hi) xs.push(c.x[i]!);
  xs.sort((p, q) => p - q);
  let sq = 0, abs = 0, ref = 0;
  let xp = xs[0]!, dp = interpAt(a, xp) - interpAt(b, xp), bp = interpAt(b, xp);
  for (let k = 1; k < xs.length; k++) {
    const x = xs[k]!, h = x - xp;
    if (!(h > 0)) continue;
    const bv = interpAt(b, x), d = interpAt(a, x) - bv;
    sq += (h * (dp * dp + dp * d + d * d)) / 3;
    abs += absIntegral(dp, d, h);
    ref += absIntegral(bp, bv, h);
    xp = x; dp = d; bp = bv;
  }
  return { lo, hi, rmse: hi > lo ? Math.sqrt(sq / (hi - lo)) : NaN, area: abs, refArea: ref };
}

/** ∫|f| over a segment of length h on which f is linear from f0 to f1. */
function absIntegral(f0: number, f1: number, h: number): number {
  if (f0 * f1 >= 0) return (h * (Math.abs(f0) + Math.abs(f1))) / 2;
  return (h * (f0 * f0 + f1 * f1)) / (2 * (Math.abs(f0) + Math.abs(f1)));
}

/** The x range covered by every curve. */
export function commonRange(curves: Curve[]): [number, number] {
  let lo = -Infinity, hi = Infinity;
  for (const c of curves) {
    if (c.x.length === 0) return [NaN, NaN];
    lo = Math.max(lo, c.x[0]!); hi = Math.min(hi, c.x[c.x.length - 1]!);
  }
  return [lo, hi];
}

/** Mean of several curves on n evenly spaced openings over their common range. */
export function meanCurve(curves: Curve[], n = 201): Curve {
  const mono = curves.map(measuredFunction);
  const [lo, hi] = commonRange(mono);
  if (!(hi > lo)) throw new InputError('the measured curves have no opening range in common, so no mean curve can be drawn');
  const x = new Float64Array(n), y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const xi = lo + ((hi - lo) * i) / (n - 1);
    let s = 0;
    for (const c of mono) s += interpAt(c, xi);
    x[i] = xi; y[i] = s / mono.length;
  }
  return { x, y };
}

/** Load-point displacement at the given openings through the predicted displacement–CMOD relation (straight beyond its ends). */
export function displacementFromCmod(run: RunCurve, cmod: ArrayLike<number>): Float64Array {
  const rel = monotone({ x: run.cmod!, y: run.displacement });
  const n = rel.x.length, out = new Float64Array(cmod.length);
  const slope = (i: number, j: number) => (rel.y[j]! - rel.y[i]!) / (rel.x[j]! - rel.x[i]!);
  for (let i = 0; i < cmod.length; i++) {
    const w = cmod[i]!;
    if (n < 2) { out[i] = NaN; continue; }
    if (w < rel.x[0]!) out[i] = rel.y[0]! + slope(0, 1) * (w - rel.x[0]!);
    // beyond the prediction the halves turn about the hinge: extend along the secant of the
    // last third of the relation (one noisy last step must not bend it back)
    else if (w > rel.x[n - 1]!) out[i] = rel.y[n - 1]! + Math.max(0, slope(Math.min(n - 2, Math.floor((2 * n) / 3)), n - 1)) * (w - rel.x[n - 1]!);
    else out[i] = interpAt(rel, w);
  }
  return out;
}

export interface CompareRow {
  name: string;
  peak_N: number;
  /** (predicted − measured) / measured. */
  peakError: number | null;
  openingAtPeak_mm: number;
  openingError: number | null;
  rmse_N: number | null;
  /** RMSE over the measured peak. */
  rmseRel: number | null;
  /** ∫|prediction − measured| / ∫|measured| over the common range. */
  areaRel: number | null;
  range_mm: [number, number] | null;
  workOfFracture_Nmm: number | null;
  GF_Nmm: number | null;
  /** Last load over the peak: a test stopped before the tail gives a lower bound of GF. */
  endLoadFraction: number;
}

export interface CompareResult {
  title: string;
  xAxis: XAxis;
  prediction: CompareRow;
  specimens: CompareRow[];
  mean: CompareRow | null;
  ligamentArea_mm2: number | null;
  notes: string[];
  curves: { prediction: Curve; specimens: { name: string; curve: Curve }[]; mean: Curve | null };
}

export interface CompareOptions { xAxis?: XAxis; ligamentArea_mm2?: number }

/** Parse curve.csv text of a run folder (the pinned header; columns found by name). */
export function parseRunCurve(text: string, where: string): Omit<RunCurve, 'title' | 'ligamentArea_mm2'> {
  const lines = text.split(/\r?\n/).filter((l) => l.trim() !== '');
  if (lines.length < 2) throw new InputError(`${where} has no rows: the run wrote no converged step`);
  const head = lines[0]!.split(',');
  const col = (name: string): number => head.indexOf(name);
  const iL = col('load_N'), iD = col('displacement_mm'), iC = col('cmod_mm');
  if (iL < 0 || iD < 0) throw new InputError(`${where} is not a rupta curve table: expected the columns load_N and displacement_mm in its header`);
  const L: number[] = [], D: number[] = [], C: number[] = [];
  let hasC = iC >= 0;
  for (let k = 1; k < lines.length; k++) {
    const f = lines[k]!.split(',');
    L.push(Number(f[iL])); D.push(Number(f[iD]));
    if (hasC) { const s = f[iC] ?? ''; if (s === '') hasC = false; else C.push(Number(s)); }
  }
  return { load: Float64Array.from(L), displacement: Float64Array.from(D), cmod: hasC ? Float64Array.from(C) : null };
}

/** The prediction of a run folder: curve.csv, with the title and ligament area from summary.json when present. */
export function readRunCurve(dir: string): RunCurve {
  const path = join(dir, 'curve.csv');
  if (!existsSync(path)) throw new InputError(`${dir} holds no curve.csv: give the output folder of a finished rupta run`);
  const base = parseRunCurve(readFileSync(path, 'utf8'), path);
  let title = dir, lig: number | null = null;
  const sp = join(dir, 'summary.json');
  if (existsSync(sp)) {
    try {
      const s = JSON.parse(readFileSync(sp, 'utf8')) as { title?: unknown; workOfFracture?: { ligamentArea_mm2?: unknown } | null };
      if (typeof s.title === 'string') title = s.title;
      const a = s.workOfFracture?.ligamentArea_mm2;
      if (typeof a === 'number' && a > 0) lig = a;
    } catch {
      throw new InputError(`${sp} is not valid JSON: the run may have been cut short; run it again`);
    }
  }
  return { ...base, title, ligamentArea_mm2: lig };
}

/** The predicted load against the chosen opening. */
export function predictionCurve(run: RunCurve, xAxis: XAxis): Curve {
  if (xAxis === 'cmod') {
    if (!run.cmod) throw new InputError('the run has no CMOD column (no gauge in its case): compare with --x displacement');
    return { x: run.cmod, y: run.load };
  }
  return { x: run.displacement, y: run.load };
}

const relErr = (p: number, m: number): number | null => (m !== 0 && Number.isFinite(p) && Number.isFinite(m) ? (p - m) / m : null);

/** Compare a prediction with one or more measured curves. */
export function compareCurves(run: RunCurve, labs: LabCurve[], opt: CompareOptions = {}): CompareResult {
  if (labs.length === 0) throw new InputError('compare needs at least one measured curve');
  const xAxis: XAxis = opt.xAxis ?? (run.cmod ? 'cmod' : 'displacement');
  const pred = predictionCurve(run, xAxis);
  const predMono = monotone(pred);
  const lig = opt.ligamentArea_mm2 ?? run.ligamentArea_mm2;
  const notes: string[] = [];
  if (lig === null) notes.push('no ligament area (summary.json without a work-of-fracture estimate): GF not computed; give --ligament-area');
  if (xAxis === 'cmod') notes.push('measured GF: the work of fracture needs the load-point displacement, so the measured CMOD is turned into it through the predicted displacement–CMOD relation');
  const gfOf = (W: number | null) => (W !== null && lig !== null ? rilemGF(W, lig) : null);

  const ip = peakIndex(pred.y);
  const predW = workOfFracture(run.displacement, run.load);
  const prediction: CompareRow = {
    name: 'prediction', peak_N: pred.y[ip]!, peakError: null, openingAtPeak_mm: pred.x[ip]!, openingError: null,
    rmse_N: null, rmseRel: null, areaRel: null, range_mm: null,
    workOfFracture_Nmm: predW, GF_Nmm: gfOf(predW), endLoadFraction: pred.y[pred.y.length - 1]! / pred.y[ip]!,
  };

  const rowOf = (name: string, c: Curve, W: number | null): CompareRow => {
    const k = peakIndex(c.y);
    const mono = measuredFunction(c);
    const [lo, hi] = commonRange([predMono, mono]);
    const d = hi > lo ? curveDifference(predMono, mono, lo, hi) : null;
    const peak = c.y[k]!;
    return {
      name, peak_N: peak, peakError: relErr(prediction.peak_N, peak),
      openingAtPeak_mm: c.x[k]!, openingError: relErr(prediction.openingAtPeak_mm, c.x[k]!),
      rmse_N: d ? d.rmse : null, rmseRel: d ? d.rmse / peak : null, areaRel: d && d.refArea > 0 ? d.area / d.refArea : null,
      range_mm: d ? [lo, hi] : null,
      workOfFracture_Nmm: W, GF_Nmm: gfOf(W), endLoadFraction: c.y[c.y.length - 1]! / peak,
    };
  };
  const labW = (c: Curve): number => workOfFracture(xAxis === 'cmod' ? displacementFromCmod(run, c.x) : c.x, c.y);

  const specimens = labs.map((l) => rowOf(l.name, { x: l.x, y: l.y }, labW(l)));
  for (const l of labs) {
    const looksCmod = /cmod|mouth|opening|\bcod\b/i.test(l.xLabel), looksDisp = /disp|defl|stroke/i.test(l.xLabel);
    if ((xAxis === 'displacement' && looksCmod && !looksDisp) || (xAxis === 'cmod' && looksDisp && !looksCmod)) {
      notes.push(`${l.name}: its x column is named "${l.xLabel}" but is compared as ${xAxis === 'cmod' ? 'CMOD' : 'load-point displacement'}`);
    }
  }
  for (const r of specimens) {
    if (r.range_mm === null) notes.push(`${r.name}: no opening range in common with the prediction`);
    if (r.endLoadFraction > 0.1) notes.push(`${r.name}: the test ended at ${(100 * r.endLoadFraction).toFixed(0)} % of its peak, so its GF misses the tail (a lower bound)`);
  }
  let mean: CompareRow | null = null, meanC: Curve | null = null;
  if (labs.length > 1) {
    meanC = meanCurve(labs.map((l) => ({ x: l.x, y: l.y })));
    mean = rowOf('mean of specimens', meanC, labW(meanC));
    notes.push(`mean curve over the openings common to all ${labs.length} specimens (${meanC.x[0]!.toPrecision(3)}–${meanC.x[meanC.x.length - 1]!.toPrecision(3)} mm)`);
  }
  return {
    title: run.title, xAxis, prediction, specimens, mean, ligamentArea_mm2: lig, notes,
    curves: { prediction: pred, specimens: labs.map((l) => ({ name: l.name, curve: { x: l.x, y: l.y } })), mean: meanC },
  };
}

const pct = (v: number | null, d = 1): string => (v === null ? '—' : `${v >= 0 ? '+' : ''}${(100 * v).toFixed(d)} %`);
const num = (v: number | null, d: number): string => (v === null ? '—' : v.toFixed(d));

/** The comparison as a plain-text table. */
export function compareTable(r: CompareResult): string {
  const xName = r.xAxis === 'cmod' ? 'CMOD' : 'disp.';
  const head = ['curve', 'peak N', 'err', `${xName} at peak mm`, 'err', 'RMSE N', 'RMSE/peak', 'area diff', 'W0 N·mm', 'GF N/mm'];
  const rows = [r.prediction, ...r.specimens, ...(r.mean ? [r.mean] : [])].map((c) => [
    c.name, c.peak_N.toFixed(1), pct(c.peakError), c.openingAtPeak_mm.toFixed(4), pct(c.openingError),
    num(c.rmse_N, 1), c.rmseRel === null ? '—' : `${(100 * c.rmseRel).toFixed(2)} %`, c.areaRel === null ? '—' : `${(100 * c.areaRel).toFixed(2)} %`,
    num(c.workOfFracture_Nmm, 1), num(c.GF_Nmm, 4),
  ]);
  const w = head.map((h, j) => Math.max(h.length, ...rows.map((row) => row[j]!.length)));
  const line = (cells: string[]) => cells.map((s, j) => (j === 0 ? s.padEnd(w[j]!) : s.padStart(w[j]!))).join('  ');
  const out = [`${r.title}: prediction against ${r.specimens.length} measured curve${r.specimens.length > 1 ? 's' : ''} (load against ${r.xAxis === 'cmod' ? 'CMOD' : 'load-point displacement'})`,
    line(head), ...rows.map(line)];
  out.push('errors: (prediction − measured) / measured; RMSE and area over the common opening range; GF = W0 / ligament area (RILEM TC 50-FMC)'
    + (r.ligamentArea_mm2 !== null ? `, ligament ${r.ligamentArea_mm2.toFixed(0)} mm²` : ''));
  for (const n of r.notes) out.push(`note: ${n}`);
  return out.join('\n') + '\n';
}

/** Evenly thinned copy of a curve for drawing (keeps the first, last and peak points). */
export function thin(c: Curve, max: number): Curve {
  const n = c.x.length;
  if (n <= max) return c;
  const keep = new Set<number>([0, n - 1, peakIndex(c.y)]);
  for (let k = 0; k < max; k++) keep.add(Math.round((k * (n - 1)) / (max - 1)));
  const idx = [...keep].sort((a, b) => a - b);
  return { x: Float64Array.from(idx, (i) => c.x[i]!), y: Float64Array.from(idx, (i) => c.y[i]!) };
}

/** Overlay of the prediction, the measured curves and their mean. */
export function compareSvg(r: CompareResult): string {
  const series: Series[] = [{ label: 'rupta prediction', x: r.curves.prediction.x, y: r.curves.prediction.y, color: PALETTE[0] }];
  r.curves.specimens.forEach((s, k) => {
    const t = thin(s.curve, 150);
    series.push({ label: s.name, x: t.x, y: t.y, style: 'points', color: PALETTE[1 + (k % (PALETTE.length - 2))] });
  });
  if (r.curves.mean) series.push({ label: 'mean of specimens', x: r.curves.mean.x, y: r.curves.mean.y, style: 'dashed', color: PALETTE[PALETTE.length - 1] });
  const p = r.prediction;
  return plotSvg({
    series, title: `${r.title}: prediction and measurements`,
    xLabel: r.xAxis === 'cmod' ? 'CMOD (mm)' : 'Load-point displacement (mm)', yLabel: 'Load (N)',
    marks: [{ x: p.openingAtPeak_mm, y: p.peak_N, label: `predicted peak ${p.peak_N.toFixed(0)} N` }],
  });
}

/** The comparison as JSON-ready data (curves left out). */
export function compareJson(r: CompareResult): Record<string, unknown> {
  return { format: 1, title: r.title, xAxis: r.xAxis, ligamentArea_mm2: r.ligamentArea_mm2, prediction: r.prediction, specimens: r.specimens, mean: r.mean, notes: r.notes };
}
