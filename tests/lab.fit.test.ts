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
  it('E, ft and GF of a synthetic series (three noisy copies of one rupta curve) are fitted back within 3 % (common practice)', async () => {
    const truth = { E: 27000, ft: 3.3, GF: 0.085 };
    const c = loadCase('cases/fit-demo.yaml'); // starts from E 30000, ft 3.0, GF 0.1
    c.control.target = 0.25; // mm of CMOD: a shorter test keeps this near a minute
    c.mesh = { ...c.mesh, size: 12.5, tipSize: 3.125 }; // the fit runs on the case's own mesh
    const opt = { increments: 50 };
    // the "measurements": the same coarse model with the true values, seeded noise, kN and decimal commas
    const gen = candidateCase(c, { x: f64([0, c.control.target]), y: f64([0, 1]) }, 'cmod', opt);
    gen.material = { ...gen.material, ...truth };
    const sim = await simulateCurve(gen, generateMesh(buildDomain(gen), gen.mesh));
    expect(sim.status).toBe('complete');
    let P = 0;
    for (const v of sim.load) P = Math.max(P, v);
    const texts = [1, 2, 3].map((seed) => syntheticLabText({ x: sim.cmod!, y: sim.load }, { seed, loadNoise_N: 0.01 * P, xNoise_mm: 0.0002, points: 400, header: ['SYNTHETIC test data', `Specimen;S-${seed}`] }));
    expect(texts[0]).toMatch(/;\d+,\d+;\d+,\d+/);
    const series = texts.map((t, i) => parseLabCurve(t, `s${i + 1}.csv`));
    const r = await fitCase(c, series, { ...opt, maxEvals: 60, seeds: 1 });
    expect(r.status).toBe('fitted');
    expect(r.labNames).toEqual(['S-1', 'S-2', 'S-3']);
    expect(r.curves.specimens).toHaveLength(3); // all three are in the objective, not only the last
    for (const p of ['E', 'ft', 'GF'] as const) expect(Math.abs(r.material[p] / truth[p] - 1), p).toBeLessThan(0.03);
    expect(r.objective).toBeLessThan(r.startObjective);
    expect(r.evaluations).toBeLessThanOrEqual(60);
    expect(r.history).toHaveLength(r.evaluations); // every simulation is in the history
    expect(r.history.filter((h) => h.phase === 'seed')).toHaveLength(1);
    expect(r.notes.join(' ')).toMatch(/combined with the model's own scatter over 2 mesh seeds/);
    for (const t of r.table) expect(t.relStd).toBeGreaterThanOrEqual(t.relStdModel);
    expect(r.workers).toBe(0); // TypeScript sources: evaluated in-process
    expect(fitHistoryCsv(r).split('\n')[0]).toBe('evaluation,phase,E_MPa,ft_MPa,GF_Nmm,rmse_over_peak,peak_N,status,seconds,best_rmse_over_peak');
    const original = readFileSync('cases/fit-demo.yaml', 'utf8');
    const fitted = fittedCaseText(original, r);
    expect(fitted).toMatch(/^# Fitted by rupta fit to the measured curves S-1, S-2, S-3/);
    expect(fitted).toContain('# Crack-mouth opening control'); // the user's comments stay
    expect(fitted).toMatch(/\n {2}E: \d+ {2,}# MPa, fitted \(was 30000\)\n/); // the comment keeps its column
    // only the fitted values changed: the rest of the file is the original, line for line
    const kept = fitted.split('\n').filter((l) => !/^#|^\s*(E|ft|GF):/.test(l));
    expect(kept.join('\n').trim()).toBe(original.split('\n').filter((l) => !/^#|^\s*(E|ft|GF):/.test(l)).join('\n').trim());
    const back = parseCase(fitted, 'fit-demo-fitted.yaml');
    expect(back.material.ft).toBeCloseTo(r.material.ft, 3);
    expect(back.mesh.size).toBe(8); // the file's mesh, untouched
    // the same test stopped at 60 % of the peak on the falling branch: GF is flagged
    const k = sim.load.findIndex((v, i) => i > sim.load.indexOf(P) && v < 0.6 * P);
    const cut = syntheticLabText({ x: sim.cmod!.slice(0, k + 1), y: sim.load.slice(0, k + 1) }, { seed: 4, loadNoise_N: 0.005 * P, points: 200 });
    const short = await fitCase(c, parseLabCurve(cut, 'short.csv'), { ...opt, params: ['GF'], maxEvals: 4 });
    expect(short.params).toEqual(['GF']);
    expect(short.evaluations).toBeLessThanOrEqual(4);
    expect(short.warnings.join(' ')).toMatch(/stopped at \d+ % of the peak load, before the tail: GF is poorly determined/);
    console.log(`series round trip: ${r.evaluations} runs, ${r.wallSeconds.toFixed(1)} s, E ${r.material.E.toFixed(0)}, ft ${r.material.ft.toFixed(4)}, GF ${r.material.GF.toFixed(5)}; ±95 % ${r.table.map((t) => `${t.name} ${(196 * t.relStd).toFixed(1)} % (mesh seeds ${(196 * t.relStdModel).toFixed(1)} %)`).join(', ')}`);
  }, 600_000);
});
