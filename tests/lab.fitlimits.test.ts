// rupta fit through the real command line: --max-evals is a hard limit counted over every
// simulation, the history is written row by row, an unfinished fit is not called fitted
// (exit 3), earlier fits are kept without --force, and meaningless options or lab values are
// refused with one sentence (exit 2) before any simulation.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { spawn } from 'node:child_process';
import { parse, stringify } from 'yaml';
import { CLI, ensureBuilt, rupta, ROOT } from './support/cli.js';

let dir = '';
beforeAll(() => {
  ensureBuilt();
  dir = mkdtempSync(join(tmpdir(), 'rupta-fitlim-'));
  // the fit demo made coarse: a simulation takes a second or two
  const c = parse(readFileSync(join(ROOT, 'cases', 'fit-demo.yaml'), 'utf8')) as Record<string, any>;
  c.mesh = { size: 12.5, tipSize: 3.125 };
  c.control.increments = 30;
  writeFileSync(join(dir, 'beam.yaml'), stringify(c));
  writeFileSync(join(dir, 'lab.csv'), readFileSync(join(ROOT, 'cases', 'fit-demo-lab.csv')));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const fit = (...extra: string[]) => rupta(['fit', 'beam.yaml', '--lab', 'lab.csv', '--workers', '0', '--quiet', ...extra], dir, 300_000);

describe('rupta fit limits', () => {
  it('--max-evals 3 runs exactly 3 simulations, writes them as they go, and is not called fitted (exit 3)', async () => {
    const r = await fit('--max-evals', '3', '--out', 'f3');
    expect(r.code).toBe(3);
    expect(r.stderr).toMatch(/^rupta: the fit stopped at --max-evals: stopped at the limit of 3 simulations before the optimiser had closed/);
    const rows = readFileSync(join(dir, 'f3', 'fit-history.csv'), 'utf8').trim().split('\n');
    expect(rows[0]).toBe('evaluation,phase,E_MPa,ft_MPa,GF_Nmm,rmse_over_peak,peak_N,status,seconds,best_rmse_over_peak');
    expect(rows).toHaveLength(1 + 3);
    const json = JSON.parse(readFileSync(join(dir, 'f3', 'fit.json'), 'utf8'));
    expect(json.status).toBe('limit');
    expect(json.evaluations).toBe(3);
    expect(existsSync(join(dir, 'f3', 'beam-fitted.yaml'))).toBe(false);
    expect(readFileSync(join(dir, 'f3', 'beam-best-so-far.yaml'), 'utf8')).toMatch(/^# NOT FITTED: the best values so far/);
  }, 300_000);

  it('an earlier fit is kept without --force (exit 2), replaced with it', async () => {
    const before = readFileSync(join(dir, 'f3', 'fit-history.csv'), 'utf8');
    const r = await fit('--max-evals', '2', '--out', 'f3');
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/f3 already holds a fit \(beam-best-so-far\.yaml\): give --force to replace it, or --out for another folder\n$/);
    expect(readFileSync(join(dir, 'f3', 'fit-history.csv'), 'utf8')).toBe(before);
    const f = await fit('--max-evals', '2', '--out', 'f3', '--force');
    expect(f.code).toBe(3);
    expect(readFileSync(join(dir, 'f3', 'fit-history.csv'), 'utf8').trim().split('\n')).toHaveLength(3);
  }, 300_000);

  it('simulations over their time limit are not results: the fit failed (exit 3) and writes no case', async () => {
    const r = await fit('--max-evals', '4', '--sim-timeout', '0.001', '--out', 'slow');
    expect(r.code).toBe(3);
    expect(r.stderr).toMatch(/^rupta: the fit failed: (no candidate simulation gave a curve|the limit of 4 simulations came before any candidate gave a curve) over the measured range/);
    expect(readFileSync(join(dir, 'slow', 'fit-history.csv'), 'utf8')).toMatch(/,timed out,/);
    expect(JSON.parse(readFileSync(join(dir, 'slow', 'fit.json'), 'utf8')).status).toBe('failed');
    expect(existsSync(join(dir, 'slow', 'beam-fitted.yaml')) || existsSync(join(dir, 'slow', 'beam-best-so-far.yaml'))).toBe(false);
  }, 300_000);

  it('Ctrl-C keeps the history, the report and the best so far (exit 3)', async () => {
    const child = spawn(process.execPath, [CLI, 'fit', 'beam.yaml', '--lab', 'lab.csv', '--workers', '0', '--quiet', '--out', 'int'], { cwd: dir, env: { ...process.env, RUPTA_DEBUG: '' } });
    let stderr = '';
    child.stderr.on('data', (d) => { stderr += String(d); });
    const hist = join(dir, 'int', 'fit-history.csv');
    // wait for the third simulation (an estimate with a curve), then interrupt
    for (let t = 0; t < 2400; t++) {
      if (existsSync(hist) && readFileSync(hist, 'utf8').trim().split('\n').length >= 4) break;
      await new Promise((r) => setTimeout(r, 100));
    }
    child.kill('SIGINT');
    const code = await new Promise<number | null>((res) => child.on('exit', (c) => res(c)));
    expect(code).toBe(3);
    expect(stderr).toMatch(/rupta: the fit was interrupted: interrupted after \d+ simulations; the values are the best so far/);
    const json = JSON.parse(readFileSync(join(dir, 'int', 'fit.json'), 'utf8'));
    expect(json.status).toBe('interrupted');
    expect(readFileSync(hist, 'utf8').trim().split('\n').length).toBe(1 + json.evaluations);
    expect(existsSync(join(dir, 'int', 'beam-best-so-far.yaml'))).toBe(true);
  }, 300_000);

  const refused: [string, string[], RegExp, string?][] = [
    ['fractional increments', ['--increments', '2.5'], /^rupta: --increments must be a whole number, 2 or more \(found "2\.5"\)\n$/],
    ['no simulations allowed', ['--max-evals', '0'], /^rupta: --max-evals must be a whole number, 1 or more \(found "0"\)\n$/],
    ['a fitting mesh coarser than the beam', ['--mesh-size', '40'], /^rupta: --mesh-size 40 mm is more than half the specimen's shorter side \(50 mm\)/],
    ['a bad series mode', ['--series', 'median'], /^rupta: --series must be all or mean \(found "median"\)\n$/],
    ['loads a thousand times too small (kN read as N)', ['--load-unit', 'N'], /^rupta: the measured peak load 1\.0\d N is 1\/4\.\de\+3 of ft × ligament area of the case \(4\.20e\+3 N\): expected a load in N within a factor 10 above or 1000 below it; check the load unit \(--load-unit\) or the case\n$/],
    ['loads a thousand times too large (N read as kN)', [], /^rupta: the measured peak load 1\.00e\+6 N is 2\.4e\+2 times ft × ligament area/, 'cmod [mm];load [kN]\n0;0\n0,01;500\n0,02;1000\n0,03;400\n0,04;100\n'],
    ['an overflowing lab value', [], /^rupta: bad\.csv line 3: the value "1e999" is too large for a number/, 'cmod [mm];load [N]\n0;0\n0,01;1e999\n0,02;500\n'],
    ['an all-zero load', [], /^rupta: bad\.csv: the load column "load" is zero in every row/, 'cmod [mm];load [N]\n0;0\n0,01;0\n0,02;0\n'],
  ];
  for (const [what, args, message, lab] of refused) {
    it(`refuses ${what} with one sentence (exit 2) and writes nothing`, async () => {
      const out = `bad-${what.replace(/\W+/g, '-')}`;
      let r;
      if (lab) {
        writeFileSync(join(dir, 'bad.csv'), lab);
        r = await rupta(['fit', 'beam.yaml', '--lab', 'bad.csv', '--workers', '0', '--quiet', '--out', out], dir, 120_000);
      } else r = await fit(...args, '--out', out);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(message);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
      expect(existsSync(join(dir, out))).toBe(false);
    }, 120_000);
  }
});
