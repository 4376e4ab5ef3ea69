// The fit checkpoint's lines: every bit of a simulated curve read back (−0, NaN and infinities
// too), a line cut off by a kill dropped, a damaged one refused with one sentence, and a changed
// setup named.
import { describe, expect, it } from 'vitest';
import { InputError } from '../src/errors.js';
import { decodeFitCheckpoint, fitCheckpointHeader, fitCheckpointLine, setupDifference } from '../src/lab/fitcheckpoint.js';
import type { FitSetup } from '../src/lab/fit.js';

const setup: FitSetup = { caseHash: 'a'.repeat(64), labHash: 'b'.repeat(64), options: { params: ['ft', 'GF'], maxEvals: 10, threads: 0 } };
const sim = (n: number) => ({
  n, key: `k${n}`,
  sim: {
    status: 'complete' as const, reason: '', seconds: 1.25,
    load: Float64Array.from([0, 0.1 + 0.2, -0, 1 / 3, 1e-320, NaN, Infinity, -Infinity]),
    displacement: Float64Array.from([0, 1e-9, 2.5]), cmod: null,
  },
});
const bits = (a: Float64Array) => Array.from(new Uint8Array(a.buffer));

describe('fit checkpoint lines', () => {
  it('read back every bit of the curves', () => {
    const text = fitCheckpointHeader(setup) + '\n' + fitCheckpointLine(sim(1)) + '\n' + fitCheckpointLine(sim(2)) + '\n';
    const ck = decodeFitCheckpoint(text, 'x/fit-checkpoint.jsonl');
    expect(ck.setup).toEqual(setup);
    expect([...ck.sims.keys()]).toEqual([1, 2]);
    const s = ck.sims.get(2)!;
    expect(s.key).toBe('k2');
    expect(bits(s.sim.load)).toEqual(bits(sim(2).sim.load));
    expect(Object.is(s.sim.load[2], -0)).toBe(true);
    expect(bits(s.sim.displacement)).toEqual(bits(sim(2).sim.displacement));
    expect(s.sim.cmod).toBeNull();
    expect(ck.text).toBe(text);
  });

  it('drop a last line cut off by a kill; a later line for the same number wins', () => {
    const whole = fitCheckpointHeader(setup) + '\n' + fitCheckpointLine(sim(1)) + '\n' + fitCheckpointLine({ ...sim(1), key: 'again' }) + '\n';
    const cut = whole + fitCheckpointLine(sim(2)).slice(0, 40);
    const ck = decodeFitCheckpoint(cut, 'x');
    expect([...ck.sims.keys()]).toEqual([1]);
    expect(ck.sims.get(1)!.key).toBe('again');
    expect(ck.text).toBe(whole);
  });

  it('refuse a changed line, a foreign first line and an empty file with one sentence', () => {
    const line = fitCheckpointLine(sim(1)).replace('"seconds":1.25', '"seconds":1.5');
    const refused = (t: string) => { try { decodeFitCheckpoint(t, 'f/fit-checkpoint.jsonl'); } catch (e) { expect(e).toBeInstanceOf(InputError); return (e as Error).message; } return ''; };
    expect(refused(fitCheckpointHeader(setup) + '\n' + line + '\n')).toBe('the fit checkpoint f/fit-checkpoint.jsonl is damaged at line 2 (it does not match its checksum); start the fit again with --force');
    expect(refused('{"format":1}\n')).toMatch(/damaged at line 1 \(it does not match its checksum\)/);
    expect(refused('')).toBe('the fit checkpoint f/fit-checkpoint.jsonl is empty; start the fit again with --force');
  });

  it('name what changed in the setup', () => {
    expect(setupDifference(setup, setup)).toBeNull();
    expect(setupDifference(setup, { ...setup, caseHash: 'c' })).toBe('the case is not the one the fit was started with');
    expect(setupDifference(setup, { ...setup, options: { ...setup.options, maxEvals: 12, threads: 2 } })).toBe('maxEvals was 10, now 12; threads was 0, now 2');
  });
});
