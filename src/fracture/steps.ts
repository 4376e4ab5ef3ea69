// Step control: where the loop stands (LoopState, plain data) and how it moves. A step is
// proposed as a fraction of what is left of the current increment, cut in half when it
// fails or goes too far, widened again after a converged step; when even 1/64 of the
// increment does not converge, the total crack opening drives the step instead.
import type { LoopState, StepRow } from './state.js';

/** Shortest step tried under the case's control, as a fraction of the increment. */
export const MIN_FRACTION = 1 / 64;
/** Fraction tried after a step driven by the crack opening, and while the opening still drives. */
export const AFTER_OPENING = 1 / 32;
export const WHILE_OPENING = 1 / 128;

export function startState(): LoopState {
  return { inc: 1, frac: 1, done: 0, step: 0, peak: { load_N: 0, displacement_mm: 0, cmod_mm: null, step: 0 } };
}

/**
 * The control level of the next attempt, or null when the current increment is done (the
 * loop then moves to the next one). Increment k of n ends at target·k/n.
 */
export function propose(at: LoopState, target: number, increments: number): number | null {
  const goal = target * at.inc / increments;
  if (!(at.done < goal - 1e-12 * Math.abs(target))) { at.inc++; at.frac = 1; return null; }
  return at.done + Math.min(at.frac * (goal - at.done), goal - at.done);
}

/** Halve the next attempt; true when it is now shorter than the shortest step allowed. */
export function cut(at: LoopState): boolean {
  at.frac /= 2;
  return at.frac < MIN_FRACTION;
}

/**
 * A converged step at `level` of the case's control. Driven by the crack opening, the level
 * reached may lie below the one before (snap-back): the next step is then driven so too.
 */
export function accept(at: LoopState, level: number, byOpening: boolean): void {
  if (byOpening) {
    at.frac = AFTER_OPENING;
    at.opening = level <= at.done;
    at.done = Math.max(at.done, level);
  } else { at.done = level; at.opening = false; }
  at.step++;
}

/** After the step's row: the peak so far, and the next step twice as long (up to the whole increment). */
export function settle(at: LoopState, row: StepRow): void {
  if (Math.abs(row.load_N) > Math.abs(at.peak.load_N)) at.peak = { load_N: row.load_N, displacement_mm: row.displacement_mm, cmod_mm: row.cmod_mm, step: at.step };
  if (at.frac < 1) at.frac = Math.min(1, at.frac * 2);
}
