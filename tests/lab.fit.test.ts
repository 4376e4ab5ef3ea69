import { describe, expect, it } from 'vitest';
import { loadCase, parseCase } from '../src/case/index.js';
import { buildDomain } from '../src/geometry/domain.js';
import { generateMesh } from '../src/mesh/generate.js';
import { parseLabCurve } from '../src/lab/import.js';
import { monotone } from '../src/lab/compare.js';
import { simulateCurve } from '../src/lab/fitworker.js';
import {
  candidateCase, fitCase, fitHistoryCsv, fitObjective, fittedCaseText, initialStiffness, ligamentArea, syntheticLabText,
} from '../src/lab/fit.js';
import { readFileSync } from 'node:fs';

const f64 = (a: number[]) => Float64Array.from(a);

describe('fit helpers', () => {
  it('objective: a curve 5 % high everywhere has RMSE 5 % of the rms load (hand integral)', () => {
    const m = { x: f64([0, 0.1, 0.5]), y: f64([0, 1000, 0]) };
    const s = { x: m.x, y: f64([0, 1050, 0]) };
    // ∫(0.05 y)² over 0.5 mm = 0.05²·1000²·0.5/3 → RMSE 50/√3, over the 1000 N peak
    expect(fitObjective(s, m)).toBeCloseTo(50 / Math.sqrt(3) / 1000, 10);
  });

  it('a simulation that ends early is charged zero load for the rest of the measured range', () => {
    const m = { x: f64([0, 1]), y: f64([1, 1]) };
    const s = { x: f64([0, 0.5]), y: f64([1, 1]) };
    expect(fitObjective(s, m)).toBeCloseTo(Math.sqrt(0.5), 6);
  });

  it('initial stiffness: least-squares slope of the rising branch (common practice)', () => {
    const x = Array.from({ length: 21 }, (_, i) => i * 0.001);
    const y = x.map((v, i) => (i <= 10 ? 2e5 * v : 2e5 * 0.01 - 1e5 * (v - 0.01)));
    expect(initialStiffness({ x: f64(x), y: f64(y) })).toBeCloseTo(2e5, 6);
  });

  it('ligament of the demo beam: (50 − 15) mm × 40 mm (RILEM TC 50-FMC definition)', () => {
    expect(ligamentArea(loadCase('cases/fit-demo.yaml'))).toBeCloseTo(35 * 40, 9);
  });

  it('the bundled measured curve reads as SYNTHETIC kN/µm data with decimal commas', () => {
    const text = readFileSync('cases/fit-demo-lab.csv', 'utf8');
    expect(text).toMatch(/^SYNTHETIC DATA: made by rupta, NOT a laboratory test/);
    const c = parseLabCurve(text, 'fit-demo-lab.csv');
    expect(c.notes.join(' ')).toMatch(/kN, converted to N/);
    expect(c.x.length).toBeGreaterThan(300);
  });
});

describe('round trip', () => {
  it('E, ft and GF of a noisy synthetic curve are fitted back within 3 % (common practice)', async () => {
    const truth = { E: 27000, ft: 3.3, GF: 0.085 };
    const c = loadCase('cases/fit-demo.yaml'); // starts from E 30000, ft 3.0, GF 0.1
    c.control.target = 0.25; // mm of CMOD: a shorter test keeps this under a minute
    const opt = { meshSize: 12.5, increments: 50 };
    // the "measurement": the same coarse model with the true values, seeded noise, kN and decimal commas
    const gen = candidateCase(c, { x: f64([0, c.control.target]), y: f64([0, 1]) }, 'cmod', opt);
    gen.material = { ...gen.material, ...truth };
    const sim = await simulateCurve(gen, generateMesh(buildDomain(gen), gen.mesh));
    expect(sim.status).toBe('complete');
    let P = 0;
    for (const v of sim.load) P = Math.max(P, v);
    const text = syntheticLabText({ x: sim.cmod!, y: sim.load }, { seed: 3, loadNoise_N: 0.005 * P, xNoise_mm: 0.0002, points: 1000, header: ['SYNTHETIC test data'] });
    expect(text).toMatch(/;\d+,\d+;\d+,\d+/);
    const lab = parseLabCurve(text, 'synthetic.csv');
    const r = await fitCase(c, lab, { ...opt, maxEvals: 45 });
    for (const p of ['E', 'ft', 'GF'] as const) expect(Math.abs(r.material[p] / truth[p] - 1), p).toBeLessThan(0.03);
    expect(r.objective).toBeLessThan(r.startObjective);
    expect(r.workers).toBe(0); // TypeScript sources: evaluated in-process
    expect(fitHistoryCsv(r).split('\n')[0]).toBe('evaluation,phase,E_MPa,ft_MPa,GF_Nmm,rmse_over_peak,peak_N,status,seconds');
    const fitted = fittedCaseText(readFileSync('cases/fit-demo.yaml', 'utf8'), r);
    expect(fitted).toMatch(/^# Fitted by rupta fit to the measured curve synthetic\.csv/);
    expect(fitted).toContain('# Crack-mouth opening control'); // the user's comments stay
    expect(fitted).toMatch(/E: \d+ +# MPa, fitted \(was 30000\)/);
    const back = parseCase(fitted, 'fit-demo-fitted.yaml');
    expect(back.material.ft).toBeCloseTo(r.material.ft, 3);
    expect(back.mesh.size).toBe(c.mesh.size); // the user's mesh, not the fitting mesh
    // the same test stopped at 60 % of the peak on the falling branch: GF is flagged
    const k = sim.load.findIndex((v, i) => i > sim.load.indexOf(P) && v < 0.6 * P);
    const cut = syntheticLabText({ x: sim.cmod!.slice(0, k + 1), y: sim.load.slice(0, k + 1) }, { seed: 4, loadNoise_N: 0.005 * P, points: 200 });
    const short = await fitCase(c, parseLabCurve(cut, 'short.csv'), { ...opt, params: ['GF'], maxEvals: 4 });
    expect(short.params).toEqual(['GF']);
    expect(short.warnings.join(' ')).toMatch(/stopped at \d+ % of the peak load, before the tail: GF is poorly determined/);
    console.log(`round trip: ${r.evaluations} runs, ${r.wallSeconds.toFixed(1)} s, E ${r.material.E.toFixed(0)}, ft ${r.material.ft.toFixed(4)}, GF ${r.material.GF.toFixed(5)}`);
  }, 120_000);
});
