// The predicted quantity follows the measured column's meaning, and an axis the run or case
// lacks is refused before anything is computed.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync, writeFileSync, mkdirSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { compareCurves, type RunCurve } from '../src/lab/compare.js';
import { parseLabCurve } from '../src/lab/import.js';
import { fitCase } from '../src/lab/fit.js';
import { loadCase } from '../src/case/index.js';
import { InputError } from '../src/errors.js';
import { ensureBuilt, rupta, ROOT } from './support/cli.js';

const f64 = (a: number[]) => Float64Array.from(a);
// a hand-made prediction: displacement runs four times the CMOD (invented numbers, shapes only)
const run = (cmod: boolean): RunCurve => ({
  load: f64([0, 800, 1000, 600, 200]), displacement: f64([0, 0.04, 0.08, 0.2, 0.4]),
  cmod: cmod ? f64([0, 0.01, 0.02, 0.05, 0.1]) : null, title: 'hand-made', ligamentArea_mm2: 1400,
});
const disp = parseLabCurve('Force [N];Crosshead [mm]\n0;0\n800;0,04\n1000;0,08\n600;0,2\n200;0,4\n', 'disp.csv');
const cmod = parseLabCurve('Kraft [N];COD [mm]\n0;0\n800;0,01\n1000;0,02\n600;0,05\n200;0,1\n', 'cmod.csv');

function refusal(f: () => unknown): string {
  try { f(); } catch (e) { expect(e).toBeInstanceOf(InputError); return (e as Error).message; }
  throw new Error('not refused');
}

describe('compare chooses the axis from the measured column', () => {
  it('a crosshead column is compared with the predicted displacement, not CMOD, and says so', () => {
    const r = compareCurves(run(true), [disp]);
    expect(r.xAxis).toBe('displacement');
    expect(r.notes[0]).toBe('load against load-point displacement: the measured x column "Crosshead" is a displacement');
    // the same numbers as the prediction: no error at all once the axes match
    expect(r.specimens[0]!.rmse_N).toBeCloseTo(0, 9);
    expect(r.specimens[0]!.openingError).toBeCloseTo(0, 9);
  });

  it('a COD column is compared with the predicted CMOD', () => {
    const r = compareCurves(run(true), [cmod]);
    expect(r.xAxis).toBe('cmod');
    expect(r.specimens[0]!.rmse_N).toBeCloseTo(0, 9);
  });

  it('a CMOD curve against a run without a gauge is refused in one sentence', () => {
    expect(refusal(() => compareCurves(run(false), [cmod]))).toBe(
      'the run "hand-made" has no CMOD (no control.gauge in the case), but the measured curve is against CMOD (the measured x column "COD" is a crack opening): add control.gauge to the case and run it again, or compare a displacement column (--x-column)');
  });

  it('curves of mixed meaning are refused', () => {
    expect(refusal(() => compareCurves(run(true), [cmod, disp]))).toMatch(/^the measured curves mix openings: cmod\.csv has CMOD \("COD"\) and disp\.csv a displacement \("Crosshead"\)/);
  });

  it('--x overrides the column meaning with a note', () => {
    const r = compareCurves(run(true), [disp], { xAxis: 'cmod' });
    expect(r.xAxis).toBe('cmod');
    expect(r.notes.join(' ')).toMatch(/disp\.csv: its x column "Crosshead" is a displacement but is compared as CMOD, as --x asks/);
  });

  it('fit refuses a CMOD curve for a case without a gauge before any simulation', async () => {
    const c = loadCase(join(ROOT, 'cases', 'fit-demo.yaml'));
    c.control = { ...c.control, by: 'displacement', target: 0.5, gauge: undefined };
    await expect(fitCase(c, cmod, { maxEvals: 3 })).rejects.toThrow(/^the case has no CMOD \(no control.gauge in the case\), but the measured curve is against CMOD/);
  });
});

describe('the command line refuses the axis with exit 2', () => {
  let dir = '';
  beforeAll(() => {
    ensureBuilt();
    dir = mkdtempSync(join(tmpdir(), 'rupta-axes-'));
    const r = run(false);
    const rows = Array.from(r.load, (P, i) => `${i},${r.displacement[i]},${P},${r.displacement[i]},,0,0,0,0,0,0,1`);
    mkdirSync(join(dir, 'run'));
    writeFileSync(join(dir, 'run', 'curve.csv'), ['step,control,load_N,displacement_mm,cmod_mm,crack_length_mm,tip_x_mm,tip_y_mm,external_work_Nmm,elastic_energy_Nmm,dissipated_Nmm,iterations', ...rows].join('\n') + '\n');
    writeFileSync(join(dir, 'run', 'summary.json'), JSON.stringify({ title: 'no gauge', workOfFracture: { ligamentArea_mm2: 1400 } }));
    writeFileSync(join(dir, 'lab.csv'), 'Zeit [s];Kraft [kN];Weg [mm];COD [mm]\n0;0;0;0\n1;0,8;0,04;0,01\n2;1,0;0,08;0,02\n3;0,6;0,2;0,05\n4;0,2;0,4;0,1\n');
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('COD (found first) against a run without a gauge: exit 2, one line, nothing written', async () => {
    const r = await rupta(['compare', 'run', 'lab.csv'], dir);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/^rupta: the run "no gauge" has no CMOD/);
    expect(existsSync(join(dir, 'run', 'compare.json'))).toBe(false);
  }, 60_000);

  it('--x-column Weg picks the crosshead and compares it with the displacement; a second compare needs --force', async () => {
    const r = await rupta(['compare', 'run', 'lab.csv', '--x-column', 'Weg', '--out', 'cmp'], dir);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/load against load-point displacement: the measured x column "Weg" is a displacement/);
    expect(existsSync(join(dir, 'cmp', 'compare.json'))).toBe(true);
    const again = await rupta(['compare', 'run', 'lab.csv', '--x-column', 'Weg', '--out', 'cmp'], dir);
    expect(again.code).toBe(2);
    expect(again.stderr).toMatch(/compare\.json already holds a comparison: give --force to replace it, or --out for another folder/);
    expect((await rupta(['compare', 'run', 'lab.csv', '--x-column', 'Weg', '--out', 'cmp', '--force'], dir)).code).toBe(0);
  }, 120_000);
});
