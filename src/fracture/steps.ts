// Step control: where the loop stands (LoopState, plain data) and how it moves. The case's
// control target T in n increments gives the base step T/n. A step is proposed as a fraction
// `frac` of it, cut in half when it fails or goes too far; when even 1/64 of the base step does
// not converge, the total crack opening drives the step instead.
// Adaptive (`control.steps: adaptive`): after a converged step the next one is longer when Newton converged
// quickly and the cohesive points softened little, shorter when not, and short enough near a
// peak of the curve that the peak between two rows is missed by at most PEAK_MISS of the peak;
// the softening limit relaxes as the cohesive zone settles (`softeningWeights`);
// steps run from MIN_ADAPTIVE to MAX_FRACTION of the base step (cuts go below) and end at T.
// Fixed (the default): steps end on the increments' levels T·k/n and a cut step is widened back to the whole
// increment after each converged step.
// Every decision reads iteration counts and relative measures, so it does not change when the
// case is scaled (loads by b, lengths of the opening by λ): the fit's shape search relies on it.
import type { LoopState, StepRow } from './state.js';
import { SOFTENING_LIMIT, FULL_WEIGHTS, type SofteningWeights } from './criterion.js';

/** Shortest step tried under the case's control, as a fraction of the base step. */
export const MIN_FRACTION = 1 / 64;
/** Fraction tried after a step driven by the crack opening, and while the opening still drives. */
export const AFTER_OPENING = 1 / 32;
export const WHILE_OPENING = 1 / 128;
/** Longest adaptive step, in base steps. */
export const MAX_FRACTION = 4;
/** Shortest step the adaptive controller proposes (cuts go on below it, to MIN_FRACTION). */
export const MIN_ADAPTIVE = 1 / 16;
/** Most a step may grow or shrink from one to the next (adaptive). */
export const MAX_GROW = 2;
export const MAX_SHRINK = 0.25;
/** Newton iterations aimed at per step: fewer let the next step grow, more shrink it. */
export const AIM_ITERATIONS = 6;
/** Softening per step aimed at, as a share of its limit (5 % of ft), so that few steps are cut. */
export const AIM_SOFTENING = 0.8 * SOFTENING_LIMIT;
/** How fast the softening limit relaxes as a point settles (adaptive; criterion.ts `softeningJump`). */
export const SETTLE = 4;
/** Weight of a point passing its peak once the curve has fallen below SETTLED_BELOW of its peak (adaptive; 10 until then). */
export const PASS_SETTLED = 2;
export const SETTLED_BELOW = 0.95;
/** Readiness a tip is aimed to reach at the end of a step, once it comes near (growth at 1, the step is cut past 1.05). */
export const AIM_READINESS = 1.02;
/** Largest share of the peak load the curve may rise above its rows between two of them. */
export const PEAK_MISS = 1e-3;
/** Largest share of the peak load the curve may leave its chord between two rows away from a peak (adaptive). */
export const CHORD_MISS = 1e-2;

/** Dissipation added by a step driven by the faces' dissipation, as a share of the energy dissipated so far. */
export const DISSIPATION_STEP = 0.01;

/**
 * Largest share of the work a growth re-solve at a fixed control level may lose from the
 * balance while releasing stored energy, before it counts as a snap (steps.ts `released`).
 */
export const RELEASE_LIMIT = 1e-3;

/** Share of a snapping re-solve's loss of balance that its redo driven by the dissipation may keep and still be taken. */
export const REDO_KEEP = 0.5;

type Balance = { W: number; elastic: number; dissipated: number };

/**
 * A re-solve from state a to state b released energy: the stored energy fell by more than the
 * faces dissipated, and the balance work − stored − dissipated moved by more than RELEASE_LIMIT
 * of the work (the first law: what the machine supplies is stored or dissipated; common
 * practice). Energy that the balance gains while the stored energy stays (a mesh change under
 * load) is not a snap.
 */
export function released(a: Balance, b: Balance): boolean {
  return a.elastic - b.elastic > b.dissipated - a.dissipated && lost(a, b) > RELEASE_LIMIT * Math.max(Math.abs(b.W), Number.MIN_VALUE);
}

/** How far the balance work − stored − dissipated moved from state a to state b (N·mm; positive: energy lost). */
export function lost(a: Balance, b: Balance): number {
  return (b.W - a.W) - (b.elastic - a.elastic) - (b.dissipated - a.dissipated);
}

/** Largest change of the energy balance (work − elastic − dissipated) in one step, as a share of the work (adaptive). */
export const ENERGY_STEP = 1e-3;

/**
 * How far a step moved the energy balance, as a share of the work done: from the last row to
 * the step's solution (W, elastic and dissipated energy with its trial histories). A long step
 * on a softening branch can land on another equilibrium than the path of short steps would
 * (faces unloading instead of opening on); the work's trapezoid then no longer matches.
 */
export function energyJump(last: Pick<StepRow, 'external_work_Nmm' | 'elastic_energy_Nmm' | 'dissipated_Nmm'>, W: number, elastic: number, dissipated: number): number {
  return Math.abs(energyGained(last, W, elastic, dissipated));
}

/**
 * Share of the work a step's solution may hold beyond what the machine supplied: stored plus
 * dissipated energy can only grow by the work done (first law; the dissipation is
 * irreversible). Steps without growth move the balance by under 0.01 N·mm, so 1 % is met only
 * by a jump to an equilibrium no loading path reaches (a separated specimen whose last
 * ligament opened past its critical opening at once, the pieces moving as a mechanism).
 */
export const ENERGY_CREATED = 0.01;

/** How much more energy a step's solution holds than the work since the last row supplies, as a share of the work (negative: less). */
export function energyGained(last: Pick<StepRow, 'external_work_Nmm' | 'elastic_energy_Nmm' | 'dissipated_Nmm'>, W: number, elastic: number, dissipated: number): number {
  const before = last.external_work_Nmm - last.elastic_energy_Nmm - last.dissipated_Nmm;
  return (before - (W - elastic - dissipated)) / Math.max(Math.abs(W), Number.MIN_VALUE);
}

/**
 * A step's solution holds more energy than the machine can have supplied: more than
 * ENERGY_CREATED of the work W beyond the work booked, and beyond the trapezoid's own
 * uncertainty over the step, ½|ΔF·Δλ| (the integral of a force monotone over the step lies
 * between its end values times Δλ). Without that allowance the first step of a beam that
 * softens at once (0.43 N·mm of work, the trapezoid 0.006 N·mm short) counted as gaining.
 */
export function energyCreated(last: Pick<StepRow, 'external_work_Nmm' | 'elastic_energy_Nmm' | 'dissipated_Nmm'>, W: number, elastic: number, dissipated: number, dF: number, dLambda: number): boolean {
  const aW = Math.abs(W);
  return energyGained(last, W, elastic, dissipated) * aW - 0.5 * Math.abs(dF * dLambda) > ENERGY_CREATED * aW;
}

export type StepMode = 'adaptive' | 'fixed';

/**
 * How the softening of a step is weighed (criterion.ts `softeningJump`). Fixed: the full
 * weights. Adaptive: a point that was softening already counts less the more strength it has
 * lost (SETTLE), and once the last row's load has fallen below SETTLED_BELOW of the peak a
 * point passing its own peak counts PASS_SETTLED times instead of ten: the ten is there to
 * catch the peak load, and it comes back should the load rise near the peak again.
 */
export function softeningWeights(mode: StepMode, rows: readonly Pick<StepRow, 'load_N'>[], peak: number): SofteningWeights {
  if (mode === 'fixed') return FULL_WEIGHTS;
  const last = rows[rows.length - 1];
  const past = last !== undefined && Math.abs(peak) > 0 && Math.abs(last.load_N) < SETTLED_BELOW * Math.abs(peak);
  return { pass: past ? PASS_SETTLED : FULL_WEIGHTS.pass, settle: SETTLE };
}

export function startState(): LoopState {
  return { inc: 1, frac: 1, done: 0, step: 0, peak: { load_N: 0, displacement_mm: 0, cmod_mm: null, step: 0 } };
}

/**
 * The control level of the next attempt, or null when the current increment is done (the
 * loop then moves to the next one; adaptive steps have one increment, the whole run).
 * Fixed: increment k of n ends at target·k/n.
 */
export function propose(at: LoopState, target: number, increments: number, mode: StepMode = 'fixed'): number | null {
  const goal = mode === 'adaptive' ? target : target * at.inc / increments;
  if (!(at.done < goal - 1e-12 * Math.abs(target))) { at.inc = mode === 'adaptive' ? increments + 1 : at.inc + 1; at.frac = 1; return null; }
  const len = mode === 'adaptive' ? at.frac * target / increments : at.frac * (goal - at.done);
  return at.done + Math.min(len, goal - at.done);
}

/** Halve the next attempt; true when it is now shorter than the shortest step allowed. */
export function cut(at: LoopState): boolean {
  at.frac /= 2;
  at.cut = true;
  return at.frac < MIN_FRACTION;
}

/**
 * A converged step at `level` of the case's control. Driven by the crack opening, the level
 * reached may lie below the one before (snap-back): the next step is then driven so too.
 * With `rewind` (driven by the dissipation) the case's control takes over again from the level
 * reached as soon as a step has raised it (the curve then goes back and comes up again);
 * without, only once it passes the highest level reached.
 */
export function accept(at: LoopState, level: number, byOpening: boolean, rewind = false): void {
  if (byOpening) {
    at.frac = AFTER_OPENING;
    at.opening = level <= at.done;
    at.done = rewind ? level : Math.max(at.done, level);
  } else { at.done = level; at.opening = false; }
  at.step++;
}

/** What the controller reads of a converged step (adaptive). */
export interface StepMeasure {
  /** Newton iterations of the step's solve at its control level (growth re-solves not counted). */
  iterations: number;
  /** Largest softening of a cohesive point in the step, as a fraction of ft (criterion.ts `softeningJump`). */
  softening: number;
  /** Largest readiness of a tip at the step's solution, before growth (growth.ts `tipOvershoot`; NaN when not asked). */
  readiness: number;
  /** A crack grew at the step's level. */
  grew: boolean;
  /** The step was driven by the crack opening. */
  byOpening: boolean;
}

/**
 * The factor the next adaptive step's length is multiplied by: the square root of aimed over
 * taken iterations, and aimed over reached softening (it grows about in proportion to the step),
 * the smaller of the two, within [MAX_SHRINK, MAX_GROW]; at most 1 after a step that was cut.
 */
export function growthFactor(m: StepMeasure, wasCut: boolean): number {
  const byIterations = Math.sqrt(AIM_ITERATIONS / Math.max(1, m.iterations));
  const bySoftening = m.softening > 0 ? AIM_SOFTENING / m.softening : MAX_GROW;
  const g = Math.min(MAX_GROW, Math.max(MAX_SHRINK, Math.min(byIterations, bySoftening)));
  return wasCut ? Math.min(1, g) : g;
}

/**
 * Longest step (in units of the control level) that keeps the peak between rows: the last
 * three rows' parabola F(level) has curvature F''; a peak between samples h apart is missed by
 * at most |F''|·h²/8, held to PEAK_MISS·|peak|. While |F| still rises toward the parabola's
 * vertex, no peak lies within half the way to it: the step may go that far, the chord then
 * held to CHORD_MISS·|peak|. Infinity while the curve is straight (or fewer than three rows
 * with distinct levels).
 */
export function peakStep(rows: readonly Pick<StepRow, 'control' | 'load_N'>[], peak: number): number {
  const n = rows.length;
  if (n < 3 || !(Math.abs(peak) > 0)) return Infinity;
  const a = rows[n - 3]!, b = rows[n - 2]!, c = rows[n - 1]!;
  const h1 = b.control - a.control, h2 = c.control - b.control;
  if (!(h1 > 0 && h2 > 0)) return Infinity;
  const curv = 2 * ((c.load_N - b.load_N) / h2 - (b.load_N - a.load_N) / h1) / (h1 + h2);
  if (!(Math.abs(curv) > 0)) return Infinity;
  const miss = Math.sqrt(8 * PEAK_MISS * Math.abs(peak) / Math.abs(curv));
  // the parabola's slope at the last row, and how far ahead its vertex lies when it is a peak of |F|
  const slope = (c.load_N - b.load_N) / h2 + curv * h2 / 2, ahead = -slope / curv;
  if (!(ahead > 0 && curv * c.load_N < 0)) return miss;
  return Math.max(miss, Math.min(ahead / 2, Math.sqrt(8 * CHORD_MISS * Math.abs(peak) / Math.abs(curv))));
}

/**
 * Longest step (control level) that takes the readiest tip to AIM_READINESS, extrapolating its
 * readiness linearly from the last step's end (`before`, null when unknown or a crack grew)
 * over the step's length `len`: a growth is then taken near readiness 1 whatever the step
 * lengths before it. Infinity when the readiness does not rise or is past the aim already.
 */
export function readyStep(before: number | null | undefined, now: number, len: number): number {
  if (before === null || before === undefined || !Number.isFinite(before) || !Number.isFinite(now) || !(len > 0)) return Infinity;
  const rate = (now - before) / len;
  if (!(rate > 0) || now >= AIM_READINESS) return Infinity;
  return (AIM_READINESS - now) / rate;
}

/**
 * After the step's row: the peak so far and the next step's length. Fixed: twice as long, up
 * to the whole increment. Adaptive (with the step's measure, the rows so far and the base step
 * T/n): `growthFactor`, bounded by `peakStep`, `readyStep` and by [MIN_ADAPTIVE, MAX_FRACTION] base steps.
 */
export function settle(at: LoopState, row: StepRow, adapt?: { m: StepMeasure; rows: readonly StepRow[]; base: number }): void {
  if (Math.abs(row.load_N) > Math.abs(at.peak.load_N)) at.peak = { load_N: row.load_N, displacement_mm: row.displacement_mm, cmod_mm: row.cmod_mm, step: at.step };
  const wasCut = at.cut === true;
  at.cut = false;
  if (!adapt) { if (at.frac < 1) at.frac = Math.min(1, at.frac * 2); return; }
  // after a step driven by the crack opening the case's control comes back gently (accept set it)
  if (adapt.m.byOpening) { at.ready = null; return; }
  const n = adapt.rows.length, len = n >= 2 ? Math.abs(adapt.rows[n - 1]!.control - adapt.rows[n - 2]!.control) : 0;
  const ready = adapt.m.grew ? Infinity : readyStep(at.ready, adapt.m.readiness, len);
  const f = Math.min(at.frac * growthFactor(adapt.m, wasCut), Math.min(peakStep(adapt.rows, at.peak.load_N), ready) / Math.abs(adapt.base));
  at.frac = Math.min(MAX_FRACTION, Math.max(MIN_ADAPTIVE, f));
  at.ready = adapt.m.grew || !Number.isFinite(adapt.m.readiness) ? null : adapt.m.readiness;
}
