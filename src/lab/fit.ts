// Calibration of E, ft and GF against a measured curve. A cohesive fit of two or three
// parameters searches l_ch = E·GF/ft² alone, each simulated curve taking its best exact
// scaling without a run (fitscale.ts); otherwise physical estimates (initial compliance, peak
// load, work of fracture), then Nelder–Mead on log-parameters over full simulations. Runs go
// two at a time on worker threads.

import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import { parseDocument, isScalar } from 'yaml';
import type { CaseModel, Material, Softening } from '../case/model.js';
import type { PolyMesh } from '../mesh/polymesh.js';
import { buildDomain } from '../geometry/domain.js';
import { generateMesh } from '../mesh/generate.js';
import { prng } from '../mesh/prng.js';
import { InputError } from '../errors.js';
import { sha256 } from '../version.js';
import { plotSvg, PALETTE, type Series } from '../output/plot.js';
import type { LabCurve } from './import.js';
import { rilemGF, workOfFracture } from './work.js';
import { correctCurve, estimateCompliance, type Corrections } from './correct.js';
import { chooseAxis, curveDifference, initialStiffness, interpAt, meanCurve, specimenLabels, measuredFunction, monotone, peakIndex, thin, type Curve, type XAxis } from './compare.js';
import { simulateCurve, type SimCurve, type SimJob, type SimReply } from './fitworker.js';
import { SHAPE_WEIGHT, nelderMead, parabolaAt, parabolaVertex, scaledCurve, scaledMaterial, scalingDirections, shapeOf } from './fitscale.js';

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
  /** Several measured curves: fitted all together (default) or their mean curve. */
  series?: 'all' | 'mean';
  /** Preload, machine compliance and toe corrections of the measured curves. */
  corrections?: Corrections;
  /**
   * The CMOD reading of each measured curve's test (same order): the machine compliance in its
   * crosshead reading is then estimated from the initial slopes against the case's elastic run
   * (as compare --compliance estimate does) and taken out before the fit.
   */
  complianceFrom?: (Curve | null)[];
  /** Wall-clock limit of one simulation (s); default 8 × the median so far, at least 30 s (600 s for the first). */
  simTimeout_s?: number;
  /** Extra mesh seeds run at the optimum for the model's own scatter in the ±95 % ranges (default 2). */
  seeds?: number;
  /** Polled before every simulation: true ends the fit with the best so far (status interrupted). */
  stopRequested?: () => boolean;
  onEval?: (e: FitEvaluation) => void;
  /**
   * Called once the inputs are checked, before the first simulation, with what the fit's
   * course depends on (a resumed fit must find the same).
   */
  onStart?: (setup: FitSetup) => void;
  /** Called with every simulation run (not those taken from `replay`), numbered from 1 in the order they were started. */
  onSimulation?: (s: StoredSimulation) => void;
  /**
   * Simulations of an earlier, interrupted start of the same fit, by number: one whose
   * candidate matches is taken as it is instead of being run again, so the optimiser retraces
   * its course exactly and goes on from where the earlier start stopped.
   */
  replay?: ReadonlyMap<number, StoredSimulation>;
}

/** One simulation of a fit as kept for a resume: its number, the SHA-256 of the candidate case, its curve. */
export interface StoredSimulation { n: number; key: string; sim: SimCurve }

/** What a fit's course depends on: the case, the measured curves (SHA-256 each) and the options that steer it. */
export interface FitSetup {
  caseHash: string;
  labHash: string;
  options: Record<string, unknown>;
}

export interface FitEvaluation {
  index: number;
  phase: 'elastic' | 'estimate' | 'simplex' | 'shape' | 'fitted' | 'jacobian' | 'seed';
  E: number; ft: number; GF: number;
  /** RMSE of load over the measured range / measured peak; NaN for the elastic run. */
  objective: number;
  peak_N: number;
  status: SimCurve['status'] | 'timed out';
  seconds: number;
  /** Simulations started so far, and the limit. */
  count: number;
  limit: number;
  /** Best objective so far and its values. */
  best: number;
  bestMaterial: { E: number; ft: number; GF: number };
}

export interface ParamRow {
  name: FitParam; unit: string;
  start: number; estimate: number; fitted: number;
  /** One standard deviation, relative: the Jacobian's at the optimum combined with the model's scatter over mesh seeds. */
  relStd: number;
  /** The model's share: relative SD of the parameter over mesh seeds (NaN when not measured). */
  relStdModel: number;
  /** RMS change of the normalised load for a 10 % change of the parameter. */
  sensitivity10: number;
  wellDetermined: boolean;
}

export interface FitResult {
  /** fitted: the optimiser closed; limit: --max-evals came first; interrupted: a signal; failed: no fit. */
  status: 'fitted' | 'limit' | 'interrupted' | 'failed';
  reason: string;
  caseName: string;
  labName: string;
  labNames: string[];
  series: 'all' | 'mean' | null;
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
  maxEvals: number;
  wallSeconds: number;
  workers: number;
  mesh: { size: number; tipSize: number; polygons: number };
  /** Machine compliance taken out of each measured curve (mm/N; given, estimated or none), in --lab order. */
  compliance: { mm_per_N: number; estimated: boolean }[];
  curves: { measured: Curve; specimens: Curve[]; start: Curve | null; fitted: Curve };
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

  async run(c: CaseModel, mesh: PolyMesh, timeLimit_s: number): Promise<SimCurve> {
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
        w.postMessage({ id, c, mesh, timeLimit_s } satisfies SimJob);
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

export { initialStiffness };

/** The case each candidate runs: coarse mesh, no pictures, no probes, the control run to just past the measured range. */
export function candidateCase(c: CaseModel, measured: Curve, xAxis: XAxis, opt: Pick<FitOptions, 'meshSize' | 'softening' | 'increments'>, reach = 0): CaseModel {
  const k: CaseModel = structuredClone(c);
  const size = opt.meshSize ?? c.mesh.size;
  if (!(size > 0) || !Number.isFinite(size)) throw new InputError(`--mesh-size must be a positive length in mm (found ${size})`);
  const side = shorterSide(c);
  if (size > side / 2) throw new InputError(`--mesh-size ${size} mm is more than half the specimen's shorter side (${side} mm): expected a cell size in mm well below it`);
  if (size < c.mesh.size / 20) throw new InputError(`--mesh-size ${size} mm is under a twentieth of the case's cells (${c.mesh.size} mm): every simulation of the fit would take hours; expected at least ${c.mesh.size / 20} mm`);
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
    // a reach past the measured end at the same step size, so a curve scaled to shorter openings still covers it
    const more = Math.ceil(reach * k.control.increments);
    if (more > 0) { k.control.target = (target * (k.control.increments + more)) / k.control.increments; k.control.increments += more; }
  } else k.control.increments = opt.increments ?? c.control.increments;
  return k;
}

/** The shorter side of the outline's bounding box (mm). */
function shorterSide(c: CaseModel): number {
  let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity;
  for (const [x, y] of c.geometry.outline) { x0 = Math.min(x0, x); x1 = Math.max(x1, x); y0 = Math.min(y0, y); y1 = Math.max(y1, y); }
  return Math.min(x1 - x0, y1 - y0);
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

/** Physical ranges of the fitted parameters (and at most a factor 30 from the case's values). */
export const PARAM_BOUNDS: Record<FitParam, [number, number]> = { E: [10, 1e6], ft: [0.01, 200], GF: [1e-4, 20] };

/** How far past the measured end (a fraction) the shape search runs each candidate, so its curve may be scaled to shorter openings. */
const REACH = 0.15;
/** The shape search closes once its next guess of log l_ch is this close to the best one. */
const SHAPE_TOL = 0.004;
/** … or once the parabola through the best three promises less than this fraction of the best RMSE. */
const SHAPE_GAIN = 0.003;
/** … once the best three lie within this span of log l_ch (a wider parabola is too rough a model to stop on). */
const SHAPE_NARROW = 0.2;

/** Why a fit ended before its optimiser had closed. */
class FitStop extends Error {
  constructor(readonly kind: 'limit' | 'interrupted') { super(kind); }
}

/** Fit the chosen material parameters of a case to one measured curve or a series of them. */
export async function fitCase(c: CaseModel, labIn: LabCurve | LabCurve[], opt: FitOptions = {}): Promise<FitResult> {
  const t0 = performance.now();
  const labs = Array.isArray(labIn) ? labIn : [labIn];
  if (labs.length === 0) throw new InputError('--lab names no measured curve: give at least one');
  const params = [...new Set(opt.params ?? FIT_PARAMS)];
  if (params.length === 0) throw new InputError('--params names no parameter: choose from E, ft, GF');
  if (!c.crack && (params.includes('ft') || params.includes('GF'))) throw new InputError('the case has no crack section, so only E can be fitted (--params E)');
  if (c.crack?.model === 'lefm' && (params.includes('ft') || params.includes('GF'))) throw new InputError('crack.model lefm does not use ft or GF, so only E can be fitted (--params E)');
  const maxEvals = opt.maxEvals ?? 80;
  if (!(Number.isInteger(maxEvals) && maxEvals >= 1)) throw new InputError(`--max-evals must be a whole number of simulations, 1 or more (found ${maxEvals})`);
  if (opt.increments !== undefined && !(Number.isInteger(opt.increments) && opt.increments >= 2 && opt.increments <= 5000)) {
    throw new InputError(`--increments must be a whole number of control steps from 2 to 5000 (found ${opt.increments})`);
  }
  const hasGauge = c.control.by === 'cmod' || c.control.gauge !== undefined;
  const { xAxis, reason: axisReason } = chooseAxis(hasGauge, labs, opt.xAxis, 'the case');
  const notes: string[] = [`load against ${xAxis === 'cmod' ? 'CMOD' : 'load-point displacement'}: ${axisReason}`], warnings: string[] = [];
  const labels = specimenLabels(labs);

  // the measured curves, corrected, as functions of the opening (again once an estimated compliance is known)
  const estimating = opt.complianceFrom !== undefined;
  if (estimating) {
    if (xAxis !== 'displacement') throw new InputError('--compliance estimate applies to a crosshead (load-point displacement) curve, but the fit is against CMOD, which needs no compliance: leave --compliance out');
    if (!hasGauge) throw new InputError('--compliance estimate needs the predicted CMOD, and the case has no gauge: add control.gauge, or give the compliance in mm/kN');
    labs.forEach((l, i) => { if (!opt.complianceFrom![i]) throw new InputError(`--compliance estimate needs a CMOD column beside the displacement in ${l.name}, and it has none: give the compliance in mm/kN instead`); });
  }
  let compliance = labs.map(() => ({ mm_per_N: opt.corrections?.compliance_mm_per_N ?? 0, estimated: false }));
  let curvesIn: Curve[] = [], mean: Curve | null = null, targets: Curve[] = [], measured: Curve = { x: new Float64Array(0), y: new Float64Array(0) }, Pm = 0;
  const series = opt.series ?? 'all';
  const correctAll = (say: boolean): void => {
    curvesIn = labs.map((l, i) => {
      const r = correctCurve({ x: l.x, y: l.y }, { ...opt.corrections, compliance_mm_per_N: compliance[i]!.mm_per_N }, xAxis === 'displacement');
      if (say) notes.push(...r.notes.map((t) => `${labels[i]}: ${t}`));
      return r.curve;
    });
    mean = labs.length > 1 ? meanCurve(curvesIn) : null;
    targets = series === 'mean' && mean ? [mean] : curvesIn.map(measuredFunction);
    for (const [i, m] of targets.entries()) {
      if (m.x.length < 5) throw new InputError(`${series === 'mean' && mean ? 'the mean curve' : labs[i]!.name}: only ${m.x.length} points with increasing opening: a fit needs a curve of at least 5`);
    }
    // estimates come from the mean curve of a series (or the one curve)
    measured = mean ? measuredFunction(mean) : targets[0]!;
    Pm = measured.y[peakIndex(measured.y)]!;
  };
  correctAll(!estimating);
  if (labs.length > 1) notes.push(series === 'mean' ? `fitted to the mean curve of ${labs.length} specimens (${labels.join(', ')})` : `fitted to all ${labs.length} specimens together (${labels.join(', ')}): the objective is the RMS of their RMSEs`);

  // a load far from anything the case can carry is a unit slip, not a measurement
  const A = ligamentArea(c);
  const Pref = c.material.ft * (A > 0 ? A : c.thickness * 10);
  if (Pm > 10 * Pref || Pm < 1e-3 * Pref) {
    throw new InputError(`the measured peak load ${Pm.toPrecision(3)} N is ${Pm > Pref ? `${(Pm / Pref).toPrecision(2)} times` : `1/${(Pref / Pm).toPrecision(2)} of`} ft × ligament area of the case (${Pref.toPrecision(3)} N): expected a load in N within a factor 10 above or 1000 below it; check the load unit (--load-unit) or the case`);
  }

  // a cohesive fit of two or three parameters searches l_ch alone and scales each simulated curve (fitscale.ts)
  const shapeSearch = c.crack !== undefined && c.crack.model !== 'lefm' && c.material.strengthField === undefined && params.length >= 2;
  let base = candidateCase(c, measured, xAxis, opt, shapeSearch ? REACH : 0);
  const softening = base.material.softening;
  const mesh = generateMesh(buildDomain(base), base.mesh);
  const polygons = mesh.cellStart.length - 1;
  notes.push(base.mesh.size === c.mesh.size
    ? `fitted on the case's own mesh: cells of ${base.mesh.size.toPrecision(3)} mm, ${base.mesh.tipSize.toPrecision(3)} mm at the tip (${polygons} polygons)`
    : `fitting mesh: cells of ${base.mesh.size.toPrecision(3)} mm, ${base.mesh.tipSize.toPrecision(3)} mm at the tip (${polygons} polygons), not the case's ${c.mesh.size} mm; check the fitted case at its own mesh with rupta run`);

  const wanted = Math.max(0, Math.floor(opt.workers ?? 2));
  const compiled = import.meta.url.endsWith('.js');
  const nWorkers = compiled ? Math.min(wanted, availableParallelism(), 2) : 0;
  // the number of threads steers the course too: with two, the simplex tries a second candidate at once
  opt.onStart?.({
    caseHash: sha256(JSON.stringify(c)),
    labHash: sha256(JSON.stringify(targets.map((t) => [Array.from(t.x), Array.from(t.y)]))),
    options: {
      params, softening, xAxis, series, corrections: opt.corrections ?? {}, meshSize: base.mesh.size, increments: base.control.increments,
      maxEvals, seeds: Math.max(0, Math.floor(opt.seeds ?? 2)), simTimeout: opt.simTimeout_s ?? null, threads: nWorkers,
    },
  });
  const pool = nWorkers > 0 ? new SimPool(nWorkers, new URL('./fitworker.js', import.meta.url)) : null;
  const history: FitEvaluation[] = [];
  const cache = new Map<string, { sim: SimCurve; curve: Curve; f: number }>();
  const matOf = (m: Mat, cc: CaseModel): CaseModel => ({ ...cc, material: { ...cc.material, E: m.E, ft: m.ft, GF: m.GF } as Material });
  const start: Mat = { E: c.material.E, ft: c.material.ft, GF: c.material.GF };
  const lo: Mat = { ...start }, hi: Mat = { ...start };
  for (const p of FIT_PARAMS) { lo[p] = Math.max(PARAM_BOUNDS[p][0], start[p] / 30); hi[p] = Math.min(PARAM_BOUNDS[p][1], start[p] * 30); }
  const inside = (m: Mat): boolean => params.every((p) => m[p] >= lo[p] && m[p] <= hi[p]);
  const clamp = (m: Mat): Mat => { const o = { ...m }; for (const p of params) o[p] = Math.min(hi[p], Math.max(lo[p], o[p])); return o; };

  // every simulation counts against the limit; each has a time limit
  // the optimiser leaves room for the sensitivities (one run per parameter) and the mesh seeds
  const seeds = Math.max(0, Math.floor(opt.seeds ?? 2));
  // (the shape search: the run at the fitted values and one with l_ch moved)
  const reserve = (shapeSearch ? 2 : params.length) + seeds;
  let phaseLimit = maxEvals - reserve >= (shapeSearch ? 3 : params.length + 4) ? maxEvals - reserve : maxEvals;
  let sims = 0, best: { m: Mat; f: number } = { m: start, f: Infinity };
  const times: number[] = [];
  const timeLimit = (): number => opt.simTimeout_s ?? (times.length === 0 ? 600 : Math.max(30, 8 * [...times].sort((a, b) => a - b)[times.length >> 1]!));
  const simulate = async (k: CaseModel, m: PolyMesh = mesh): Promise<SimCurve> => {
    if (opt.stopRequested?.()) throw new FitStop('interrupted');
    if (sims >= phaseLimit) throw new FitStop('limit');
    const n = ++sims;
    const key = sha256(JSON.stringify(k));
    const kept = opt.replay?.get(n);
    let s: SimCurve;
    if (kept && kept.key === key) s = kept.sim;
    else {
      const limit = timeLimit();
      s = pool ? await pool.run(k, m, limit) : await simulateCurve(k, m, limit);
      opt.onSimulation?.({ n, key, sim: s });
    }
    if (s.status !== 'failed' && s.reason !== 'time limit') times.push(s.seconds);
    return s;
  };
  const record = (ev: Omit<FitEvaluation, 'index' | 'best' | 'bestMaterial' | 'limit' | 'count'>): void => {
    if (Number.isFinite(ev.objective) && ev.objective < best.f && ev.phase !== 'seed') best = { m: { E: ev.E, ft: ev.ft, GF: ev.GF }, f: ev.objective };
    const full: FitEvaluation = { ...ev, index: history.length + 1, count: sims, limit: maxEvals, best: best.f, bestMaterial: { ...best.m } };
    history.push(full);
    opt.onEval?.(full);
  };
  const objective = (curve: Curve): number => {
    // the RMS over the specimens of each one's RMSE over its own peak
    let s = 0;
    for (const t of targets) { const f = fitObjective(curve, t); s += f * f; }
    return Math.sqrt(s / targets.length);
  };
  const keyOf = (m: Mat): string => `${m.E.toPrecision(10)}|${m.ft.toPrecision(10)}|${m.GF.toPrecision(10)}`;
  const outside = { sim: { status: 'failed', reason: 'outside the parameter bounds', load: new Float64Array(0), displacement: new Float64Array(0), cmod: null, seconds: 0 } as SimCurve, curve: { x: new Float64Array(0), y: new Float64Array(0) }, f: Infinity };

  type Run = { sim: SimCurve; curve: Curve; f: number };
  // called with every simulation run or replayed, before its row is recorded (the shape search scales it there)
  let onRun: ((m: Mat, r: Run) => void) | null = null;
  const evaluate = async (mats: Mat[], phases: FitEvaluation['phase'] | FitEvaluation['phase'][], on: CaseModel = base): Promise<Run[]> => {
    // runs of another control target (the shape search's scaled steps) are kept apart
    const keys = mats.map((m) => (on === base ? keyOf(m) : `${keyOf(m)}@${on.control.target.toPrecision(12)}`));
    const todo = [...new Set(keys.filter((k, i) => !cache.has(k) && inside(mats[i]!)))];
    // all started at once (on the threads), taken up in the order they were started, so the
    // history and the optimiser's course do not depend on which thread finished first
    const started = todo.map((key) => { const p = simulate(matOf(mats[keys.indexOf(key)]!, on)); p.catch(() => {}); return p; });
    let stop: unknown = null;
    for (let i = 0; i < todo.length; i++) {
      let sim: SimCurve;
      try { sim = await started[i]!; } catch (e) { stop ??= e; continue; }
      const m = mats[keys.indexOf(todo[i]!)]!;
      const curve = sim.load.length > 0 ? simOpening(sim, xAxis) : { x: new Float64Array(0), y: new Float64Array(0) };
      const f = sim.status === 'failed' || sim.reason === 'time limit' || curve.x.length < 2 ? Infinity : objective(curve);
      cache.set(todo[i]!, { sim, curve, f });
      onRun?.(m, { sim, curve, f });
      const phase = typeof phases === 'string' ? phases : phases[keys.indexOf(todo[i]!)]!;
      record({ phase, ...m, objective: f, peak_N: sim.load.length ? sim.load[peakIndex(sim.load)]! : NaN, status: sim.reason === 'time limit' ? 'timed out' : sim.status, seconds: sim.seconds });
    }
    if (stop) throw stop;
    return keys.map((k) => cache.get(k) ?? outside);
  };

  // the shape search: each simulated curve takes its best exact scaling (fitscale.ts)
  // a shape: the run at one l_ch and its best scaling (loads × e^lb, openings × e^ll)
  type Shape = { s: number; m: Mat; f: number; curve: Curve; lb: number; ll: number };
  const shapes = new Map<string, Shape>();
  let shapeBest: Shape | null = null;
  const dirs = scalingDirections(params);
  const ps: FitParam = params.includes('GF') ? 'GF' : params.includes('E') ? 'E' : 'ft';
  const xEnd = (): number => Math.max(...targets.map((t) => t.x[t.x.length - 1]!));
  const scaleFit = (m: Mat, r: Run): Shape => {
    const s = shapeOf(m);
    if (!Number.isFinite(r.f)) return { s, m, f: Infinity, curve: r.curve, lb: 0, ll: 0 };
    // a run that reached its target says nothing past it: its scaled curve must still cover the measured range
    const reached = r.sim.reason === 'control target reached' ? r.curve.x[r.curve.x.length - 1]! : Infinity, end = xEnd();
    const factors = (t: number[]): [number, number] => { let lb = 0, ll = 0; dirs.forEach(([db, dl], j) => { lb += t[j]! * db; ll += t[j]! * dl; }); return [lb, ll]; };
    const F = (t: number[]): number => {
      const [lb, ll] = factors(t);
      if (!inside(scaledMaterial(m, lb, ll)) || reached * Math.exp(ll) < end) return Infinity;
      return objective(scaledCurve(r.curve, lb, ll));
    };
    let o = nelderMead(F, dirs.map(() => 0), 0.05, 1e-4);
    o = nelderMead(F, o.x, 0.01, 1e-5);
    if (!(o.f < r.f)) return { s, m, f: r.f, curve: r.curve, lb: 0, ll: 0 };
    const [lb, ll] = factors(o.x);
    return { s, m: scaledMaterial(m, lb, ll), f: o.f, curve: scaledCurve(r.curve, lb, ll), lb, ll };
  };
  // the runs at the fitted values take the control steps of the scaled curve (its target scaled
  // as the control quantity is), so they reproduce it exactly rather than with other step sizes
  let post = base;
  const scaledSteps = (sb: Shape | null): CaseModel => {
    if (!sb || keyOf(sb.m) !== keyOf(fit) || (sb.lb === 0 && sb.ll === 0)) return base;
    const k: CaseModel = { ...base, control: { ...base.control } };
    k.control.target *= Math.exp(k.control.by === 'force' ? sb.lb : sb.ll);
    return k;
  };
  const searchShapes = async (): Promise<void> => {
    onRun = (m, r) => {
      const sh = scaleFit(m, r);
      shapes.set(keyOf(m), sh);
      if (sh.f < (shapeBest?.f ?? Infinity)) shapeBest = sh;
      if (sh.f < best.f) best = { m: sh.m, f: sh.f };
    };
    const scaleAll = onRun;
    const run = async (ms: Mat[], phase: FitEvaluation['phase']): Promise<void> => {
      const rs = await evaluate(ms, phase);
      // runs taken from the cache (the compliance estimate's run of the case) are scaled here
      ms.forEach((m, i) => { if (!shapes.has(keyOf(m))) scaleAll(m, rs[i]!); });
    };
    // the case's own values first: their best scaling is the estimate
    await run([start], 'estimate');
    const first = shapes.get(keyOf(start))!;
    if (Number.isFinite(first.f)) for (const p of params) est[p] = first.m[p];
    let span = Math.log(1.3), rounds = 0;
    // a material of shape s: the best so far moved along one parameter (GF, else E, else ft)
    const at = (from: Shape, s: number): Mat => { const m = { ...from.m }; m[ps] *= Math.exp((s - from.s) / SHAPE_WEIGHT[ps]); return clamp(m); };
    for (; rounds < 10; rounds++) {
      const pts = [...shapes.values()].filter((p) => Number.isFinite(p.f)).sort((a, b) => a.s - b.s);
      if (pts.length === 0) break;
      let ib = 0;
      pts.forEach((p, i) => { if (p.f < pts[ib]!.f) ib = i; });
      const B = pts[ib]!;
      let props: number[];
      if (pts.length === 1) props = [B.s - span, B.s + span];
      else if (ib === 0 || ib === pts.length - 1) {
        // not bracketed yet: step outward, further each time
        const dir = ib === 0 ? -1 : 1, nb = pts[ib === 0 ? 1 : ib - 1]!;
        span = Math.max(span, Math.abs(B.s - nb.s));
        props = [B.s + dir * span, B.s + dir * 2.5 * span];
      } else {
        const L = pts[ib - 1]!, R = pts[ib + 1]!;
        const v0 = parabolaVertex([L.s, L.f], [B.s, B.f], [R.s, R.f]);
        const v = v0 === null ? (B.s - L.s > R.s - B.s ? 0.5 * (L.s + B.s) : 0.5 * (B.s + R.s)) : Math.min(R.s, Math.max(L.s, v0));
        if (Math.abs(v - B.s) < SHAPE_TOL || R.s - L.s < 3 * SHAPE_TOL) break;
        // nor when the parabola promises under SHAPE_GAIN of the RMSE (the growth events make it noisy below that)
        if (v0 !== null && R.s - L.s < SHAPE_NARROW && B.f - parabolaAt([L.s, L.f], [B.s, B.f], [R.s, R.f], v) < SHAPE_GAIN * B.f) break;
        // the vertex and a point past it, so that it is bracketed closely by the next round
        const h = Math.max(SHAPE_TOL, 0.5 * Math.abs(v - B.s));
        props = [v, v + Math.sign(v - B.s) * h];
      }
      const ms = props.map((s) => at(B, s)).filter((m) => pts.every((p) => Math.abs(shapeOf(m) - p.s) > 0.5 * SHAPE_TOL));
      if (ms.length === 0) break;
      await run(ms, 'shape');
    }
    const b = shapeBest ?? { s: shapeOf(start), m: start, f: Infinity, curve: { x: new Float64Array(0), y: new Float64Array(0) }, lb: 0, ll: 0 };
    const n = history.filter((h) => h.phase === 'estimate' || h.phase === 'shape').length;
    notes.push(`${params.join(', ')}: l_ch = E·GF/ft² searched over ${n} simulated curves, each scaled to its best fit without a run (at fixed l_ch, loads scale exactly with ft and openings with GF/ft)`);
    fit = b.m; fbest = b.f; xb = params.map((p) => Math.log(fit[p]));
  };
  // the sensitivities of the shape search: one run with l_ch moved (GF, else E, else ft), the
  // rest by scaling the run at the fitted values; that run replaces the scaled curve
  const shapeJacobian = async (h: number): Promise<{ r0: Float64Array; cols: Float64Array[] }> => {
    onRun = null;
    post = scaledSteps(shapeBest as Shape | null);
    const moved = { ...fit };
    moved[ps] *= Math.exp(inside({ ...fit, [ps]: fit[ps] * Math.exp(h) }) ? h : -h);
    const hp = Math.log(moved[ps] / fit[ps]);
    const [rf, rj] = await evaluate([fit, moved], ['fitted', 'jacobian'], post);
    if (Number.isFinite(rf!.f)) { bestCurve = rf!.curve; fbest = rf!.f; }
    const r0 = residualsAll(bestCurve!, targets);
    const diff = (c: Curve, step: number) => { const r = residualsAll(c, targets); return Float64Array.from(r0, (v, i) => ((r[i] ?? v) - v) / step); };
    const colS = diff(rj!.curve, hp);
    const cols = params.map((p) => {
      if (p === ps) return colS;
      // e_p = (w_p / w_ps)·e_ps + a direction of fixed l_ch, whose change of the curve is a scaling
      const k = SHAPE_WEIGHT[p] / SHAPE_WEIGHT[ps];
      const v = { E: 0, ft: 0, GF: 0 }; v[p] = 1; v[ps] -= k;
      const lb = v.ft, ll = v.GF - v.ft, sg = ll < 0 ? -1 : 1; // openings scaled up, so the curve still covers the range
      const col = diff(scaledCurve(bestCurve!, sg * h * lb, sg * h * ll), sg * h);
      return Float64Array.from(col, (x, i) => x + k * colS[i]!);
    });
    return { r0, cols };
  };

  let status: FitResult['status'] = 'fitted', reason = '';
  const est: Mat = { ...start };
  let fit: Mat = start, fbest = Infinity, xb: number[] = [];
  let table: ParamRow[] = params.map((p) => ({ name: p, unit: UNIT[p], start: start[p], estimate: start[p], fitted: start[p], relStd: NaN, relStdModel: NaN, sensitivity10: NaN, wellDetermined: false }));
  let correlation: number[][] = params.map(() => params.map(() => NaN));
  let bestCurve: Curve | null = null;
  const toMat = (v: number[]): Mat => { const m: Mat = { ...est }; params.forEach((p, i) => { m[p] = Math.exp(v[i]!); }); return m; };
  try {
    try {
      // E: the cracked case itself, one small step far below cracking: same mesh, same refinement
      // at the tip; its stiffness is proportional to E
      const elasticRun = async (): Promise<SimCurve> => {
        const el: CaseModel = structuredClone(base);
        const xp = measured.x[peakIndex(measured.y)]!;
        el.control.target = Math.sign(el.control.target || 1) * 0.02 * (xp > 0 ? xp : Math.abs(el.control.target));
        el.control.increments = 1;
        const s = await simulate(el);
        record({ phase: 'elastic', ...start, objective: NaN, peak_N: NaN, status: s.status, seconds: s.seconds });
        return s;
      };
      const slope = (s: SimCurve, x: Float64Array | null): number => (x && x.length > 1 ? s.load[1]! / x[1]! : NaN);
      if (estimating) {
        // machine compliance as compare estimates it: the crosshead and CMOD slopes of each test
        // against those of a run of the case as given, all over 5–40 % of each curve's own peak
        const s = await simulate(matOf(start, base));
        compliance = labs.map((l, i) => {
          const e = estimateCompliance({ x: l.x, y: l.y }, opt.complianceFrom![i]!, { x: s.displacement, y: s.load }, { x: s.cmod ?? new Float64Array(0), y: s.load });
          notes.push(...e.notes.map((t) => `${labels[i]}: ${t}`));
          return { mm_per_N: e.C_mm_per_N, estimated: true };
        });
        correctAll(true);
        base = candidateCase(c, measured, xAxis, opt, shapeSearch ? REACH : 0);
        // the run is the case's own candidate too, judged against the corrected curves
        const curve = s.load.length > 0 ? simOpening(s, xAxis) : { x: new Float64Array(0), y: new Float64Array(0) };
        const f = s.status === 'failed' || s.reason === 'time limit' || curve.x.length < 2 ? Infinity : objective(curve);
        cache.set(keyOf(start), { sim: s, curve, f });
        record({ phase: 'estimate', ...start, objective: f, peak_N: s.load.length ? s.load[peakIndex(s.load)]! : NaN, status: s.reason === 'time limit' ? 'timed out' : s.status, seconds: s.seconds });
      }
      if (shapeSearch) await searchShapes();
      else {
        let km = NaN;
        if (params.includes('E')) {
          const s = await elasticRun();
          const ks = slope(s, xAxis === 'cmod' ? s.cmod : s.displacement);
          km = initialStiffness(measured);
          if (Number.isFinite(ks) && ks > 0 && km > 0) {
            Object.assign(est, clamp({ ...est, E: start.E * (km / ks) }));
            notes.push(`E from the initial compliance (load between 5 and 40 % of the peak, rising branch): measured ${km.toPrecision(4)} N/mm, elastic run ${ks.toPrecision(4)} N/mm at E = ${start.E.toPrecision(4)} MPa`);
          } else notes.push('E: the initial slope could not be measured; kept from the case');
        }

        // GF from the work of fracture (load-point displacement only), then ft and GF by Broyden on (peak, work)
        // a noisy gauge may start a little below zero, where a simulated curve has no points
        const lo0 = Math.max(0, measured.x[0]!), hi0 = measured.x[measured.x.length - 1]!;
        const Wm = areaOver(measured, lo0, hi0);
        if (params.includes('GF') && xAxis === 'displacement' && A > 0) {
          est.GF = clamp({ ...est, GF: rilemGF(workOfFracture(measured.x, measured.y), A) }).GF;
          notes.push(`GF start from the work of fracture over the ligament (${A.toFixed(0)} mm²): ${est.GF.toPrecision(3)} N/mm`);
        }
        const sub = params.filter((p): p is 'ft' | 'GF' => p === 'ft' || p === 'GF');
        if (sub.length > 0) {
          let J: number[][] = sub.map((_, i) => sub.map((__, j) => (i === j ? 1 : 0))); // peak ∝ ft, work ∝ GF
          let x = sub.map((p) => Math.log(est[p]));
          let g: number[] | null = null, prevX = x;
          for (let it = 0; it < 5; it++) {
            const m: Mat = { ...est };
            sub.forEach((p, i) => { m[p] = Math.exp(x[i]!); });
            const [r] = await evaluate([clamp(m)], 'estimate');
            const Ps = r!.curve.y.length ? r!.curve.y[peakIndex(r!.curve.y)]! : 0;
            const Ws = r!.curve.x.length > 1 ? areaOver(r!.curve, lo0, hi0) : 0;
            if (!(Ps > 0) || !(Ws > 0)) break;
            const gn = sub.map((p) => (p === 'ft' ? Math.log(Ps / Pm) : Math.log(Ws / Wm)));
            Object.assign(est, clamp(m));
            // the model's rising branch bends before the peak as the faces at the notch take up
            // load, so E follows the slope measured the same way on the simulated curve
            const kr = params.includes('E') && km > 0 ? initialStiffness(r!.curve) : NaN;
            const eStep = kr > 0 ? Math.log(km / kr) : 0;
            if (kr > 0) Object.assign(est, clamp({ ...est, E: est.E * (km / kr) }));
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
        const sortS = () => simplex.sort((a, b) => a.f - b.f);
        try {
          for (;;) {
            sortS();
            const fb = simplex[0]!.f, fw = simplex[n]!.f, fsw = simplex[n - 1]!.f;
            const size = Math.max(...simplex.slice(1).map((s) => Math.max(...s.x.map((v, i) => Math.abs(v - simplex[0]!.x[i]!)))));
            if (size < 0.003 && fw - fb < 0.01 * fb + 1e-6) break;
            // a noisy objective (growth events are discrete) keeps a small simplex wandering: closed
            // once it is within 3 % and the best has improved by under 2 % of itself over the last 6n simulations
            const back = history.length - 1 - 6 * n;
            if (size < 0.03 && back >= 0 && history[back]!.best - fb < 0.02 * fb) break;
            const cen = params.map((_, i) => simplex.slice(0, n).reduce((s, v) => s + v.x[i]!, 0) / n);
            const w = simplex[n]!.x;
            const xr = at(cen, w, 1), xe = at(cen, w, 2), xi = at(cen, w, -0.5);
            // a speculative second candidate only while the budget has room for it
            const spec = nWorkers > 1 && maxEvals - sims >= 2 ? [lastGood ? xe : xi] : [];
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
              const out = fr < fw;
              const xc = out ? at(cen, w, 0.5) : xi;
              const fc = (!out ? known(xi) : null) ?? (await evaluate([toMat(xc)], 'simplex'))[0]!.f;
              if (fc < (out ? fr : fw)) simplex[n] = { x: xc, f: fc };
              else {
                const b = simplex[0]!.x;
                const shrunk = simplex.slice(1).map((s) => s.x.map((v, i) => b[i]! + 0.5 * (v - b[i]!)));
                const fsh = await evaluate(shrunk.map(toMat), 'simplex');
                shrunk.forEach((x, k) => { simplex[k + 1] = { x, f: fsh[k]!.f }; });
              }
            }
          }
        } finally {
          sortS();
          xb = simplex[0]!.x; fit = toMat(xb); fbest = simplex[0]!.f;
        }
      }
    } catch (e) {
      if (!(e instanceof FitStop)) throw e;
      // the best candidate so far stands in for the optimum
      status = e.kind === 'limit' ? 'limit' : 'interrupted';
      reason = e.kind === 'limit'
        ? `stopped at the limit of ${maxEvals} simulations${phaseLimit < maxEvals ? ` (${phaseLimit} for the optimiser, ${maxEvals - phaseLimit} kept for the ±95 % ranges)` : ''} before the optimiser had closed; the values are the best so far (a larger --max-evals may improve them)`
        : `interrupted after ${sims} simulations; the values are the best so far`;
      fit = best.m; fbest = best.f; xb = params.map((p) => Math.log(fit[p]));
    }

    // sensitivities and confidence from a forward-difference Jacobian at the optimum, then the
    // model's own scatter from other mesh seeds
    const bestEval = cache.get(keyOf(fit)), sb = shapeBest as Shape | null;
    bestCurve = bestEval?.curve ?? (sb && keyOf(sb.m) === keyOf(fit) ? sb.curve : null);
    phaseLimit = maxEvals;
    if ((status === 'fitted' || status === 'limit') && Number.isFinite(fbest)) {
      try {
        const h = Math.log(1.03);
        let r0: Float64Array, cols: Float64Array[];
        if (shapeSearch) ({ r0, cols } = await shapeJacobian(h));
        else {
          r0 = residualsAll(bestCurve!, targets);
          const jr = await evaluate(params.map((_, j) => toMat(xb.map((v, i) => (i === j ? v + h : v)))), 'jacobian');
          cols = jr.map((r) => { const rj = residualsAll(r.curve, targets); return Float64Array.from(r0, (v, i) => ((rj[i] ?? v) - v) / h); });
        }
        const n = params.length, N = r0.length, ssr = r0.reduce((s, v) => s + v * v, 0), s2 = ssr / Math.max(1, N - n);
        const JtJ = params.map((_, i) => params.map((__, j) => cols[i]!.reduce((s, v, k) => s + v * cols[j]![k]!, 0)));
        const cov = inverse(JtJ);
        const sd = params.map((_, i) => (cov && cov[i]![i]! > 0 ? Math.sqrt(s2 * cov[i]![i]!) : Infinity));
        correlation = params.map((_, i) => params.map((__, j) => (cov ? cov[i]![j]! / Math.sqrt(cov[i]![i]! * cov[j]![j]!) : NaN)));
        // model scatter: the same fitted values on meshes of other seeds; the shift of the
        // parameters that would absorb each one's change of the curve (Gauss–Newton step)
        const shifts: number[][] = [new Array(n).fill(0)];
        // started together (two threads), taken up in starting order
        const seedRuns = Array.from({ length: cov ? seeds : 0 }, (_, j) => {
          const k = matOf(fit, post);
          k.mesh = { ...k.mesh, seed: base.mesh.seed + j + 1 };
          const p = simulate(k, generateMesh(buildDomain(k), k.mesh));
          p.catch(() => {});
          return p;
        });
        for (const run of seedRuns) {
          const sim = await run;
          const curve = sim.load.length > 0 ? simOpening(sim, xAxis) : { x: new Float64Array(0), y: new Float64Array(0) };
          const f = sim.status === 'failed' || curve.x.length < 2 ? Infinity : objective(curve);
          record({ phase: 'seed', ...fit, objective: f, peak_N: sim.load.length ? sim.load[peakIndex(sim.load)]! : NaN, status: sim.status, seconds: sim.seconds });
          if (!Number.isFinite(f)) continue;
          const rs = residualsAll(curve, targets);
          const g = params.map((_, i) => cols[i]!.reduce((a, v, k2) => a + v * ((rs[k2] ?? r0[k2]!) - r0[k2]!), 0));
          shifts.push(params.map((_, i) => -cov![i]!.reduce((a, v, j) => a + v * g[j]!, 0)));
        }
        const sdModel = params.map((_, i) => (shifts.length > 1 ? Math.sqrt(shifts.reduce((a, v) => a + v[i]! * v[i]!, 0) / (shifts.length - 1)) : NaN));
        if (shifts.length > 1) notes.push(`±95 %: from the Jacobian at the optimum (residuals at the measured points taken as independent) combined with the model's own scatter over ${shifts.length} mesh seeds; the error of the model itself is not in it`);
        else notes.push('±95 %: from the Jacobian at the optimum, treating the residuals at the measured points as independent; the model\'s scatter over mesh seeds was not measured (--seeds 0 or no budget left)');
        table = params.map((p, i) => {
          const sens = Math.sqrt(JtJ[i]![i]! / N) * Math.log(1.1);
          const tot = Number.isFinite(sdModel[i]!) ? Math.hypot(sd[i]!, sdModel[i]!) : sd[i]!;
          return { name: p, unit: UNIT[p], start: start[p], estimate: est[p], fitted: fit[p], relStd: tot, relStdModel: sdModel[i]!, sensitivity10: sens, wellDetermined: sens > 0.002 && tot < 0.1 };
        });
      } catch (e) {
        if (!(e instanceof FitStop)) throw e;
        warnings.push(`no confidence ranges: the ${e.kind === 'limit' ? `limit of ${maxEvals} simulations` : 'interruption'} came before the sensitivities were run`);
        if (e.kind === 'interrupted') { status = 'interrupted'; reason = `interrupted after ${sims} simulations, after the optimum was found`; }
        table = params.map((p) => ({ name: p, unit: UNIT[p], start: start[p], estimate: est[p], fitted: fit[p], relStd: NaN, relStdModel: NaN, sensitivity10: NaN, wellDetermined: false }));
      }
    } else table = params.map((p) => ({ name: p, unit: UNIT[p], start: start[p], estimate: est[p], fitted: fit[p], relStd: NaN, relStdModel: NaN, sensitivity10: NaN, wellDetermined: false }));

    // a fit that ran off, failed or still misses the curve badly is not called fitted
    if (!Number.isFinite(fbest)) {
      reason = status === 'limit'
        ? `the limit of ${maxEvals} simulation${maxEvals > 1 ? 's' : ''} came before any candidate gave a curve over the measured range`
        : `no candidate simulation gave a curve over the measured range (${sims} simulations; see the status column of fit-history.csv)`;
      status = 'failed';
    }
    else if (status === 'fitted') {
      const atBound = params.filter((p) => fit[p] <= lo[p] * 1.01 || fit[p] >= hi[p] / 1.01);
      if (atBound.length) { status = 'failed'; reason = `${atBound.join(' and ')} ran to the edge of ${atBound.length > 1 ? 'their' : 'its'} allowed range (${atBound.map((p) => `${sig(lo[p])}–${sig(hi[p])} ${UNIT[p]}`).join(', ')}): the case or the measured curve is not what the fit assumes (units, axis, compliance)`; }
      else if (fbest > 0.25) { status = 'failed'; reason = `the best curve still misses the measured one by ${(100 * fbest).toFixed(0)} % of the peak (RMSE): the model, the softening law or the measured curve do not match`; }
    }

    for (const r of table) {
      if (r.sensitivity10 <= 0.002) warnings.push(`${r.name} is poorly determined: a 10 % change moves the curve by only ${(100 * r.sensitivity10).toFixed(2)} % of the peak`);
      else if (Number.isFinite(r.sensitivity10) && !(r.relStd < 0.1)) warnings.push(`${r.name} is poorly determined: its 95 % range is about ±${Number.isFinite(r.relStd) ? (196 * r.relStd).toFixed(0) : '∞'} %`);
    }
    const endFrac = measured.y[measured.y.length - 1]! / Pm;
    if (params.includes('GF') && endFrac > 0.2) warnings.push(`the test stopped at ${(100 * endFrac).toFixed(0)} % of the peak load, before the tail: GF is poorly determined (the work of the missing tail is unknown)`);
    for (let i = 0; i < params.length; i++) for (let j = i + 1; j < params.length; j++) {
      if (Math.abs(correlation[i]![j]!) > 0.95) warnings.push(`${params[i]} and ${params[j]} are strongly correlated (${correlation[i]![j]!.toFixed(2)}): the curve fixes a combination of them better than each alone`);
    }
    if (Number.isFinite(fbest) && fbest > 0.05) warnings.push(`the fitted curve still differs from the measured one by ${(100 * fbest).toFixed(1)} % of the peak (RMSE): the softening law or the case may not describe the test`);
    if (estimating && !compliance.some((k) => k.estimated)) warnings.push('the machine compliance was not estimated: the limit or an interruption came before the run of the case as given, so the crosshead curves were fitted as read');
    if (xAxis === 'displacement' && !opt.corrections?.compliance_mm_per_N && !estimating && params.includes('E') && (fit.E < 0.5 * start.E || est.E < 0.5 * start.E)) {
      warnings.push(`E came out at ${(100 * Math.min(fit.E, est.E) / start.E).toFixed(0)} % of the case's ${start.E} MPa from a displacement reading: a crosshead includes the machine's compliance, seating and preload, so give --compliance (or fit against CMOD), --toe and --preload`);
    }

    const startEval = cache.get(keyOf(start));
    return {
      status, reason,
      caseName: c.name, labName: labels.join(', '), labNames: labels, series: labs.length > 1 ? series : null, xAxis, softening, params,
      material: fit, objective: fbest, startObjective: startEval?.f ?? NaN,
      table, correlation, warnings, notes, history, evaluations: sims, maxEvals,
      wallSeconds: (performance.now() - t0) / 1000, workers: nWorkers,
      mesh: { size: base.mesh.size, tipSize: base.mesh.tipSize, polygons }, compliance,
      curves: { measured: targets.length === 1 ? targets[0]! : measured, specimens: targets.length > 1 ? targets : [], start: startEval?.curve ?? null, fitted: bestCurve ?? { x: new Float64Array(0), y: new Float64Array(0) } },
    };
  } finally {
    await pool?.close();
  }
}

/** Residuals of every measured curve, one after the other. */
function residualsAll(sim: Curve, targets: Curve[]): Float64Array {
  const parts = targets.map((t) => residuals(sim, t));
  const out = new Float64Array(parts.reduce((s, p) => s + p.length, 0));
  let o = 0;
  for (const p of parts) { out.set(p, o); o += p.length; }
  return out;
}

const sig = (v: number, d = 4): number => Number(v.toPrecision(d));

/**
 * The case file text with the fitted material: the original bytes everywhere except the
 * fitted values (each replaced where it stands, its end-of-line comment kept in its column
 * and told what the value was), and a comment block on top saying where the values came from.
 */
export function fittedCaseText(originalText: string, r: FitResult): string {
  const doc = parseDocument(originalText);
  const edits: { at: number; end: number; text: string }[] = [];
  const values: [string, number | string, string][] = r.params.map((p) => [p, sig(r.material[p]), `${r.status === 'fitted' ? 'fitted' : 'best so far'} (was ${r.table.find((t) => t.name === p)!.start})`]);
  const softNode = doc.getIn(['material', 'softening'], true);
  const softWas = isScalar(softNode) ? String(softNode.value) : 'bilinear';
  if (softWas !== r.softening) values.push(['softening', r.softening, `law used in the fit (was ${softWas})`]);
  let inPlace = true;
  for (const [key, value, note] of values) {
    const node = doc.getIn(['material', key], true);
    if (!isScalar(node) || !node.range) { inPlace = false; break; }
    const [s0, s1] = node.range;
    const lineEnd = originalText.indexOf('\n', s1) < 0 ? originalText.length : originalText.indexOf('\n', s1);
    const rest = originalText.slice(s1, lineEnd).replace(/\r$/, '');
    const text = String(value);
    const m = /^(\s*)#(.*)$/.exec(rest);
    if (m) {
      // keep the comment's column when the new value fits before it
      const pad = Math.max(1, m[1]!.length + (s1 - s0) - text.length);
      edits.push({ at: s0, end: s1 + rest.length, text: `${text}${' '.repeat(pad)}#${m[2]!.trimEnd()}, ${note}` });
    } else if (/^\s*$/.test(rest)) edits.push({ at: s0, end: s1 + rest.length, text: `${text}  # ${note}` });
    else edits.push({ at: s0, end: s1, text }); // inside a flow map: the value only
  }
  const head = [
    r.status === 'fitted' ? `# Fitted by rupta fit to the measured curve${r.labNames.length > 1 ? 's' : ''} ${r.labName}` : `# NOT FITTED: the best values so far of a rupta fit to ${r.labName} (${r.reason})`,
    `# (load against ${r.xAxis === 'cmod' ? 'CMOD' : 'load-point displacement'}; fitted ${r.params.join(', ')};`,
    `# RMSE ${(100 * r.objective).toFixed(2)} % of the measured peak, on a mesh of ${r.mesh.size.toPrecision(3)} mm cells).`,
  ];
  if (r.warnings.length) head.push('# Warnings:', ...r.warnings.map((w) => `#   ${w}`));
  if (inPlace) {
    let out = originalText;
    for (const e of edits.sort((a, b) => b.at - a.at)) out = out.slice(0, e.at) + e.text + out.slice(e.end);
    const bom = out.charCodeAt(0) === 0xfeff ? '\ufeff' : '';
    const nl = originalText.includes('\r\n') ? '\r\n' : '\n';
    return bom + head.join(nl) + nl + nl + out.slice(bom.length);
  }
  // a key the file does not spell out: set it through the document (the layout of the rest may change)
  for (const [key, value, note] of values) {
    doc.setIn(['material', key], value);
    const node = doc.getIn(['material', key], true);
    if (isScalar(node)) node.comment = node.comment?.trim() ? ` ${node.comment.trim()}, ${note}` : ` ${note}`;
  }
  doc.commentBefore = head.map((l) => l.slice(1)).join('\n') + (doc.commentBefore ? '\n\n' + doc.commentBefore : '');
  return doc.toString({ flowCollectionPadding: false });
}

const pctOf = (v: number): string => (Number.isFinite(v) ? `${(100 * v).toFixed(2)} %` : '—');

/** Parameter table and warnings as text. */
export function fitTable(r: FitResult): string {
  const head = ['param', 'unit', 'case', 'estimate', r.status === 'fitted' ? 'fitted' : 'best so far', '±95 %', 'of it mesh seeds', 'effect of 10 %', ''];
  const rows = r.table.map((t) => [t.name, t.unit, String(sig(t.start)), String(sig(t.estimate)), String(sig(t.fitted)),
    Number.isFinite(t.relStd) ? `${(196 * t.relStd).toFixed(1)} %` : Number.isNaN(t.relStd) ? '—' : '∞',
    Number.isFinite(t.relStdModel) ? `${(196 * t.relStdModel).toFixed(1)} %` : '—',
    Number.isFinite(t.sensitivity10) ? `${(100 * t.sensitivity10).toFixed(2)} % of peak` : '—', !Number.isFinite(t.sensitivity10) ? 'not measured' : t.wellDetermined ? '' : 'poorly determined']);
  const w = head.map((h, j) => Math.max(h.length, ...rows.map((row) => row[j]!.length)));
  const line = (c: string[]) => c.map((s, j) => (j < 2 ? s.padEnd(w[j]!) : s.padStart(w[j]!))).join('  ').trimEnd();
  const out = [
    `${r.caseName} ${r.status === 'fitted' ? 'fitted' : 'NOT fitted'} to ${r.labName} (${r.softening} softening, load against ${r.xAxis === 'cmod' ? 'CMOD' : 'load-point displacement'})`,
    ...(r.status === 'fitted' ? [] : [`${r.status === 'failed' ? 'FAILED' : r.status === 'limit' ? 'STOPPED AT THE LIMIT' : 'INTERRUPTED'}: ${r.reason}`]),
    line(head), ...rows.map(line),
    `RMSE / measured peak: ${pctOf(r.startObjective)} with the case values, ${pctOf(r.objective)} ${r.status === 'fitted' ? 'fitted' : 'best so far'}`,
    `${r.evaluations} of at most ${r.maxEvals} simulations in ${r.wallSeconds.toFixed(1)} s on ${r.workers || 'no'} worker thread${r.workers === 1 ? '' : 's'}${r.workers ? '' : ' (in-process)'}`,
    ...r.notes.map((s) => `note: ${s}`),
    ...r.warnings.map((s) => `warning: ${s}`),
  ];
  return out.join('\n') + '\n';
}

/** Header of fit-history.csv (one row per simulation, written as the fit goes). */
export const FIT_HISTORY_HEADER = 'evaluation,phase,E_MPa,ft_MPa,GF_Nmm,rmse_over_peak,peak_N,status,seconds,best_rmse_over_peak';

/** One row of fit-history.csv. */
export function fitHistoryRow(h: FitEvaluation): (number | string | null)[] {
  const fin = (v: number, d: number) => (Number.isFinite(v) ? sig(v, d) : null);
  return [h.index, h.phase, sig(h.E, 8), sig(h.ft, 8), sig(h.GF, 8), fin(h.objective, 6), fin(h.peak_N, 6), h.status, sig(h.seconds, 4), fin(h.best, 6)];
}

/** Iteration history as CSV. */
export function fitHistoryCsv(r: FitResult): string {
  const rows = r.history.map((h) => fitHistoryRow(h).map((v) => (v === null ? '' : String(v))).join(','));
  return [FIT_HISTORY_HEADER, ...rows].join('\n') + '\n';
}

/** Overlay of the measured curve, the case's prediction and the fitted one. */
export function fitSvg(r: FitResult): string {
  const series: Series[] = [];
  if (r.curves.specimens.length > 1) {
    r.curves.specimens.forEach((c, k) => { const t = thin(c, 120); series.push({ label: `measured ${r.labNames[k] ?? k + 1}`, x: t.x, y: t.y, style: 'points', color: PALETTE[1 + (k % (PALETTE.length - 2))] }); });
  } else {
    const m = thin(r.curves.measured, 200);
    series.push({ label: `measured (${r.labName}${r.series === 'mean' ? ', mean' : ''})`, x: m.x, y: m.y, style: 'points', color: PALETTE[1] });
  }
  if (r.curves.start) series.push({ label: 'case values', x: r.curves.start.x, y: r.curves.start.y, style: 'dashed', color: PALETTE[5] });
  series.push({ label: r.status === 'fitted' ? 'fitted' : 'best so far (not fitted)', x: r.curves.fitted.x, y: r.curves.fitted.y, style: 'line', color: PALETTE[0] });
  const f = r.material;
  return plotSvg({
    series, title: `${r.caseName}: fit of ${r.params.join(', ')}`,
    xLabel: r.xAxis === 'cmod' ? 'CMOD (mm)' : 'Load-point displacement (mm)', yLabel: 'Load (N)',
    marks: r.curves.fitted.x.length ? [{ x: r.curves.fitted.x[peakIndex(r.curves.fitted.y)]!, y: r.curves.fitted.y[peakIndex(r.curves.fitted.y)]!, label: `E ${sig(f.E)} MPa, ft ${sig(f.ft, 3)} MPa, GF ${sig(f.GF, 3)} N/mm` }] : [],
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
