// The step controller: fixed steps on the increments, adaptive steps from Newton's iterations,
// the softening, the tips' readiness and the curve near a peak (pure functions), and a coarse
// demo beam run both ways (measured against fixed increments).
import { describe, expect, it } from 'vitest';
import {
  startState, propose, cut, accept, settle, growthFactor, peakStep, readyStep, energyJump, energyGained, energyCreated, softeningWeights,
  MIN_FRACTION, MIN_ADAPTIVE, MAX_FRACTION, MAX_GROW, MAX_SHRINK, AIM_READINESS, AIM_ITERATIONS, PEAK_MISS, CHORD_MISS,
  SETTLE, PASS_SETTLED, SETTLED_BELOW, type StepMeasure,
} from '../src/fracture/steps.js';
import { softeningJump, FULL_WEIGHTS } from '../src/fracture/criterion.js';
import type { StepRow } from '../src/fracture/state.js';
import { Analysis, type AnalysisState } from '../src/fracture/analysis.js';
import { decodeCheckpoint, encodeCheckpoint } from '../src/fracture/checkpoint.js';
import { buildDomain } from '../src/geometry/domain.js';
import { generateMesh } from '../src/mesh/generate.js';
import { worstEnergyGap } from '../src/output/warnings.js';
import { coarseBeam } from './support/beam.js';

const quiet = (iterations: number, softening = 0): StepMeasure => ({ iterations, softening, readiness: NaN, grew: false, byOpening: false });
const row = (step: number, control: number, load_N: number): StepRow =>
  ({ step, control, load_N, displacement_mm: control, cmod_mm: control, crack_length_mm: 0, tip_x_mm: null, tip_y_mm: null, external_work_Nmm: 0, elastic_energy_Nmm: 0, dissipated_Nmm: 0, iterations: 1 });

describe('adaptive step control on plain data', () => {
  it('grows a step that converged quickly, shrinks one that took many iterations, within the limits', () => {
    expect(growthFactor(quiet(1), false)).toBe(MAX_GROW);
    expect(growthFactor(quiet(AIM_ITERATIONS), false)).toBe(1);
    expect(growthFactor(quiet(4 * AIM_ITERATIONS), false)).toBe(0.5);
    expect(growthFactor(quiet(400), false)).toBe(MAX_SHRINK);
    // after a cut the next step does not grow
    expect(growthFactor(quiet(1), true)).toBe(1);
    // the softening of the step: about in proportion to its length, aimed below its 5 % limit
    expect(growthFactor(quiet(1, 0.08), false)).toBeCloseTo(0.5, 12);
    expect(growthFactor(quiet(1, 10), false)).toBe(MAX_SHRINK);
  });

  it('proposes multiples of the base step up to the target, grows after quick steps up to MAX_FRACTION, cuts in halves', () => {
    const at = startState(), T = 1, n = 10;
    expect(propose(at, T, n, 'adaptive')).toBeCloseTo(0.1, 15);
    accept(at, 0.1, false);
    settle(at, row(1, 0.1, 10), { m: quiet(1), rows: [row(0, 0, 0), row(1, 0.1, 10)], base: T / n });
    expect(at.frac).toBe(2);
    for (let k = 0; k < 4; k++) settle(at, row(1, 0.1, 10), { m: quiet(1), rows: [row(0, 0, 0), row(1, 0.1, 10)], base: T / n });
    expect(at.frac).toBe(MAX_FRACTION);
    expect(propose(at, T, n, 'adaptive')).toBeCloseTo(0.5, 15);
    expect(cut(at)).toBe(false);
    expect(propose(at, T, n, 'adaptive')).toBeCloseTo(0.3, 15);
    // the step after a cut does not grow, and many iterations shrink it, down to MIN_ADAPTIVE
    accept(at, 0.3, false);
    settle(at, row(2, 0.3, 30), { m: quiet(1), rows: [row(0, 0, 0), row(1, 0.1, 10), row(2, 0.3, 30)], base: T / n });
    expect(at.frac).toBe(2);
    for (let k = 0; k < 8; k++) settle(at, row(2, 0.3, 30), { m: quiet(400), rows: [row(1, 0.1, 10), row(2, 0.3, 30)], base: T / n });
    expect(at.frac).toBe(MIN_ADAPTIVE);
    // cuts go on below it, down to MIN_FRACTION
    while (!cut(at)) { /* halve */ }
    expect(at.frac).toBeLessThan(MIN_FRACTION);
    // the last step ends on the target and the run is then done
    const end = startState();
    end.done = 0.95; end.frac = 4;
    expect(propose(end, T, n, 'adaptive')).toBe(1);
    accept(end, 1, false);
    expect(propose(end, T, n, 'adaptive')).toBeNull();
    expect(end.inc).toBeGreaterThan(n);
  });

  it('near a peak the step is short enough to miss at most PEAK_MISS of it between rows', () => {
    // F = 100 − (x − 1)²: F'' = −2; peak 100
    const F = (x: number) => 100 - (x - 1) ** 2;
    const h = peakStep([row(0, 0.7, F(0.7)), row(1, 0.8, F(0.8)), row(2, 0.95, F(0.95))], 100);
    expect(h).toBeCloseTo(Math.sqrt(8 * PEAK_MISS * 100 / 2), 10);
    // rows h apart around the top miss it by at most F''·h²/8 (the worst: the top halfway between two rows)
    expect(100 - F(1 - h / 2)).toBeCloseTo(PEAK_MISS * 100, 10);
    // a straight curve sets no bound; so do fewer than three rows
    expect(peakStep([row(0, 0, 0), row(1, 1, 2), row(2, 3, 6)], 6)).toBe(Infinity);
    expect(peakStep([row(0, 0, 0), row(1, 1, 2)], 2)).toBe(Infinity);
    // the bound does not change when loads are scaled by b and levels by λ (the fit's scaling), relative to the step
    const b = 7.3, l = 0.37;
    const scaled = peakStep([row(0, 0.7 * l, b * F(0.7)), row(1, 0.8 * l, b * F(0.8)), row(2, 0.95 * l, b * F(0.95))], 100 * b);
    expect(scaled / l).toBeCloseTo(h, 10);
  });

  it('far below the vertex of a rising curve the step may go half way to it, the chord held to CHORD_MISS', () => {
    // F = 100 − 100(x − 1)²: F'' = −200, the peak bound alone √(8·PEAK_MISS·100/200)
    const F = (x: number) => 100 - 100 * (x - 1) ** 2, miss = Math.sqrt(8 * PEAK_MISS * 100 / 200);
    // rows at 0.1, 0.15, 0.2: the vertex 0.8 ahead; the chord bound √(8·CHORD_MISS·100/200) is the shorter
    expect(peakStep([row(0, 0.1, F(0.1)), row(1, 0.15, F(0.15)), row(2, 0.2, F(0.2))], 100)).toBeCloseTo(Math.sqrt(8 * CHORD_MISS * 100 / 200), 10);
    // rows at 0.7, 0.75, 0.8: half the way to the vertex, 0.1, is the shorter
    expect(peakStep([row(0, 0.7, F(0.7)), row(1, 0.75, F(0.75)), row(2, 0.8, F(0.8))], 100)).toBeCloseTo(0.1, 10);
    expect(0.1).toBeGreaterThan(miss);
    // past the vertex (falling), and for a valley ahead, only the peak bound holds
    const G = (x: number) => 200 - F(x);
    expect(peakStep([row(0, 1.1, F(1.1)), row(1, 1.15, F(1.15)), row(2, 1.2, F(1.2))], 100)).toBeCloseTo(miss, 10);
    expect(peakStep([row(0, 0.1, G(0.1)), row(1, 0.15, G(0.15)), row(2, 0.2, G(0.2))], 200)).toBeCloseTo(Math.sqrt(8 * PEAK_MISS * 200 / 200), 10);
  });

  it('the softening limit relaxes as the zone settles: fresh points count fully, passing points ten times until the load falls from its peak', () => {
    // linear law ft = 2, wc = 1 (slope 2), penalty 1000: l0 = 0.002
    const ft = 2, pen = 1000, l0 = ft / pen, stress = (w: number) => Math.max(0, ft - 2 * w);
    // a point passing its peak, ending 0.01 below ft: ten times that, over ft
    const passing = [new Float64Array([0]), new Float64Array([l0 + 0.005])] as const;
    expect(softeningJump(passing[0], passing[1], ft, pen, stress)).toBeCloseTo(10 * 0.01 / ft, 12);
    expect(softeningJump(passing[0], passing[1], ft, pen, stress, null, { pass: 2, settle: 0 })).toBeCloseTo(2 * 0.01 / ft, 12);
    // a point at half its strength (D = 0.5) falling by 0.2: 0.1 of ft, over 1 + settle·0.5
    const half = [new Float64Array([l0 + 0.5]), new Float64Array([l0 + 0.6])] as const;
    expect(softeningJump(half[0], half[1], ft, pen, stress)).toBeCloseTo(0.1, 12);
    expect(softeningJump(half[0], half[1], ft, pen, stress, null, { pass: 10, settle: 4 })).toBeCloseTo(0.1 / 3, 12);
    // fixed steps keep the full weights; adaptive ones relax the passing weight only below SETTLED_BELOW of the peak
    expect(softeningWeights('fixed', [row(5, 1, 10)], 100)).toEqual(FULL_WEIGHTS);
    expect(softeningWeights('adaptive', [row(5, 1, 96)], 100)).toEqual({ pass: FULL_WEIGHTS.pass, settle: SETTLE });
    expect(softeningWeights('adaptive', [row(5, 1, 94)], 100)).toEqual({ pass: PASS_SETTLED, settle: SETTLE });
    expect(softeningWeights('adaptive', [], 0).pass).toBe(FULL_WEIGHTS.pass);
    // relative: the same when loads are scaled (the fit's scaling)
    expect(softeningWeights('adaptive', [row(5, 1, -94 * 3)], -300)).toEqual({ pass: PASS_SETTLED, settle: SETTLE });
    expect(SETTLED_BELOW).toBeLessThan(1);
  });

  it('a tip near readiness 1 gets a step that takes it to AIM_READINESS; an energy jump is a share of the work', () => {
    // readiness rose 0.8 → 0.9 over 0.01: 0.012 more reaches the aim
    expect(readyStep(0.8, 0.9, 0.01)).toBeCloseTo((AIM_READINESS - 0.9) / 10, 12);
    expect(readyStep(null, 0.9, 0.01)).toBe(Infinity);
    expect(readyStep(0.9, 0.8, 0.01)).toBe(Infinity);
    expect(readyStep(0.9, 1.03, 0.01)).toBe(Infinity);
    const last = { external_work_Nmm: 100, elastic_energy_Nmm: 60, dissipated_Nmm: 39 };
    expect(energyJump(last, 110, 65, 44)).toBeCloseTo(0, 12);
    expect(energyJump(last, 110, 64, 44)).toBeCloseTo(1 / 110, 12);
    // stored plus dissipated may grow by the work done and no more (first law: common practice)
    expect(energyGained(last, 110, 65, 44)).toBeCloseTo(0, 12);
    expect(energyGained(last, 110, 66, 44)).toBeCloseTo(1 / 110, 12);
    expect(energyGained(last, 110, 64, 44)).toBeCloseTo(-1 / 110, 12);
    // created: 3 N·mm more than booked is over 1 % of 110, unless the trapezoid's ½|ΔF·Δλ| covers it
    expect(energyCreated(last, 110, 68, 44, 100, 0.01)).toBe(true);
    expect(energyCreated(last, 110, 68, 44, 100, 0.05)).toBe(false);
    expect(energyCreated(last, 110, 65.5, 44, 0, 0.01)).toBe(false);
  });
});

describe('adaptive steps on a coarse demo beam, measured against fixed increments', () => {
  const c = coarseBeam({ increments: 40, target: 0.3 });
  const mesh = () => generateMesh(buildDomain(c), c.mesh);

  it('fewer steps, attempts and Newton iterations, the peak within 0.5 %, the crack end within a tip cell, the energy balance as good (measured against fixed increments)', async () => {
    const runs = await Promise.all((['fixed', 'adaptive'] as const).map(async (steps) => {
      const a = new Analysis(c, mesh(), { steps });
      let iterations = 0;
      const r = await a.run((e) => { iterations += e.row.iterations; });
      expect(r.status, r.reason).toBe('complete');
      return { r, steps: r.rows.length - 1, iterations, attempts: a.attempts.tried, path: r.crackPaths[0]! };
    }));
    const [fixed, adaptive] = runs as [typeof runs[0], typeof runs[0]];
    // measured: 69 steps against 87, 241 iterations against 387
    expect(adaptive.steps).toBeLessThan(0.85 * fixed.steps);
    expect(adaptive.attempts).toBeLessThan(fixed.attempts);
    expect(adaptive.iterations).toBeLessThan(0.8 * fixed.iterations);
    expect(Math.abs(adaptive.r.peak.load_N / fixed.r.peak.load_N - 1)).toBeLessThan(0.005);
    const e1 = fixed.path[fixed.path.length - 1]!, e2 = adaptive.path[adaptive.path.length - 1]!;
    expect(Math.hypot(e1[0] - e2[0], e1[1] - e2[1])).toBeLessThan(c.mesh.tipSize);
    expect(worstEnergyGap(adaptive.r.rows)!.share).toBeLessThanOrEqual(worstEnergyGap(fixed.r.rows)!.share);
    // rows are not on the increments' levels: some step is longer than one increment
    const len = adaptive.r.rows.slice(1).map((w, i) => w.control - adaptive.r.rows[i]!.control);
    expect(Math.max(...len)).toBeGreaterThan(1.2 * c.control.target / c.control.increments);
  });

  it('resumed from a checkpoint, the adaptive run repeats the uninterrupted one bit for bit (common practice)', async () => {
    const cs = { ...c, control: { ...c.control, steps: 'adaptive' as const } };
    const states: AnalysisState[] = [];
    const whole = new Analysis(cs, mesh(), { checkpointEvery: 1 });
    const res = await whole.run(() => {}, (s) => { states.push(s); });
    expect(res.status, res.reason).toBe('complete');
    // a checkpoint whose next step is longer than one increment, past the peak
    const s = states.find((x) => x.loop.step > res.peak.step && x.loop.frac > 1) ?? states[states.length >> 1]!;
    const again = new Analysis(cs, mesh(), { checkpointEvery: 1 });
    again.restore(decodeCheckpoint(encodeCheckpoint(cs, s), cs, 'the test'));
    const r = await again.run(() => {});
    expect(r.rows).toEqual(res.rows);
    expect(r.crackPaths).toEqual(res.crackPaths);
  });
});
