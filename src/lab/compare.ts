// Measured curves against a prediction: peak, opening at peak, RMSE and area between the
// curves over their common range, and the fracture energy from the work of fracture.

import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { InputError } from '../errors.js';
import { plotSvg, PALETTE, type Series } from '../output/plot.js';
import type { LabCurve } from './import.js';
import { rilemGF, workOfFracture } from './work.js';
import { correctCurve, estimateCompliance, type Corrections } from './correct.js';

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
  // the breakpoints in order, merged from both curves (the fit calls this in its inner searches)
  const xs: number[] = [lo];
  let i = 0, j = 0;
  while (i < a.x.length && !(a.x[i]! > lo)) i++;
  while (j < b.x.length && !(b.x[j]! > lo)) j++;
  for (;;) {
    const u = i < a.x.length && a.x[i]! < hi ? a.x[i]! : Infinity, v = j < b.x.length && b.x[j]! < hi ? b.x[j]! : Infinity;
    if (u === Infinity && v === Infinity) break;
    if (u <= v) { xs.push(u); i++; } else { xs.push(v); j++; }
  }
  xs.push(hi);
  const fa = walker(a), fb = walker(b);
  let sq = 0, abs = 0, ref = 0;
  let xp = xs[0]!, bp = fb(xp), dp = fa(xp) - bp;
  for (let k = 1; k < xs.length; k++) {
    const x = xs[k]!, h = x - xp;
    if (!(h > 0)) continue;
    const bv = fb(x), d = fa(x) - bv;
    sq += (h * (dp * dp + dp * d + d * d)) / 3;
    abs += absIntegral(dp, d, h);
    ref += absIntegral(bp, bv, h);
    xp = x; dp = d; bp = bv;
  }
  return { lo, hi, rmse: hi > lo ? Math.sqrt(sq / (hi - lo)) : NaN, area: abs, refArea: ref };
}

/** interpAt for abscissae that never decrease: the segment is walked to, not searched for. */
function walker(c: Curve): (x: number) => number {
  const n = c.x.length;
  let k = 0;
  return (x) => {
    if (n === 0 || x < c.x[0]! || x > c.x[n - 1]!) return NaN;
    if (n === 1) return c.y[0]!;
    while (k < n - 2 && c.x[k + 1]! <= x) k++;
    const x0 = c.x[k]!, x1 = c.x[k + 1]!;
    return x1 === x0 ? c.y[k + 1]! : c.y[k]! + ((c.y[k + 1]! - c.y[k]!) * (x - x0)) / (x1 - x0);
  };
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
  const { x, y } = meanBand(curves, n);
  return { x, y };
}

/** Mean and sample standard deviation (n − 1) of the load of several curves at n openings over their common range. */
export function meanBand(curves: Curve[], n = 201): Curve & { sd: Float64Array } {
  const mono = curves.map(measuredFunction);
  const [lo, hi] = commonRange(mono);
  if (!(hi > lo)) throw new InputError('the measured curves have no opening range in common, so no mean curve can be drawn');
  const x = new Float64Array(n), y = new Float64Array(n), sd = new Float64Array(n);
  const k = mono.length;
  for (let i = 0; i < n; i++) {
    const xi = lo + ((hi - lo) * i) / (n - 1);
    let s = 0, s2 = 0;
    for (const c of mono) { const v = interpAt(c, xi); s += v; s2 += v * v; }
    const m = s / k;
    x[i] = xi; y[i] = m; sd[i] = k > 1 ? Math.sqrt(Math.max(0, (s2 - k * m * m) / (k - 1))) : 0;
  }
  return { x, y, sd };
}

export interface Stat { mean: number; sd: number; cov: number; n: number }

/** Mean, sample standard deviation (n − 1) and coefficient of variation of finite values; null when fewer than two. */
export function stat(values: (number | null)[]): Stat | null {
  const v = values.filter((t): t is number => t !== null && Number.isFinite(t));
  if (v.length < 2) return null;
  const m = v.reduce((a, b) => a + b, 0) / v.length;
  const sd = Math.sqrt(v.reduce((a, b) => a + (b - m) * (b - m), 0) / (v.length - 1));
  return { mean: m, sd, cov: m !== 0 ? sd / Math.abs(m) : NaN, n: v.length };
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

/** Statistics of a series of specimens (each over the specimens, not the mean curve). */
export interface SeriesStats {
  n: number;
  peak_N: Stat | null;
  openingAtPeak_mm: Stat | null;
  workOfFracture_Nmm: Stat | null;
  GF_Nmm: Stat | null;
}

export interface CompareResult {
  title: string;
  xAxis: XAxis;
  /** Why this axis: the lab column's meaning, the --x option or the run's default. */
  xAxisReason: string;
  series: SeriesStats | null;
  prediction: CompareRow;
  specimens: CompareRow[];
  mean: CompareRow | null;
  ligamentArea_mm2: number | null;
  notes: string[];
  curves: { prediction: Curve; specimens: { name: string; curve: Curve }[]; mean: (Curve & { sd: Float64Array }) | null };
}

export interface CompareOptions {
  xAxis?: XAxis;
  ligamentArea_mm2?: number;
  /** Preload, machine compliance and toe corrections of the measured curves. */
  corrections?: Corrections;
  /** --compliance estimate: the CMOD reading of each measured curve's test (same order), or null. */
  estimateFrom?: (Curve | null)[];
}

const AXIS_NAME: Record<XAxis, string> = { cmod: 'CMOD', displacement: 'load-point displacement' };

/** Legend names: the specimen id from the file's header, else the file name; repeats get the file name. */
export function specimenLabels(labs: LabCurve[]): string[] {
  const ids = labs.map((l) => l.specimen ?? l.name);
  const repeated = (id: string): boolean => ids.indexOf(id) !== ids.lastIndexOf(id);
  return ids.map((id, i) => (repeated(id) && labs[i]!.name !== id ? `${id} (${labs[i]!.name})` : id));
}

/**
 * The predicted quantity the measured curves are compared with: --x when given, else the
 * meaning of their x column (CMOD or displacement), else CMOD when the run has a gauge.
 * Refuses curves of mixed meaning and an axis the run did not record.
 */
export function chooseAxis(hasCmod: boolean, labs: LabCurve[], asked: XAxis | undefined, where: string): { xAxis: XAxis; reason: string } {
  const kinds = [...new Set(labs.map((l) => l.xKind ?? null).filter((k): k is XAxis => k !== null))];
  let xAxis: XAxis, reason: string;
  if (asked) { xAxis = asked; reason = 'as --x asks'; }
  else if (kinds.length > 1) {
    const a = labs.find((l) => l.xKind === 'cmod')!, b = labs.find((l) => l.xKind === 'displacement')!;
    throw new InputError(`the measured curves mix openings: ${a.name} has CMOD ("${a.xLabel}") and ${b.name} a displacement ("${b.xLabel}"): compare curves of one kind, or choose the columns with --x-column`);
  } else if (kinds.length === 1) {
    xAxis = kinds[0]!;
    const l = labs.find((t) => t.xKind === xAxis)!;
    reason = `the measured x column "${l.xLabel}" is ${xAxis === 'cmod' ? 'a crack opening' : 'a displacement'}`;
  } else { xAxis = hasCmod ? 'cmod' : 'displacement'; reason = `the measured x column says neither CMOD nor displacement, so the run's ${hasCmod ? 'CMOD' : 'displacement'} is used (say which with --x)`; }
  if (xAxis === 'cmod' && !hasCmod) {
    throw new InputError(`${where} has no CMOD (no control.gauge in the case), but the measured curve is against CMOD (${reason}): add control.gauge to the case and run it again, or compare a displacement column (--x-column)`);
  }
  return { xAxis, reason };
}

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

/**
 * Initial slope of load over opening on the rising branch between two fractions of the peak. At
 * small openings the opening is the noisier reading, so the line is fitted as opening on load,
 * which noise in the opening does not bias. Least squares of opening on load between 5 and 40 % of the peak, rising branch. */
export function initialStiffness(c: Curve, from = 0.05, to = 0.4): number {
  const k = peakIndex(c.y), P = c.y[k]!;
  let sx = 0, sy = 0, n = 0;
  for (let i = 0; i <= k; i++) if (c.y[i]! >= from * P && c.y[i]! <= to * P) { sx += c.x[i]!; sy += c.y[i]!; n++; }
  if (n < 3) {
    for (let i = 1; i <= k; i++) if (c.y[i]! >= to * P || i === k) return (c.y[i]! - c.y[0]!) / (c.x[i]! - c.x[0]!);
    return NaN;
  }
  const mx = sx / n, my = sy / n;
  let syy = 0, sxy = 0;
  for (let i = 0; i <= k; i++) {
    if (c.y[i]! < from * P || c.y[i]! > to * P) continue;
    const dy = c.y[i]! - my;
    syy += dy * dy; sxy += (c.x[i]! - mx) * dy;
  }
  return syy / sxy;
}

const relErr = (p: number, m: number): number | null => (m !== 0 && Number.isFinite(p) && Number.isFinite(m) ? (p - m) / m : null);

/** Compare a prediction with one or more measured curves. */
export function compareCurves(run: RunCurve, rawLabs: LabCurve[], opt: CompareOptions = {}): CompareResult {
  if (rawLabs.length === 0) throw new InputError('compare needs at least one measured curve');
  const { xAxis, reason: xAxisReason } = chooseAxis(run.cmod !== null, rawLabs, opt.xAxis, `the run "${run.title}"`);
  const pred = predictionCurve(run, xAxis);
  const predMono = monotone(pred);
  const lig = opt.ligamentArea_mm2 ?? run.ligamentArea_mm2;
  const notes: string[] = [`load against ${AXIS_NAME[xAxis]}: ${xAxisReason}`];
  const labs = rawLabs.map((l, i) => {
    const k: Corrections = { ...opt.corrections };
    const cm = opt.estimateFrom?.[i];
    if (opt.estimateFrom) {
      if (xAxis !== 'displacement') throw new InputError('--compliance estimate applies to a displacement curve, but the comparison is against CMOD: choose the displacement column with --x-column');
      if (!cm) throw new InputError(`--compliance estimate needs a CMOD column beside the displacement in ${l.name}, and it has none: give the compliance in mm/kN instead`);
      if (!run.cmod) throw new InputError('--compliance estimate needs the predicted CMOD, and the run has no gauge: give the compliance in mm/kN instead');
      const e = estimateCompliance({ x: l.x, y: l.y }, cm, { x: run.displacement, y: run.load }, { x: run.cmod, y: run.load });
      k.compliance_mm_per_N = e.C_mm_per_N;
      notes.push(...e.notes.map((t) => `${l.name}: ${t}`));
    }
    const r = correctCurve({ x: l.x, y: l.y }, k, xAxis === 'displacement');
    notes.push(...r.notes.map((t) => `${l.name}: ${t}`));
    return r.notes.length ? { ...l, x: r.curve.x, y: r.curve.y } : l;
  });
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

  const labels = specimenLabels(labs);
  const specimens = labs.map((l, i) => rowOf(labels[i]!, { x: l.x, y: l.y }, labW(l)));
  for (const l of labs) {
    if (l.xKind && l.xKind !== xAxis) notes.push(`${l.name}: its x column "${l.xLabel}" is ${l.xKind === 'cmod' ? 'a CMOD' : 'a displacement'} but is compared as ${AXIS_NAME[xAxis]}, as --x asks`);
  }
  if (xAxis === 'displacement') {
    // a crosshead reading includes the machine and the seating: a much softer start than predicted points there
    const kp = initialStiffness(pred);
    for (let i = 0; i < labs.length; i++) {
      const km = initialStiffness({ x: labs[i]!.x, y: labs[i]!.y });
      if (kp > 0 && km > 0 && km < 0.6 * kp) notes.push(`${labels[i]}: its initial slope is ${(100 * km / kp).toFixed(0)} % of the predicted one: a crosshead reading includes the machine's compliance and the seating, so give --compliance (mm/kN) or --compliance estimate, and --toe`);
    }
  }
  for (const r of specimens) {
    if (r.range_mm === null) notes.push(`${r.name}: no opening range in common with the prediction`);
    if (r.endLoadFraction > 0.1) notes.push(`${r.name}: the test ended at ${(100 * r.endLoadFraction).toFixed(0)} % of its peak, so its GF misses the tail (a lower bound)`);
  }
  let mean: CompareRow | null = null, meanC: (Curve & { sd: Float64Array }) | null = null, series: SeriesStats | null = null;
  if (labs.length > 1) {
    meanC = meanBand(labs.map((l) => ({ x: l.x, y: l.y })));
    mean = rowOf('mean of specimens', meanC, labW(meanC));
    notes.push(`mean curve and ±1 SD band over the openings common to all ${labs.length} specimens (${meanC.x[0]!.toPrecision(3)}–${meanC.x[meanC.x.length - 1]!.toPrecision(3)} mm)`);
    series = {
      n: labs.length,
      peak_N: stat(specimens.map((r) => r.peak_N)),
      openingAtPeak_mm: stat(specimens.map((r) => r.openingAtPeak_mm)),
      workOfFracture_Nmm: stat(specimens.map((r) => r.workOfFracture_Nmm)),
      GF_Nmm: stat(specimens.map((r) => r.GF_Nmm)),
    };
  }
  return {
    title: run.title, xAxis, xAxisReason, series, prediction, specimens, mean, ligamentArea_mm2: lig, notes,
    curves: { prediction: pred, specimens: labs.map((l, i) => ({ name: labels[i]!, curve: { x: l.x, y: l.y } })), mean: meanC },
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
  if (r.series) {
    const f = (t: Stat | null, d: number, unit: string): string => (t === null ? '—' : `${t.mean.toFixed(d)} ± ${t.sd.toFixed(d)} ${unit} (CoV ${(100 * t.cov).toFixed(1)} %)`);
    out.push(`series of ${r.series.n} specimens (mean ± 1 SD, n − 1): peak ${f(r.series.peak_N, 1, 'N')}; ${xName} at peak ${f(r.series.openingAtPeak_mm, 4, 'mm')}; W0 ${f(r.series.workOfFracture_Nmm, 1, 'N·mm')}`
      + (r.series.GF_Nmm ? `; GF ${f(r.series.GF_Nmm, 4, 'N/mm')}` : ''));
  }
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
  if (r.curves.mean) {
    const m = r.curves.mean;
    series.unshift({ label: '±1 SD of specimens', x: m.x, y: Float64Array.from(m.y, (v, i) => v - m.sd[i]!), y2: Float64Array.from(m.y, (v, i) => v + m.sd[i]!), style: 'band', color: PALETTE[PALETTE.length - 1] });
    series.push({ label: 'mean of specimens', x: m.x, y: m.y, style: 'dashed', color: PALETTE[PALETTE.length - 1] });
  }
  const p = r.prediction;
  return plotSvg({
    series, title: `${r.title}: prediction and measurements`,
    xLabel: r.xAxis === 'cmod' ? 'CMOD (mm)' : 'Load-point displacement (mm)', yLabel: 'Load (N)',
    marks: [{ x: p.openingAtPeak_mm, y: p.peak_N, label: `predicted peak ${p.peak_N.toFixed(0)} N` }],
  });
}

/** The comparison as JSON-ready data (curves left out). */
export function compareJson(r: CompareResult): Record<string, unknown> {
  return {
    format: 1, title: r.title, xAxis: r.xAxis, xAxisReason: r.xAxisReason, ligamentArea_mm2: r.ligamentArea_mm2,
    prediction: r.prediction, specimens: r.specimens, mean: r.mean, series: r.series, notes: r.notes,
  };
}
