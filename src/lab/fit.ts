// Calibration of E, ft and GF against a measured curve: physical estimates first (initial
// compliance, peak load, work of fracture), then Nelder–Mead on log-parameters over full
// simulations, run two at a time on worker threads.

import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import { parseDocument, isScalar } from 'yaml';
import type { CaseModel, Material, Softening } from '../case/model.js';
import type { PolyMesh } from '../mesh/polymesh.js';
import { buildDomain } from '../geometry/domain.js';
import { generateMesh } from '../mesh/generate.js';
import { prng } from '../mesh/prng.js';
import { InputError } from '../errors.js';
import { plotSvg, PALETTE, type Series } from '../output/plot.js';
import type { LabCurve } from './import.js';
import { rilemGF, workOfFracture } from './work.js';
import { curveDifference, interpAt, measuredFunction, monotone, peakIndex, thin, type Curve, type XAxis } from './compare.js';
import { simulateCurve, type SimCurve, type SimJob, type SimReply } from './fitworker.js';

export type FitParam = 'E' | 'ft' | 'GF';
export const FIT_PARAMS: readonly FitParam[] = ['E', 'ft', 'GF'];
const UNIT: Record<FitParam, string> = { E: 'MPa', ft: 'MPa', GF: 'N/mm' };

export interface FitOptions {
  params?: FitParam[];
  softening?: Softening;
  /** Far-field cell size of the fitting mesh (mm); tip size, refinement radius, growth step and averaging radius follow in proportion. */
  meshSize?: number;
  xAxis?: XAxis;
  /** Simulations allowed in all (estimates, simplex and Jacobian). */
  maxEvals?: number;
  /** Worker threads; 0 evaluates in this thread. At most the number of cores. */
  workers?: number;
  /** Control increments of each candidate run (default: the case's, at least six steps up to the measured peak). */
  increments?: number;
  onEval?: (e: FitEvaluation) => void;
}

export interface FitEvaluation {
  index: number;
  phase: 'elastic' | 'estimate' | 'simplex' | 'jacobian';
  E: number; ft: number; GF: number;
  /** RMSE of load over the measured range / measured peak; NaN for the elastic run. */
  objective: number;
  peak_N: number;
  status: SimCurve['status'];
  seconds: number;
}

export interface ParamRow {
  name: FitParam; unit: string;
  start: number; estimate: number; fitted: number;
  /** One standard deviation, relative, from the Jacobian at the optimum. */
  relStd: number;
  /** RMS change of the normalised load for a 10 % change of the parameter. */
  sensitivity10: number;
  wellDetermined: boolean;
}

export interface FitResult {
  caseName: string;
  labName: string;
  xAxis: XAxis;
  softening: Softening;
  params: FitParam[];
  material: { E: number; ft: number; GF: number };
  objective: number;
  startObjective: number;
  table: ParamRow[];
  correlation: number[][];
  warnings: string[];
  notes: string[];
  history: FitEvaluation[];
  evaluations: number;
  wallSeconds: number;
  workers: number;
  mesh: { size: number; tipSize: number; polygons: number };
  curves: { measured: Curve; start: Curve | null; fitted: Curve };
}

type Mat = { E: number; ft: number; GF: number };

/** Tiny pool of worker threads running one simulation each. */
class SimPool {
  private readonly idle: Worker[] = [];
  private readonly all: Worker[] = [];
  private readonly waiting: ((w: Worker) => void)[] = [];
  private next = 0;

  constructor(n: number, url: URL) {
    for (let i = 0; i < n; i++) { const w = new Worker(url); this.all.push(w); this.idle.push(w); }
  }

  private take(): Promise<Worker> {
    const w = this.idle.pop();
    return w ? Promise.resolve(w) : new Promise((res) => this.waiting.push(res));
  }

  private give(w: Worker): void {
    const q = this.waiting.shift();
    if (q) q(w); else this.idle.push(w);
  }

  async run(c: CaseModel, mesh: PolyMesh): Promise<SimCurve> {
    const w = await this.take();
    const id = this.next++;
    try {
      return await new Promise<SimCurve>((res, rej) => {
        const onMsg = (m: SimReply) => {
          if (m.id !== id) return;
          w.off('message', onMsg); w.off('error', onErr);
          if (m.ok) res(m.curve); else rej(new Error(m.error));
        };
        const onErr = (e: Error) => { w.off('message', onMsg); rej(e); };
        w.on('message', onMsg); w.once('error', onErr);
        w.postMessage({ id, c, mesh } satisfies SimJob);
      });
    } finally {
      this.give(w);
    }
  }

  async close(): Promise<void> { await Promise.all(this.all.map((w) => w.terminate())); }
}

/** Ligament area (mm²): from each notch tip straight ahead to the outline, times the thickness. */
export function ligamentArea(c: CaseModel): number {
  let lig = 0;
  for (const nt of c.geometry.notches) {
    const dx = nt.to[0] - nt.from[0], dy = nt.to[1] - nt.from[1], L = Math.hypot(dx, dy);
    const ux = dx / L, uy = dy / L, o = c.geometry.outline;
    let best = Infinity;
    for (let i = 0; i < o.length; i++) {
      const a = o[i]!, b = o[(i + 1) % o.length]!;
      const ex = b[0] - a[0], ey = b[1] - a[1], den = ux * ey - uy * ex;
      if (Math.abs(den) < 1e-12) continue;
      const wx = a[0] - nt.to[0], wy = a[1] - nt.to[1];
      const t = (wx * ey - wy * ex) / den, s = (wx * uy - wy * ux) / den;
      if (t > 1e-9 && s >= 0 && s <= 1) best = Math.min(best, t);
    }
    if (Number.isFinite(best)) lig += best;
  }
  return lig * c.thickness;
}

/**
 * Slope of load over opening on the rising branch between two fractions of the peak. At
 * small openings the opening is the noisier reading (a fraction of a micrometre against a few
 * micrometres), so the line is fitted as opening on load, which noise in the opening does not bias.
 */
export function initialStiffness(m: Curve, from = 0.05, to = 0.4): number {
  const k = peakIndex(m.y), P = m.y[k]!;
  let sx = 0, sy = 0, n = 0;
  for (let i = 0; i <= k; i++) if (m.y[i]! >= from * P && m.y[i]! <= to * P) { sx += m.x[i]!; sy += m.y[i]!; n++; }
  if (n < 3) {
    // too few points on the rising branch: the secant to the first point past the upper bound
    for (let i = 1; i <= k; i++) if (m.y[i]! >= to * P || i === k) return (m.y[i]! - m.y[0]!) / (m.x[i]! - m.x[0]!);
  }
  const mx = sx / n, my = sy / n;
  let syy = 0, sxy = 0;
  for (let i = 0; i <= k; i++) {
    if (m.y[i]! < from * P || m.y[i]! > to * P) continue;
    const dy = m.y[i]! - my;
    syy += dy * dy; sxy += (m.x[i]! - mx) * dy;
  }
  return syy / sxy;
}

/** The case each candidate runs: coarse mesh, no pictures, no probes, the control run to just past the measured range. */
export function candidateCase(c: CaseModel, measured: Curve, xAxis: XAxis, opt: Pick<FitOptions, 'meshSize' | 'softening' | 'increments'>): CaseModel {
  const k: CaseModel = structuredClone(c);
  const size = opt.meshSize ?? defaultFitMeshSize(c);
  if (!(size > 0)) throw new InputError(`--mesh-size must be a positive length in mm (found ${size})`);
  const f = size / c.mesh.size;
  k.mesh.size = size; k.mesh.tipSize = c.mesh.tipSize * f; k.mesh.refineRadius = c.mesh.refineRadius * f;
  if (k.crack) { k.crack.growthStep *= f; k.crack.averagingRadius *= f; }
  k.output = { ...k.output, frames: [], animation: 'none', vtk: false };
  k.probes = [];
  if (opt.softening) k.material.softening = opt.softening;
  const xmax = measured.x[measured.x.length - 1]!, xpeak = measured.x[peakIndex(measured.y)]!;
  if ((xAxis === 'cmod' && k.control.by === 'cmod') || (xAxis === 'displacement' && k.control.by === 'displacement')) {
    // the case's own target when it just covers the measured range (its steps are kept), else just past it
    const own = Math.abs(k.control.target);
    const target = own >= 0.99 * xmax && own <= 1.5 * xmax ? k.control.target : 1.02 * xmax * Math.sign(k.control.target || 1);
    // steps are even: at least six up to the measured peak, so the rising branch is resolved
    const scaled = Math.round((c.control.increments * Math.abs(target)) / Math.abs(k.control.target));
    k.control.increments = opt.increments ?? Math.max(5, scaled, xpeak > 0 ? Math.ceil((6 * Math.abs(target)) / xpeak) : 0);
    k.control.target = target;
  } else k.control.increments = opt.increments ?? c.control.increments;
  return k;
}

/** Coarse default: twice the case's cells, but no coarser than a fifth of the shorter side. */
function defaultFitMeshSize(c: CaseModel): number {
  let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity;
  for (const [x, y] of c.geometry.outline) { x0 = Math.min(x0, x); x1 = Math.max(x1, x); y0 = Math.min(y0, y); y1 = Math.max(y1, y); }
  return Math.max(c.mesh.size, Math.min(2 * c.mesh.size, Math.min(x1 - x0, y1 - y0) / 5));
}

/** The simulated curve against the chosen opening, x increasing; past its end the specimen carries nothing. */
export function simOpening(s: SimCurve, xAxis: XAxis): Curve {
  const x = xAxis === 'cmod' ? s.cmod : s.displacement;
  if (!x) throw new InputError('the case has no CMOD gauge, so a fit against CMOD is impossible: fit with --x displacement or add control.gauge');
  return monotone({ x, y: s.load });
}

/** Sim curve extended by zero load to hi, so a run that ended early is charged for the rest. */
function extendTo(s: Curve, hi: number): Curve {
  const n = s.x.length;
  if (n === 0) return { x: Float64Array.from([0, hi]), y: Float64Array.from([0, 0]) };
  const last = s.x[n - 1]!;
  if (last >= hi) return s;
  const x = new Float64Array(n + 2), y = new Float64Array(n + 2);
  x.set(s.x); y.set(s.y);
  x[n] = last + 1e-9 * Math.max(1, Math.abs(hi)); y[n] = 0; x[n + 1] = Math.max(hi, x[n]! * (1 + 1e-12)); y[n + 1] = 0;
  return { x, y };
}

/** RMSE of load over the measured range, over the measured peak. */
export function fitObjective(sim: Curve, measured: Curve): number {
  const lo = Math.max(measured.x[0]!, sim.x[0] ?? 0), hi = measured.x[measured.x.length - 1]!;
  const d = curveDifference(extendTo(sim, hi), measured, lo, hi);
  return d.rmse / measured.y[peakIndex(measured.y)]!;
}

/** Normalised residuals at the measured points (for the Jacobian). */
function residuals(sim: Curve, measured: Curve): Float64Array {
  const hi = measured.x[measured.x.length - 1]!, ext = extendTo(sim, hi), P = measured.y[peakIndex(measured.y)]!;
  const lo = Math.max(measured.x[0]!, sim.x[0] ?? 0);
  const out: number[] = [];
  for (let i = 0; i < measured.x.length; i++) {
    const x = measured.x[i]!;
    if (x < lo) continue;
    out.push((interpAt(ext, x) - measured.y[i]!) / P);
  }
  return Float64Array.from(out);
}

/** Area under a curve over [lo, hi] (zero past its end). */
function areaOver(c: Curve, lo: number, hi: number): number {
  const zero = { x: Float64Array.from([lo, hi]), y: Float64Array.from([0, 0]) };
  return curveDifference(extendTo(c, hi), zero, lo, hi).area;
}

/** Inverse of a small symmetric matrix by Gauss–Jordan; null when singular. */
function inverse(a: number[][]): number[][] | null {
  const n = a.length, m = a.map((r, i) => [...r, ...Array.from({ length: n }, (_, j) => (i === j ? 1 : 0))]);
  for (let c = 0; c < n; c++) {
    let p = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(m[r]![c]!) > Math.abs(m[p]![c]!)) p = r;
    const piv = m[p]![c]!;
    if (!(Math.abs(piv) > 1e-300)) return null;
    [m[c], m[p]] = [m[p]!, m[c]!];
    for (let j = 0; j < 2 * n; j++) m[c]![j]! /= piv;
    for (let r = 0; r < n; r++) if (r !== c) { const f = m[r]![c]!; for (let j = 0; j < 2 * n; j++) m[r]![j]! -= f * m[c]![j]!; }
  }
  return m.map((r) => r.slice(n));
}

/** Solve a small square system; null when singular. */
function solve(a: number[][], b: number[]): number[] | null {
  const inv = inverse(a);
  return inv ? inv.map((r) => r.reduce((s, v, j) => s + v * b[j]!, 0)) : null;
}

/** Fit the chosen material parameters of a case to a measured curve. */
export async function fitCase(c: CaseModel, lab: LabCurve, opt: FitOptions = {}): Promise<FitResult> {
  const t0 = performance.now();
  const params = [...new Set(opt.params ?? FIT_PARAMS)];
  if (params.length === 0) throw new InputError('--params names no parameter: choose from E, ft, GF');
  if (!c.crack && (params.includes('ft') || params.includes('GF'))) throw new InputError('the case has no crack section, so only E can be fitted (--params E)');
  if (c.crack?.model === 'lefm' && (params.includes('ft') || params.includes('GF'))) throw new InputError('crack.model lefm does not use ft or GF, so only E can be fitted (--params E)');
  const hasGauge = c.control.by === 'cmod' || c.control.gauge !== undefined;
  const xAxis: XAxis = opt.xAxis ?? (/disp|defl|stroke|travel/i.test(lab.xLabel) || !hasGauge ? 'displacement' : 'cmod');
  const measured = measuredFunction({ x: lab.x, y: lab.y });
  if (measured.x.length < 5) throw new InputError(`${lab.name}: only ${measured.x.length} points with increasing opening: a fit needs a curve of at least 5`);
  const Pm = measured.y[peakIndex(measured.y)]!;
  const notes: string[] = [], warnings: string[] = [];
  const base = candidateCase(c, measured, xAxis, opt);
  const softening = base.material.softening;
  const mesh = generateMesh(buildDomain(base), base.mesh);
  const polygons = mesh.cellStart.length - 1;
  notes.push(`fitting mesh: cells of ${base.mesh.size.toPrecision(3)} mm, ${base.mesh.tipSize.toPrecision(3)} mm at the tip (${polygons} polygons); check the fitted case at its own mesh with rupta run`);

  const wanted = Math.max(0, Math.floor(opt.workers ?? 2));
  const compiled = import.meta.url.endsWith('.js');
  const nWorkers = compiled ? Math.min(wanted, availableParallelism(), 2) : 0;
  const pool = nWorkers > 0 ? new SimPool(nWorkers, new URL('./fitworker.js', import.meta.url)) : null;
  const maxEvals = opt.maxEvals ?? 80;
  const history: FitEvaluation[] = [];
  const cache = new Map<string, { sim: SimCurve; curve: Curve; f: number }>();
  const matOf = (m: Mat, cc: CaseModel): CaseModel => ({ ...cc, material: { ...cc.material, E: m.E, ft: m.ft, GF: m.GF } as Material });
  const run = (k: CaseModel): Promise<SimCurve> => (pool ? pool.run(k, mesh) : simulateCurve(k, mesh));

  const evaluate = async (mats: Mat[], phase: FitEvaluation['phase']): Promise<{ sim: SimCurve; curve: Curve; f: number }[]> => {
    const keys = mats.map((m) => `${m.E.toPrecision(10)}|${m.ft.toPrecision(10)}|${m.GF.toPrecision(10)}`);
    const todo = [...new Set(keys.filter((k) => !cache.has(k)))];
    await Promise.all(todo.map(async (key) => {
      const m = mats[keys.indexOf(key)]!;
      const sim = await run(matOf(m, base));
      const curve = sim.load.length > 0 ? simOpening(sim, xAxis) : { x: new Float64Array(0), y: new Float64Array(0) };
      const f = sim.status === 'failed' || curve.x.length < 2 ? Infinity : fitObjective(curve, measured);
      cache.set(key, { sim, curve, f });
      const ev: FitEvaluation = { index: history.length + 1, phase, ...m, objective: f, peak_N: sim.load.length ? sim.load[peakIndex(sim.load)]! : NaN, status: sim.status, seconds: sim.seconds };
      history.push(ev);
      opt.onEval?.(ev);
    }));
    return keys.map((k) => cache.get(k)!);
  };

  try {
    const start: Mat = { E: c.material.E, ft: c.material.ft, GF: c.material.GF };
    const est: Mat = { ...start };

    // E: the elastic case once; its stiffness is proportional to E
    let km = NaN;
    if (params.includes('E')) {
      // the cracked case itself, one small step far below cracking: same mesh, same refinement at the tip
      const el: CaseModel = structuredClone(base);
      const xp = measured.x[peakIndex(measured.y)]!;
      el.control.target = Math.sign(el.control.target || 1) * 0.02 * (xp > 0 ? xp : Math.abs(el.control.target));
      el.control.increments = 1;
      const t1 = performance.now();
      const s = await run(el);
      const xs = xAxis === 'cmod' ? s.cmod : s.displacement;
      const ks = xs && xs.length > 1 ? s.load[1]! / xs[1]! : NaN;
      km = initialStiffness({ x: lab.x, y: lab.y });
      const ev: FitEvaluation = { index: history.length + 1, phase: 'elastic', ...start, objective: NaN, peak_N: NaN, status: s.status, seconds: (performance.now() - t1) / 1000 };
      history.push(ev); opt.onEval?.(ev);
      if (Number.isFinite(ks) && ks > 0 && km > 0) {
        est.E = start.E * (km / ks);
        notes.push(`E from the initial compliance (load between 5 and 40 % of the peak, rising branch): measured ${km.toPrecision(4)} N/mm, elastic run ${ks.toPrecision(4)} N/mm at E = ${start.E.toPrecision(4)} MPa`);
      } else notes.push('E: the initial slope could not be measured; kept from the case');
    }

    // GF from the work of fracture (load-point displacement only), then ft and GF by Broyden on (peak, work)
    // a noisy gauge may start a little below zero, where a simulated curve has no points
    const lo = Math.max(0, measured.x[0]!), hi = measured.x[measured.x.length - 1]!;
    const Wm = areaOver(measured, lo, hi);
    if (params.includes('GF') && xAxis === 'displacement') {
      const A = ligamentArea(c);
      if (A > 0) {
        est.GF = rilemGF(workOfFracture(lab.x, lab.y), A);
        notes.push(`GF start from the work of fracture over the ligament (${A.toFixed(0)} mm²): ${est.GF.toPrecision(3)} N/mm`);
      }
    }
    const sub = params.filter((p): p is 'ft' | 'GF' => p === 'ft' || p === 'GF');
    if (sub.length > 0) {
      let J: number[][] = sub.map((_, i) => sub.map((__, j) => (i === j ? 1 : 0))); // peak ∝ ft, work ∝ GF
      let x = sub.map((p) => Math.log(est[p]));
      let g: number[] | null = null, prevX = x;
      for (let it = 0; it < 5 && history.length < maxEvals; it++) {
        const m: Mat = { ...est };
        sub.forEach((p, i) => { m[p] = Math.exp(x[i]!); });
        const [r] = await evaluate([m], 'estimate');
        const Ps = r!.curve.y.length ? r!.curve.y[peakIndex(r!.curve.y)]! : 0;
        const Ws = r!.curve.x.length > 1 ? areaOver(r!.curve, lo, hi) : 0;
        if (!(Ps > 0) || !(Ws > 0)) break;
        const gn = sub.map((p) => (p === 'ft' ? Math.log(Ps / Pm) : Math.log(Ws / Wm)));
        Object.assign(est, m);
        // the model's rising branch bends before the peak as the faces at the notch take up
        // load, so E follows the slope measured the same way on the simulated curve
        const kr = params.includes('E') && km > 0 ? initialStiffness(r!.curve) : NaN;
        const eStep = kr > 0 ? Math.log(km / kr) : 0;
        if (kr > 0) est.E *= km / kr;
        if (gn.every((v) => Math.abs(v) < 0.005) && Math.abs(eStep) < 0.005) break;
        if (g) {
          // Broyden's update from the last step
          const dx = x.map((v, i) => v - prevX[i]!), dg = gn.map((v, i) => v - g![i]!);
          const dd = dx.reduce((s, v) => s + v * v, 0);
          if (dd > 0) J = J.map((row, i) => row.map((v, j) => v + ((dg[i]! - row.reduce((s, a, k) => s + a * dx[k]!, 0)) * dx[j]!) / dd));
        }
        const step = solve(J, gn.map((v) => -v));
        if (!step) break;
        const big = Math.max(...step.map(Math.abs));
        const scale = big > Math.log(1.5) ? Math.log(1.5) / big : 1;
        prevX = x;
        g = gn;
        x = x.map((v, i) => v + scale * step[i]!);
      }
      notes.push(`ft${sub.includes('GF') ? ' and GF' : ''} from the peak load ${Pm.toFixed(1)} N${sub.includes('GF') ? ` and the work ${Wm.toPrecision(4)} N·mm under the measured curve` : ''}${params.includes('E') && km > 0 ? ', E from the slope between 5 and 40 % of the peak on the simulated curves' : ''} (${history.filter((h) => h.phase === 'estimate').length} runs)`);
    }

    // Nelder–Mead on log-parameters from the best point so far
    const toMat = (v: number[]): Mat => { const m: Mat = { ...est }; params.forEach((p, i) => { m[p] = Math.exp(v[i]!); }); return m; };
    const [e0] = await evaluate([est], 'estimate');
    let best0 = { m: est, f: e0!.f };
    for (const h of history) if (h.phase !== 'elastic' && h.objective < best0.f) best0 = { m: { E: h.E, ft: h.ft, GF: h.GF }, f: h.objective };
    const x0 = params.map((p) => Math.log(best0.m[p]));
    const simplex: { x: number[]; f: number }[] = [{ x: x0, f: NaN }];
    for (let j = 0; j < params.length; j++) simplex.push({ x: x0.map((v, i) => (i === j ? v + 0.05 : v)), f: NaN });
    // the case's own values ride along for the report
    const fs = await evaluate([...simplex.map((s) => toMat(s.x)), start], 'simplex');
    simplex.forEach((s, i) => { s.f = fs[i]!.f; });
    const n = params.length;
    const at = (c0: number[], w: number[], t: number) => c0.map((v, i) => v + t * (v - w[i]!));
    let lastGood = true; // the last move went outward: speculate an expansion, else a contraction
    while (history.length < maxEvals) {
      simplex.sort((a, b) => a.f - b.f);
      const fb = simplex[0]!.f, fw = simplex[n]!.f, fsw = simplex[n - 1]!.f;
      const size = Math.max(...simplex.slice(1).map((s) => Math.max(...s.x.map((v, i) => Math.abs(v - simplex[0]!.x[i]!)))));
      if (size < 0.003 && fw - fb < 0.01 * fb + 1e-6) break;
      const cen = params.map((_, i) => simplex.slice(0, n).reduce((s, v) => s + v.x[i]!, 0) / n);
      const w = simplex[n]!.x;
      const xr = at(cen, w, 1), xe = at(cen, w, 2), xi = at(cen, w, -0.5);
      const spec = nWorkers > 1 ? [lastGood ? xe : xi] : [];
      const [rr, rs] = await evaluate([xr, ...spec].map(toMat), 'simplex');
      const fr = rr!.f;
      const known = (x: number[]) => (rs && spec[0] === x ? rs.f : null);
      if (fr < fb) {
        const fe = known(xe) ?? (await evaluate([toMat(xe)], 'simplex'))[0]!.f;
        simplex[n] = fe < fr ? { x: xe, f: fe } : { x: xr, f: fr };
        lastGood = true;
      } else if (fr < fsw) {
        simplex[n] = { x: xr, f: fr };
        lastGood = true;
      } else {
        lastGood = false;
        const outside = fr < fw;
        const xc = outside ? at(cen, w, 0.5) : xi;
        const fc = (!outside ? known(xi) : null) ?? (await evaluate([toMat(xc)], 'simplex'))[0]!.f;
        if (fc < (outside ? fr : fw)) simplex[n] = { x: xc, f: fc };
        else {
          const b = simplex[0]!.x;
          const shrunk = simplex.slice(1).map((s) => s.x.map((v, i) => b[i]! + 0.5 * (v - b[i]!)));
          const fsh = await evaluate(shrunk.map(toMat), 'simplex');
          shrunk.forEach((x, k) => { simplex[k + 1] = { x, f: fsh[k]!.f }; });
        }
      }
    }
    simplex.sort((a, b) => a.f - b.f);
    const xb = simplex[0]!.x, fit = toMat(xb), fbest = simplex[0]!.f;
    if (history.length >= maxEvals) warnings.push(`the optimiser stopped at the limit of ${maxEvals} simulations before the simplex had closed; the result may improve with a larger --max-evals`);

    // sensitivities and confidence from a forward-difference Jacobian at the optimum
    const h = Math.log(1.03);
    const bestSim = (await evaluate([fit], 'simplex'))[0]!;
    const r0 = residuals(bestSim.curve, measured);
    const jr = await evaluate(params.map((_, j) => toMat(xb.map((v, i) => (i === j ? v + h : v)))), 'jacobian');
    const cols = jr.map((r) => { const rj = residuals(r.curve, measured); return Float64Array.from(r0, (v, i) => ((rj[i] ?? v) - v) / h); });
    const N = r0.length, ssr = r0.reduce((s, v) => s + v * v, 0), s2 = ssr / Math.max(1, N - n);
    const JtJ = params.map((_, i) => params.map((__, j) => cols[i]!.reduce((s, v, k) => s + v * cols[j]![k]!, 0)));
    const cov = inverse(JtJ);
    const sd = params.map((_, i) => (cov && cov[i]![i]! > 0 ? Math.sqrt(s2 * cov[i]![i]!) : Infinity));
    const correlation = params.map((_, i) => params.map((__, j) => (cov ? cov[i]![j]! / Math.sqrt(cov[i]![i]! * cov[j]![j]!) : NaN)));
    notes.push('±95 %: from the Jacobian at the optimum, treating the residuals at the measured points as independent; the error of the model and of the fitting mesh is not in it');
    const table: ParamRow[] = params.map((p, i) => {
      const sens = Math.sqrt(JtJ[i]![i]! / N) * Math.log(1.1);
      const ok = sens > 0.002 && sd[i]! < 0.1;
      return { name: p, unit: UNIT[p], start: start[p], estimate: est[p], fitted: fit[p], relStd: sd[i]!, sensitivity10: sens, wellDetermined: ok };
    });
    for (const r of table) {
      if (r.sensitivity10 <= 0.002) warnings.push(`${r.name} is poorly determined: a 10 % change moves the curve by only ${(100 * r.sensitivity10).toFixed(2)} % of the peak`);
      else if (!(r.relStd < 0.1)) warnings.push(`${r.name} is poorly determined: its 95 % range is about ±${Number.isFinite(r.relStd) ? (196 * r.relStd).toFixed(0) : '∞'} %`);
    }
    const endFrac = measured.y[measured.y.length - 1]! / Pm;
    if (params.includes('GF') && endFrac > 0.2) warnings.push(`the test stopped at ${(100 * endFrac).toFixed(0)} % of the peak load, before the tail: GF is poorly determined (the work of the missing tail is unknown)`);
    for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) {
      if (Math.abs(correlation[i]![j]!) > 0.95) warnings.push(`${params[i]} and ${params[j]} are strongly correlated (${correlation[i]![j]!.toFixed(2)}): the curve fixes a combination of them better than each alone`);
    }
    if (fbest > 0.05) warnings.push(`the fitted curve still differs from the measured one by ${(100 * fbest).toFixed(1)} % of the peak (RMSE): the softening law or the case may not describe the test`);

    const startRun = history.find((e) => e.phase !== 'elastic' && e.E === start.E && e.ft === start.ft && e.GF === start.GF);
    const startCurve = startRun ? cache.get(`${start.E.toPrecision(10)}|${start.ft.toPrecision(10)}|${start.GF.toPrecision(10)}`)?.curve ?? null : null;
    return {
      caseName: c.name, labName: lab.name, xAxis, softening, params,
      material: fit, objective: fbest, startObjective: startRun?.objective ?? NaN,
      table, correlation, warnings, notes, history, evaluations: history.length,
      wallSeconds: (performance.now() - t0) / 1000, workers: nWorkers,
      mesh: { size: base.mesh.size, tipSize: base.mesh.tipSize, polygons },
      curves: { measured, start: startCurve, fitted: bestSim.curve },
    };
  } finally {
    await pool?.close();
  }
}

const sig = (v: number, d = 4): number => Number(v.toPrecision(d));

/** The case file text with the fitted material, comments kept, a header saying where the values came from. */
export function fittedCaseText(originalText: string, r: FitResult): string {
  const doc = parseDocument(originalText);
  const set = (key: string, value: number | string, note: string) => {
    doc.setIn(['material', key], value);
    const node = doc.getIn(['material', key], true);
    if (isScalar(node)) node.comment = node.comment?.trim() ? ` ${node.comment.trim()}, ${note}` : ` ${note}`;
  };
  for (const p of r.params) set(p, sig(r.material[p]), `fitted (was ${r.table.find((t) => t.name === p)!.start})`);
  set('softening', r.softening, 'law used in the fit');
  const head = [
    ` Fitted by rupta fit to the measured curve ${r.labName}`,
    ` (load against ${r.xAxis === 'cmod' ? 'CMOD' : 'load-point displacement'}; fitted ${r.params.join(', ')};`,
    ` RMSE ${(100 * r.objective).toFixed(2)} % of the measured peak, on a fitting mesh of ${r.mesh.size.toPrecision(3)} mm cells).`,
  ];
  if (r.warnings.length) head.push(' Warnings:', ...r.warnings.map((w) => `   ${w}`));
  doc.commentBefore = head.join('\n') + (doc.commentBefore ? '\n\n' + doc.commentBefore : '');
  return doc.toString({ flowCollectionPadding: false });
}

/** Parameter table and warnings as text. */
export function fitTable(r: FitResult): string {
  const head = ['param', 'unit', 'case', 'estimate', 'fitted', '±95 %', 'effect of 10 %', ''];
  const rows = r.table.map((t) => [t.name, t.unit, String(sig(t.start)), String(sig(t.estimate)), String(sig(t.fitted)),
    Number.isFinite(t.relStd) ? `${(196 * t.relStd).toFixed(1)} %` : '∞', `${(100 * t.sensitivity10).toFixed(2)} % of peak`, t.wellDetermined ? '' : 'poorly determined']);
  const w = head.map((h, j) => Math.max(h.length, ...rows.map((row) => row[j]!.length)));
  const line = (c: string[]) => c.map((s, j) => (j < 2 ? s.padEnd(w[j]!) : s.padStart(w[j]!))).join('  ').trimEnd();
  const out = [
    `${r.caseName} fitted to ${r.labName} (${r.softening} softening, load against ${r.xAxis === 'cmod' ? 'CMOD' : 'load-point displacement'})`,
    line(head), ...rows.map(line),
    `RMSE / measured peak: ${(100 * r.startObjective).toFixed(2)} % with the case values, ${(100 * r.objective).toFixed(2)} % fitted`,
    `${r.evaluations} simulations in ${r.wallSeconds.toFixed(1)} s on ${r.workers || 'no'} worker thread${r.workers === 1 ? '' : 's'}${r.workers ? '' : ' (in-process)'}`,
    ...r.notes.map((s) => `note: ${s}`),
    ...r.warnings.map((s) => `warning: ${s}`),
  ];
  return out.join('\n') + '\n';
}

/** Iteration history as CSV. */
export function fitHistoryCsv(r: FitResult): string {
  const rows = r.history.map((h) => [h.index, h.phase, sig(h.E, 8), sig(h.ft, 8), sig(h.GF, 8), Number.isFinite(h.objective) ? sig(h.objective, 6) : '', Number.isFinite(h.peak_N) ? sig(h.peak_N, 6) : '', h.status, sig(h.seconds, 4)].join(','));
  return ['evaluation,phase,E_MPa,ft_MPa,GF_Nmm,rmse_over_peak,peak_N,status,seconds', ...rows].join('\n') + '\n';
}

/** Overlay of the measured curve, the case's prediction and the fitted one. */
export function fitSvg(r: FitResult): string {
  const m = thin(r.curves.measured, 200);
  const series: Series[] = [{ label: `measured (${r.labName})`, x: m.x, y: m.y, style: 'points', color: PALETTE[1] }];
  if (r.curves.start) series.push({ label: 'case values', x: r.curves.start.x, y: r.curves.start.y, style: 'dashed', color: PALETTE[5] });
  series.push({ label: 'fitted', x: r.curves.fitted.x, y: r.curves.fitted.y, style: 'line', color: PALETTE[0] });
  const f = r.material;
  return plotSvg({
    series, title: `${r.caseName}: fit of ${r.params.join(', ')}`,
    xLabel: r.xAxis === 'cmod' ? 'CMOD (mm)' : 'Load-point displacement (mm)', yLabel: 'Load (N)',
    marks: [{ x: r.curves.fitted.x[peakIndex(r.curves.fitted.y)]!, y: r.curves.fitted.y[peakIndex(r.curves.fitted.y)]!, label: `E ${sig(f.E)} MPa, ft ${sig(f.ft, 3)} MPa, GF ${sig(f.GF, 3)} N/mm` }],
  });
}

/** The fit as JSON-ready data (curves left out). */
export function fitJson(r: FitResult): Record<string, unknown> {
  const { curves: _c, history: _h, ...rest } = r;
  return { format: 1, ...rest };
}

export interface SyntheticOptions {
  seed?: number;
  /** Standard deviation of the load noise (N) and of the opening noise (mm). */
  loadNoise_N?: number;
  xNoise_mm?: number;
  points?: number;
  xName?: string;
  header?: string[];
}

/**
 * A made-up measurement as a testing machine would export it: a header block, ";" between
 * fields, decimal commas, µm and kN, points evenly spaced in opening, seeded Gaussian noise.
 */
export function syntheticLabText(c: Curve, opt: SyntheticOptions = {}): string {
  const rand = prng(opt.seed ?? 1);
  const gauss = () => { const u = Math.max(rand(), 1e-12), v = rand(); return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v); };
  const mono = monotone(c), n = opt.points ?? 400;
  const x0 = mono.x[0]!, x1 = mono.x[mono.x.length - 1]!;
  const dec = (v: number, d: number) => v.toFixed(d).replace('.', ',');
  const lines = [...(opt.header ?? []), `Time [s];${opt.xName ?? 'CMOD'} [µm];Load [kN]`];
  for (let i = 0; i < n; i++) {
    const x = Math.min(x1, x0 + ((x1 - x0) * i) / (n - 1));
    const y = interpAt(mono, x);
    const xn = x + (i > 0 ? (opt.xNoise_mm ?? 0) * gauss() : 0), yn = y + (i > 0 ? (opt.loadNoise_N ?? 0) * gauss() : 0);
    lines.push(`${dec(0.5 * i, 1)};${dec(1000 * xn, 2)};${dec(yn / 1000, 5)}`);
  }
  return lines.join('\r\n') + '\r\n';
}
