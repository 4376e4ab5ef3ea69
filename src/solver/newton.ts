// Newton–Raphson with line search for one load step under path-following control.
// The load factor λ is an unknown beside the free displacements; one scalar constraint
// closes the system (bordered solve with two back-substitutions per iteration):
//   displacement: λ = target;  cmod: gauge(u) = target;  force: F(u) = target;
//   opening: Σ A·w over all crack-face pairs = target (drives a step through a snap-back);
//   dissipation: energy dissipated on the faces from the committed histories, D(u) = target
//   (dissipation-based path following: Gutiérrez 2004, Verhoosel, Remmers & Gutiérrez 2009).
//   D is not linear in u: its gradient is taken afresh at every iteration.
import type { CohesiveParams } from '../cohesive/interface.js';
import { SingularMatrixError } from '../errors.js';
import type { System } from './system.js';
import { Condensation } from './condensed.js';

export type ControlKind = 'displacement' | 'cmod' | 'force' | 'opening' | 'dissipation';

export interface StepResult {
  converged: boolean; iterations: number; reason: string;
  /** The iterations converged but NewtonOptions.reject turned the state down (the step state is as it was). */
  rejected?: boolean;
}

export interface NewtonOptions {
  maxIter: number;
  /** Converged when the largest out-of-balance force is below tolF (N) … */
  tolF: number;
  /** … and the constraint is met to tolG (its own unit). */
  tolG: number;
  /** Stiffness floor per face area on cohesive pairs (N/mm³). */
  floor: number;
  /** Iterate on the secant of the cohesive law instead of its tangent (slower, but cannot cycle). */
  secant?: boolean;
  /** Out-of-balance force accepted once maxIter is used up (faces switching in and out of
   * contact can keep a residual at round-off level of the contact penalty). */
  tolFEnd?: number;
  /** Iterate on the bulk condensed onto the faces' jumps where it applies (default true; false: all free unknowns). */
  condense?: boolean;
  /**
   * Asked once the condensed iterations have converged, before the bulk is recovered (the
   * trial histories hold the converged state): true turns the state down without the bulk's
   * solve. The caller checks the full iterations' result itself.
   */
  reject?: () => boolean;
}

/** Scratch vectors for one topology (allocated once, reused every iteration). */
export class NewtonWork {
  readonly u: Float64Array; readonly f: Float64Array; readonly z: Float64Array;
  readonly r: Float64Array; readonly a: Float64Array; readonly b: Float64Array; readonly kfl: Float64Array;
  readonly ufTry: Float64Array; readonly gf: Float64Array;
  /** The bulk condensed onto the crack faces (built on the first cohesive solve; null where it does not apply). */
  cond: Condensation | null | undefined = undefined;
  constructor(sys: System) {
    const n = sys.nDof, m = sys.nFree;
    this.u = new Float64Array(n); this.f = new Float64Array(n); this.z = new Float64Array(n);
    this.r = new Float64Array(m); this.a = new Float64Array(m); this.b = new Float64Array(m); this.kfl = new Float64Array(m);
    this.ufTry = new Float64Array(m); this.gf = new Float64Array(m);
  }
}

export interface StepState { uf: Float64Array; lambda: number }

/** Residuals at (uf, λ): fills w.r (free forces), returns ‖r‖∞ and the constraint value. */
function residual(sys: System, coh: CohesiveParams | null, kappa: Float64Array, kappaTrial: Float64Array,
  kind: ControlKind, target: number, uf: Float64Array, lambda: number, w: NewtonWork, tangent: boolean, floor: number, secant = false):
  { rmax: number; g: number; F: number } {
  sys.expand(uf, lambda, w.u);
  sys.internal(w.u, coh, kappa, kappaTrial, w.f, tangent, floor, secant);
  let rmax = 0;
  sys.restrict(w.f, w.r);
  for (let i = 0; i < w.r.length; i++) { const av = Math.abs(w.r[i]); if (av > rmax || av !== av) rmax = av !== av ? Infinity : av; }
  const F = sys.loadForce(w.f);
  const g = kind === 'displacement' ? lambda - target : kind === 'cmod' ? sys.gaugeReading(w.u) - target
    : kind === 'opening' ? sys.openingReading(w.u) - target : kind === 'dissipation' ? sys.dissipation(w.u, coh!, kappa) - target : F - target;
  return { rmax, g, F };
}

export function solveStep(sys: System, coh: CohesiveParams | null, kappa: Float64Array, kappaTrial: Float64Array,
  kind: ControlKind, target: number, st: StepState, opt: NewtonOptions, w: NewtonWork): StepResult {
  let before = 0;
  if (coh && sys.pairs.plus.length > 0 && opt.condense !== false) {
    if (w.cond === undefined) w.cond = Condensation.build(sys);
    if (w.cond) {
      const r = condensedStep(sys, w.cond, coh, kappa, kappaTrial, kind, target, st, opt, w);
      if (r.converged || r.reason || r.rejected) return r;
      // the full residual disagrees with the condensed one: finish with the full iterations
      before = r.iterations;
    }
  }
  const r = fullStep(sys, coh, kappa, kappaTrial, kind, target, st, opt, w);
  return { ...r, iterations: r.iterations + before };
}

/** Newton on all free unknowns: each iteration a (trailing) refactorization and a bordered solve. */
function fullStep(sys: System, coh: CohesiveParams | null, kappa: Float64Array, kappaTrial: Float64Array,
  kind: ControlKind, target: number, st: StepState, opt: NewtonOptions, w: NewtonWork): StepResult {
  const m = sys.nFree;
  const { gauge, gaugeW } = kind === 'opening' ? sys.openingGauge : kind === 'dissipation' ? { gauge: sys.openingGauge.gauge, gaugeW: sys.dissipationWeights } : sys.driven;
  if (kind === 'dissipation' && !coh) return { converged: false, iterations: 0, reason: 'no crack faces to drive the step by their dissipation' };
  if (kind === 'displacement') st.lambda = target;
  const sec = opt.secant ?? false;
  let res = residual(sys, coh, kappa, kappaTrial, kind, target, st.uf, st.lambda, w, true, opt.floor, sec);
  for (let it = 1; it <= opt.maxIter; it++) {
    if (res.rmax <= opt.tolF && Math.abs(res.g) <= opt.tolG) return { converged: true, iterations: it - 1, reason: '' };
    if (!Number.isFinite(res.rmax) || !Number.isFinite(res.g)) return { converged: false, iterations: it, reason: 'non-finite residual' };
    let factor;
    try { factor = sys.factorTangent(); } catch (e) {
      if (e instanceof SingularMatrixError) return { converged: false, iterations: it, reason: singular(sys, e) };
      throw e;
    }
    // a = −K⁻¹ r,  b = K⁻¹ k_fλ with k_fλ = kT[f, load]·w
    for (let i = 0; i < m; i++) w.r[i] = -w.r[i];
    w.z.fill(0);
    sys.expand(w.gf.fill(0), 1, w.z); // z = load pattern
    matVecT(sys, w.z, w.f);           // f = kT z
    let gl: number;
    sys.restrict(w.f, w.kfl);
    factor.solve2(w.r, w.kfl, w.a, w.b); // both in one sweep over the factor
    // constraint gradient (g_f over free dofs, g_λ)
    w.gf.fill(0);
    if (kind === 'displacement') gl = 1;
    else if (kind === 'dissipation') { sys.dissipation(w.u, coh!, kappa, gaugeW); gl = sys.gaugeGradient(w.gf, w.z, gauge, gaugeW); }
    else if (kind === 'cmod' || kind === 'opening') gl = sys.gaugeGradient(w.gf, w.z, gauge, gaugeW);
    else {
      w.gf.set(w.kfl);
      gl = sys.loadForce(w.f);
    }
    let ga = 0, gb = 0;
    for (let i = 0; i < m; i++) { ga += w.gf[i] * w.a[i]; gb += w.gf[i] * w.b[i]; }
    const den = gl - gb;
    if (!(Math.abs(den) > 0)) return { converged: false, iterations: it, reason: 'the control does not determine the load (check the gauge and the load points)' };
    const dl = -(res.g + ga) / den;
    // du = a − b·dλ; backtracking on the out-of-balance force, but only against a real
    // divergence: the first iteration of a step starts from balance and must move off it
    const r0 = Math.max(res.rmax, 100 * opt.tolF);
    let eta = 1, best = Infinity, bestEta = 1, lastEta = 0;
    let lastTrial = res;
    const lam0 = st.lambda;
    for (let ls = 0; ls < 6; ls++) {
      for (let i = 0; i < m; i++) w.ufTry[i] = st.uf[i] + eta * (w.a[i] - w.b[i] * dl);
      // with the tangent: when this trial is taken, its evaluation is the next iteration's
      lastTrial = residual(sys, coh, kappa, kappaTrial, kind, target, w.ufTry, lam0 + eta * dl, w, true, opt.floor, sec);
      lastEta = eta;
      if (lastTrial.rmax < best) { best = lastTrial.rmax; bestEta = eta; }
      if (lastTrial.rmax <= 2 * r0) break;
      eta *= 0.5;
    }
    for (let i = 0; i < m; i++) st.uf[i] += bestEta * (w.a[i] - w.b[i] * dl);
    st.lambda = lam0 + bestEta * dl;
    res = bestEta === lastEta ? lastTrial : residual(sys, coh, kappa, kappaTrial, kind, target, st.uf, st.lambda, w, true, opt.floor, sec);
  }
  if (res.rmax <= (opt.tolFEnd ?? opt.tolF) && Math.abs(res.g) <= opt.tolG) return { converged: true, iterations: opt.maxIter, reason: '' };
  return { converged: false, iterations: opt.maxIter, reason: `no convergence in ${opt.maxIter} iterations (out-of-balance ${res.rmax.toExponential(2)} N)` };
}


function singular(sys: System, e: SingularMatrixError): string {
  const d = sys.freeDofs[e.equation] ?? -1, v = d >> 1;
  const where = d >= 0 ? ` near [${sys.mesh.xy[2 * v].toFixed(2)}, ${sys.mesh.xy[2 * v + 1].toFixed(2)}] mm` : '';
  return `the tangent stiffness is singular${where} (a part of the specimen is no longer held)`;
}

/**
 * The same Newton iterations, line search and control on the condensed unknowns (condensed.ts);
 * the bulk follows in one sparse solve once they have converged. Returns converged, or a
 * reason, or neither (iterations used) when the full residual of the converged state is
 * still too large and the full iterations should finish the step.
 */
function condensedStep(sys: System, cd: Condensation, coh: CohesiveParams, kappa: Float64Array, kappaTrial: Float64Array,
  kind: ControlKind, target: number, st: StepState, opt: NewtonOptions, w: NewtonWork): StepResult {
  const nc = cd.nc, sec = opt.secant ?? false, { r, a, b, qTry, s } = cd;
  let lambda = kind === 'displacement' ? target : st.lambda;
  const qc = cd.gatherC(st.uf, lambda);
  let gc: Float64Array | null = null, gl0 = 0;
  if (kind === 'cmod' || kind === 'opening') {
    const G = cd.gauge(kind, w.gf, (gf) => {
      const { gauge, gaugeW } = kind === 'opening' ? sys.openingGauge : sys.driven;
      w.z.fill(0);
      sys.expand(gf.fill(0), 1, w.z);
      return sys.gaugeGradient(gf.fill(0), w.z, gauge, gaugeW);
    });
    gc = G.gc; gl0 = G.gl;
  }
  if (kind === 'dissipation') gc = cd.dissipationGrad;
  const constraint = (q: Float64Array, lam: number, F: number): number => {
    if (kind === 'displacement') return lam - target;
    if (kind === 'force') return F - target;
    if (kind === 'dissipation') return cd.dissipation(q, coh, kappa, null) - target;
    let g = gl0 * lam;
    for (let i = 0; i < nc; i++) g += gc![i] * q[i];
    return g - target;
  };
  // the converged state as the full unknowns, evaluated on them (work.u, work.f, histories)
  const finish = (iterations: number, tol: number): StepResult => {
    cd.recover(qc, lambda, st.uf);
    st.lambda = lambda;
    const full = residual(sys, coh, kappa, kappaTrial, kind, target, st.uf, st.lambda, w, false, opt.floor, sec);
    if (full.rmax <= tol && Math.abs(full.g) <= opt.tolG) return { converged: true, iterations, reason: '' };
    if (!Number.isFinite(full.rmax) || !Number.isFinite(full.g)) return { converged: false, iterations, reason: 'non-finite residual' };
    return { converged: false, iterations, reason: '' };
  };
  let res = cd.evaluate(qc, lambda, coh, kappa, kappaTrial, true, opt.floor, sec);
  let g = constraint(qc, lambda, res.F);
  for (let it = 1; it <= opt.maxIter; it++) {
    if (res.rmax <= opt.tolF && Math.abs(g) <= opt.tolG) return opt.reject?.() ? { converged: false, iterations: it - 1, reason: '', rejected: true } : finish(it - 1, opt.tolF);
    if (!Number.isFinite(res.rmax) || !Number.isFinite(g)) {
      const f = finish(it, opt.tolF);
      return f.converged ? f : { converged: false, iterations: it, reason: 'non-finite residual' };
    }
    try { cd.factorT(); } catch (e) {
      if (e instanceof SingularMatrixError) return { converged: false, iterations: it, reason: singular(sys, e) };
      throw e;
    }
    // a = −T⁻¹ r,  b = T⁻¹ s (the residual's change with λ)
    for (let i = 0; i < nc; i++) { a[i] = -r[i]; b[i] = s[i]; }
    cd.solveT(a); cd.solveT(b);
    let gl: number, ga = 0, gb = 0;
    if (kind === 'displacement') gl = 1;
    else if (kind === 'force') { gl = cd.kll; for (let i = 0; i < nc; i++) { ga += s[i] * a[i]; gb += s[i] * b[i]; } }
    else {
      // the dissipation's gradient at this iterate (on the jumps only: gl0 stays 0)
      if (kind === 'dissipation') cd.dissipation(qc, coh, kappa, gc);
      gl = gl0; for (let i = 0; i < nc; i++) { ga += gc![i] * a[i]; gb += gc![i] * b[i]; } }
    const den = gl - gb;
    if (!(Math.abs(den) > 0)) return { converged: false, iterations: it, reason: 'the control does not determine the load (check the gauge and the load points)' };
    // force control: the step on F at fixed jumps (s, κ̂ above), the same step as the full
    // iterations take on F itself (they differ by Fr, a multiple of the residual)
    const dl = -(g - (kind === 'force' ? res.Fr : 0) + ga) / den;
    // backtracking against a real divergence only, as in the full iterations
    const r0 = Math.max(res.rmax, 100 * opt.tolF);
    let eta = 1, best = Infinity, bestEta = 1, lastEta = 0;
    let lastTrial = res, lastG = g;
    const lam0 = lambda;
    for (let ls = 0; ls < 6; ls++) {
      for (let i = 0; i < nc; i++) qTry[i] = qc[i] + eta * (a[i] - b[i] * dl);
      lastTrial = cd.evaluate(qTry, lam0 + eta * dl, coh, kappa, kappaTrial, true, opt.floor, sec);
      lastG = constraint(qTry, lam0 + eta * dl, lastTrial.F);
      lastEta = eta;
      if (lastTrial.rmax < best) { best = lastTrial.rmax; bestEta = eta; }
      if (lastTrial.rmax <= 2 * r0) break;
      eta *= 0.5;
    }
    for (let i = 0; i < nc; i++) qc[i] += bestEta * (a[i] - b[i] * dl);
    lambda = lam0 + bestEta * dl;
    if (bestEta === lastEta) { res = lastTrial; g = lastG; } else {
      res = cd.evaluate(qc, lambda, coh, kappa, kappaTrial, true, opt.floor, sec);
      g = constraint(qc, lambda, res.F);
    }
  }
  if (res.rmax <= (opt.tolFEnd ?? opt.tolF) && Math.abs(g) <= opt.tolG) {
    return opt.reject?.() ? { converged: false, iterations: opt.maxIter, reason: '', rejected: true } : finish(opt.maxIter, opt.tolFEnd ?? opt.tolF);
  }
  return { converged: false, iterations: opt.maxIter, reason: `no convergence in ${opt.maxIter} iterations (out-of-balance ${res.rmax.toExponential(2)} N)` };
}

/** y = kT x on the full dofs (the tangent holds the cohesive part of the last evaluation). */
function matVecT(sys: System, x: Float64Array, y: Float64Array): void {
  const A = sys.kT, { rowPtr, colIdx, values } = A;
  for (let i = 0; i < A.n; i++) {
    let s = 0;
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) s += values[k] * x[colIdx[k]];
    y[i] = s;
  }
}
