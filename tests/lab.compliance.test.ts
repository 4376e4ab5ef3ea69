// Machine compliance, toe and preload corrections. The "measurement" is a rupta prediction of
// the coarse fit-demo beam with a known machine compliance added to its load-point
// displacement (C·P, a spring in series: common practice), and other material values than the
// model that estimates it, so the CMOD slope has to find E before the compliance is known.
import { beforeAll, describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { loadCase } from '../src/case/index.js';
import { buildDomain } from '../src/geometry/domain.js';
import { generateMesh } from '../src/mesh/generate.js';
import { simulateCurve, type SimCurve } from '../src/lab/fitworker.js';
import { candidateCase, fitCase, fitJson } from '../src/lab/fit.js';
import { addPreload, estimateCompliance, removeCompliance, toeCorrection } from '../src/lab/correct.js';
import { compareCurves, initialStiffness, interpAt, monotone, type Curve, type RunCurve } from '../src/lab/compare.js';
import type { LabCurve } from '../src/lab/import.js';
import { ROOT } from './support/cli.js';

const f64 = (a: number[]) => Float64Array.from(a);
const C = 2e-5; // mm/N = 0.02 mm/kN, about the specimen's own compliance at the load point

async function simulate(mat: { E: number; ft: number; GF: number }): Promise<SimCurve> {
  const c = loadCase(join(ROOT, 'cases', 'fit-demo.yaml'));
  c.control.target = 0.15;
  const k = candidateCase(c, { x: f64([0, 0.15]), y: f64([0, 1]) }, 'cmod', { meshSize: 12.5, increments: 40 });
  k.material = { ...k.material, ...mat };
  const s = await simulateCurve(k, generateMesh(buildDomain(k), k.mesh));
  expect(s.status).toBe('complete');
  return s;
}

describe('machine compliance from a synthetic test with a known added compliance', () => {
  let truth: SimCurve, model: SimCurve;
  beforeAll(async () => {
    truth = await simulate({ E: 26000, ft: 3.4, GF: 0.085 });
    model = await simulate({ E: 30000, ft: 3.4, GF: 0.085 });
  }, 300_000);

  const crosshead = (): Curve => ({ x: Float64Array.from(truth.displacement, (d, i) => d + C * truth.load[i]!), y: truth.load });

  it('is recovered within 3 % from the initial slopes of crosshead and CMOD (common practice: compliances in series add)', () => {
    const e = estimateCompliance(crosshead(), { x: truth.cmod!, y: truth.load }, { x: model.displacement, y: model.load }, { x: model.cmod!, y: model.load });
    expect(Math.abs(e.C_mm_per_N / C - 1)).toBeLessThan(0.03);
    // the CMOD slope finds E (elastic slopes ∝ E) up to the slight bending before the peak
    expect(Math.abs(e.eRatio / (26000 / 30000) - 1)).toBeLessThan(0.04);
    console.log(`compliance: ${(1000 * e.C_mm_per_N).toFixed(5)} mm/kN against ${1000 * C} mm/kN (${(100 * (e.C_mm_per_N / C - 1)).toFixed(2)} %), E ratio ${e.eRatio.toFixed(4)} against ${(26000 / 30000).toFixed(4)}`);
  });

  it('removing it gives the specimen displacement back exactly', () => {
    const r = removeCompliance(crosshead(), C);
    r.curve.x.forEach((v, i) => expect(v).toBeCloseTo(truth.displacement[i]!, 12));
  });

  it('compare --compliance estimate: the corrected crosshead curve matches the truth run it came from', () => {
    const run: RunCurve = { load: truth.load, displacement: truth.displacement, cmod: truth.cmod, title: 'truth', ligamentArea_mm2: 1400 };
    const ch = crosshead();
    const lab: LabCurve = { name: 'ch.csv', x: ch.x, y: ch.y, xLabel: 'Crosshead', yLabel: 'Force', xUnit: 'mm', yUnit: 'N', xKind: 'displacement', notes: [] };
    const raw = compareCurves(run, [lab]);
    // 0.02 mm/kN about halves the slope at the load point: the crosshead warning speaks
    expect(raw.notes.join(' ')).toMatch(/ch\.csv: its initial slope is \d+ % of the predicted one: a crosshead reading includes the machine's compliance/);
    const fixed = compareCurves(run, [lab], { estimateFrom: [{ x: truth.cmod!, y: truth.load }] });
    expect(fixed.notes.join(' ')).toMatch(/machine compliance estimated from the initial slopes/);
    expect(fixed.specimens[0]!.rmseRel!).toBeLessThan(0.1 * raw.specimens[0]!.rmseRel!);
  });
  it('fit --compliance estimate: the fit finds the known compliance itself (within 3 %, common practice: compliances in series add) and fits E from the corrected curve', async () => {
    const c = loadCase(join(ROOT, 'cases', 'fit-demo.yaml'));
    c.control.target = 0.15;
    const ch = crosshead();
    const lab: LabCurve = { name: 'ch.csv', x: ch.x, y: ch.y, xLabel: 'Crosshead', yLabel: 'Force', xUnit: 'mm', yUnit: 'N', xKind: 'displacement', notes: [] };
    // the case as given first (the model's slopes, as compare takes them from a run; then the first shape of the search), then the whole fit
    const r = await fitCase(c, [lab], { complianceFrom: [{ x: truth.cmod!, y: truth.load }], meshSize: 12.5, increments: 40, maxEvals: 30, workers: 0, seeds: 0 });
    expect(r.status).toBe('fitted');
    expect(r.history.map((h) => h.phase).slice(0, 2)).toEqual(['estimate', 'shape']);
    const k = r.compliance[0]!;
    expect(k.estimated).toBe(true);
    expect(Math.abs(k.mm_per_N / C - 1)).toBeLessThan(0.03);
    expect(r.notes.join(' ')).toMatch(/ch\.csv: machine compliance estimated from the initial slopes/);
    expect(r.notes.join(' ')).toMatch(/ch\.csv: machine compliance 0\.0\d+ mm\/kN taken out of the displacement/);
    // fitted to the corrected crosshead curve: the truth's E (the crosshead's slope is about half the specimen's)
    const E = r.table.find((t) => t.name === 'E')!;
    const kFit = initialStiffness(r.curves.fitted), kTruth = initialStiffness(monotone({ x: truth.displacement, y: truth.load }));
    expect(initialStiffness(crosshead()) / kTruth).toBeLessThan(0.7);
    expect(Math.abs(kFit / kTruth - 1)).toBeLessThan(0.04);
    expect(Math.abs(E.fitted / 26000 - 1)).toBeLessThan(0.04);
    expect((fitJson(r).compliance as { mm_per_N: number }[])[0]!.mm_per_N).toBe(k.mm_per_N);
    console.log(`fit estimate of the compliance: ${(1000 * k.mm_per_N).toFixed(5)} mm/kN against ${1000 * C} mm/kN (${(100 * (k.mm_per_N / C - 1)).toFixed(2)} %), E fitted ${E.fitted.toFixed(0)} MPa against 26000 in ${r.evaluations} runs, initial stiffness of the fitted curve ${(100 * (kFit / kTruth - 1)).toFixed(2)} % from the truth's`);
  }, 300_000);

  it('fit --compliance estimate refuses a file without a CMOD column in one sentence', async () => {
    const c = loadCase(join(ROOT, 'cases', 'fit-demo.yaml'));
    const ch = crosshead();
    const lab: LabCurve = { name: 'ch.csv', x: ch.x, y: ch.y, xLabel: 'Crosshead', yLabel: 'Force', xUnit: 'mm', yUnit: 'N', xKind: 'displacement', notes: [] };
    await expect(fitCase(c, [lab], { complianceFrom: [null], maxEvals: 1, workers: 0 })).rejects.toThrow(/needs a CMOD column beside the displacement in ch\.csv/);
  });
});

describe('toe and preload (common practice: extend the straight part of the rising branch to zero load)', () => {
  // a straight rise of 20 000 N/mm to a 1000 N peak (a point every 0.0025 mm), then a fall; a seating toe of 0.01 mm in front
  const rise = Array.from({ length: 21 }, (_, i) => 0.0025 * i);
  const line: Curve = { x: f64([...rise, 0.08, 0.12]), y: f64([...rise.map((x) => 20000 * x), 700, 300]) };

  it('the toe correction finds the 0.01 mm offset and gives the straight curve back', () => {
    const toe = { x: f64([0, 0.004, 0.008, ...Array.from(line.x.slice(1), (v) => v + 0.01)]), y: f64([0, 10, 60, ...line.y.slice(1)]) };
    const r = toeCorrection(toe);
    expect(r.offset_mm).toBeCloseTo(0.01, 9);
    const back = monotone(r.curve);
    for (const x of [0, 0.015, 0.03, 0.07, 0.1]) expect(interpAt(back, x)).toBeCloseTo(interpAt(line, x), 6);
  });

  it('readings zeroed under a 100 N seating load: the load and the opening it had taken come back', () => {
    const k = initialStiffness(line);
    const zeroed = { x: f64([0, ...Array.from(line.x.slice(1), (v) => v - 100 / k)]), y: f64([0, ...Array.from(line.y.slice(1), (v) => v - 100)]) };
    const r = addPreload(zeroed, 100);
    for (const x of [0, 0.02, 0.045, 0.1]) expect(interpAt(monotone(r.curve), x)).toBeCloseTo(interpAt(line, x), 6);
  });
});
