import { describe, expect, it } from 'vitest';
import {
  compareCurves, compareSvg, compareTable, curveDifference, meanCurve, measuredFunction, monotone, parseRunCurve, type RunCurve,
} from '../src/lab/compare.js';
import type { LabCurve } from '../src/lab/import.js';

const f64 = (a: number[]) => Float64Array.from(a);
const lab = (name: string, x: number[], y: number[]): LabCurve => ({ name, x: f64(x), y: f64(y), xLabel: 'displacement', yLabel: 'load', xUnit: 'mm', yUnit: 'N', notes: [] });

describe('difference of two piecewise-linear curves', () => {
  it('d = x on [0, 1]: RMSE √(1/3), area ½ (hand integrals)', () => {
    const a = { x: f64([0, 1]), y: f64([0, 2]) };
    const b = { x: f64([0, 0.5, 1]), y: f64([0, 0.5, 1]) };
    const d = curveDifference(a, b, 0, 1);
    expect(d.rmse).toBeCloseTo(Math.sqrt(1 / 3), 12);
    expect(d.area).toBeCloseTo(0.5, 12);
    expect(d.refArea).toBeCloseTo(0.5, 12);
  });

  it('a sign change inside a segment is split: ∫|1 − 2x| = ½, not the trapezoid 1 (hand integral)', () => {
    const a = { x: f64([0, 1]), y: f64([1, -1]) };
    const b = { x: f64([0, 1]), y: f64([0, 0]) };
    const d = curveDifference(a, b, 0, 1);
    expect(d.area).toBeCloseTo(0.5, 12);
    expect(d.rmse).toBeCloseTo(Math.sqrt(1 / 3), 12);
  });

  it('sub-range: only [0.25, 0.75] counts (hand integral of x)', () => {
    const a = { x: f64([0, 1]), y: f64([0, 2]) };
    const b = { x: f64([0, 1]), y: f64([0, 1]) };
    const d = curveDifference(a, b, 0.25, 0.75);
    expect(d.area).toBeCloseTo((0.75 ** 2 - 0.25 ** 2) / 2, 12);
    expect(d.rmse).toBeCloseTo(Math.sqrt((0.75 ** 3 - 0.25 ** 3) / 3 / 0.5), 12);
  });
});

describe('curve helpers', () => {
  it('monotone keeps the points along which x increases', () => {
    const m = monotone({ x: f64([0, 1, 0.9, 2, 2, 3]), y: f64([0, 1, 5, 2, 7, 3]) });
    expect([...m.x]).toEqual([0, 1, 2, 3]);
    expect([...m.y]).toEqual([0, 1, 2, 3]);
  });

  it('measured jitter is sorted, not dropped; a real reversal keeps the forward path', () => {
    const j = measuredFunction({ x: f64([0, 1, 0.995, 2, 3]), y: f64([0, 10, 9, 20, 30]) });
    expect([...j.x]).toEqual([0, 0.995, 1, 2, 3]);
    expect([...j.y]).toEqual([0, 9, 10, 20, 30]);
    const r = measuredFunction({ x: f64([0, 1, 0.5, 2]), y: f64([0, 10, 4, 20]) });
    expect([...r.x]).toEqual([0, 1, 2]);
  });

  it('mean of y = x and y = 3x over their common range is 2x (common practice)', () => {
    const m = meanCurve([{ x: f64([0, 1]), y: f64([0, 1]) }, { x: f64([0, 0.5, 1.2]), y: f64([0, 1.5, 3.6]) }], 11);
    expect(m.x[0]).toBe(0);
    expect(m.x[10]).toBeCloseTo(1, 12);
    for (let i = 0; i < 11; i++) expect(m.y[i]).toBeCloseTo(2 * m.x[i]!, 12);
  });

  it('reads the pinned curve.csv columns, with and without a gauge', () => {
    const head = 'step,control,load_N,displacement_mm,cmod_mm,crack_length_mm,tip_x_mm,tip_y_mm,external_work_Nmm,elastic_energy_Nmm,dissipated_Nmm,iterations';
    const r = parseRunCurve(`${head}\n0,0,0,0,0,0,,,0,0,0,0\n1,0.1,500,0.2,0.1,0,,,50,50,0,3\n`, 'curve.csv');
    expect([...r.load]).toEqual([0, 500]);
    expect([...r.displacement]).toEqual([0, 0.2]);
    expect([...r.cmod!]).toEqual([0, 0.1]);
    const s = parseRunCurve(`${head}\n0,0,0,0,,0,,,0,0,0,0\n`, 'curve.csv');
    expect(s.cmod).toBeNull();
  });
});

describe('compare a prediction with measured curves', () => {
  // prediction: 0 → 1000 N at 0.1 mm, back to 0 at 0.5 mm; ligament 1000 mm²
  const run: RunCurve = { load: f64([0, 1000, 0]), displacement: f64([0, 0.1, 0.5]), cmod: null, title: 'triangle', ligamentArea_mm2: 1000 };

  it('a specimen carrying 90 % of the load: errors, RMSE, area and GF by hand (RILEM TC 50-FMC for GF)', () => {
    const r = compareCurves(run, [lab('S1', [0, 0.1, 0.5], [0, 900, 0])]);
    const s = r.specimens[0]!;
    expect(r.xAxis).toBe('displacement');
    expect(s.peak_N).toBe(900);
    expect(s.peakError).toBeCloseTo(1000 / 900 - 1, 12);
    expect(s.openingError).toBeCloseTo(0, 12);
    // difference 0.1·y: ∫y² = (0.1 + 0.4)·1000²/3 over 0.5 mm → RMSE = 100/√3 N
    expect(s.rmse_N).toBeCloseTo(100 / Math.sqrt(3), 9);
    expect(s.rmseRel).toBeCloseTo(100 / Math.sqrt(3) / 900, 9);
    // ∫|Δ| = 0.1 · 250 = 25 N·mm against ∫ measured = 225 N·mm
    expect(s.areaRel).toBeCloseTo(25 / 225, 12);
    expect(s.workOfFracture_Nmm).toBeCloseTo(225, 10);
    expect(s.GF_Nmm).toBeCloseTo(0.225, 12);
    expect(r.prediction.GF_Nmm).toBeCloseTo(0.25, 12);
  });

  it('the common range ends with the shorter curve; the peak opening error is relative', () => {
    const r = compareCurves(run, [lab('S2', [0, 0.125, 0.3], [0, 1000, 500])]);
    const s = r.specimens[0]!;
    expect(s.range_mm).toEqual([0, 0.3]);
    expect(s.openingError).toBeCloseTo(0.1 / 0.125 - 1, 12);
    expect(s.peakError).toBeCloseTo(0, 12);
  });

  it('several specimens: a mean row, a legend entry each, a table line each', () => {
    const r = compareCurves(run, [lab('S1', [0, 0.1, 0.5], [0, 900, 0]), lab('S2', [0, 0.1, 0.5], [0, 1100, 0])]);
    expect(r.mean).not.toBeNull();
    // mean of 90 % and 110 % is the prediction itself
    expect(r.mean!.rmse_N!).toBeLessThan(1e-9);
    expect(r.mean!.peak_N).toBeCloseTo(1000, 6);
    const svg = compareSvg(r);
    for (const name of ['rupta prediction', 'S1', 'S2', 'mean of specimens']) expect(svg).toContain(name);
    const t = compareTable(r);
    expect(t).toMatch(/S1 .*-10\.0 %|S1 .*\+11\.1 %/);
    expect(t.split('\n').filter((l) => /^(prediction|S1|S2|mean)/.test(l))).toHaveLength(4);
  });
});
