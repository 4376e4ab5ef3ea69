// Checkpoint text keeps every bit of every number (−0, NaN, infinities, typed arrays) and
// belongs to one case: a changed or damaged one is refused with one sentence (common practice).
import { fileURLToPath } from 'node:url';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadCase } from '../src/case/index.js';
import { InputError } from '../src/errors.js';
import { caseHash, decodeCheckpoint, encodeCheckpoint, type AnalysisState } from '../src/fracture/checkpoint.js';

const ROOT = fileURLToPath(new URL('..', import.meta.url));
const c = loadCase(join(ROOT, 'cases', 'beam-3pb-demo.yaml'));

function sample(): AnalysisState {
  const odd = [-0, 0.1 + 0.2, Math.PI, Number.MIN_VALUE, -Number.MAX_VALUE, NaN, Infinity, -Infinity];
  return {
    mesh: {
      x: Float64Array.from(odd), y: Float64Array.from([1 / 3, -0]), cells: [[0, 1, 2], null], family: [-1, 0],
      families: [{ children: [1], open: true, parentId: 0, parentFamily: -1 }],
      pinned: Uint8Array.from([1, 0, 1]), face: new Uint8Array(16), cracked: [false, true],
      from: [null, { v: [0], w: [1] }], cellsAround: [[0], [1, 0], []],
    },
    cracks: [{ kind: 'cohesive', path: [0, 1], twins: [-1, 2] }],
    tips: [{ crack: 0, v: 1, dx: -0, dy: 1, back: [0.5, -0], active: true, slit: -1 }],
    kappa: [[1, 1e-300], [2, -0]],
    uw: Float64Array.from(odd), lambda: -0, W: 1 / 7, lastF: NaN, lastLambda: 2 ** -1074,
    loop: { inc: 3, frac: 0.125, done: 0.07500000000000001, step: 9, peak: { load_N: 2135.3, displacement_mm: 0.072, cmod_mm: null, step: 4 } },
    rows: Array.from({ length: 10 }, (_, i) => ({ step: i, load_N: i / 3 })) as unknown as AnalysisState['rows'], lastProbes: [], dofs: { initial: 10, final: 12, max: 12 }, growthLog: [], solveTime: 0.5,
  };
}

const bits = (a: Float64Array) => Array.from(new Uint32Array(a.buffer));

describe('checkpoint text', () => {
  it('decodes to the same state bit for bit', () => {
    const s = sample();
    const back = decodeCheckpoint(encodeCheckpoint(c, s), c, 'out/x');
    expect(bits(back.uw)).toEqual(bits(s.uw));
    expect(bits(back.mesh.x)).toEqual(bits(s.mesh.x));
    expect(Object.is(back.lambda, -0)).toBe(true);
    expect(Object.is(back.tips[0].dx, -0)).toBe(true);
    expect(Object.is(back.kappa[1][1], -0)).toBe(true);
    expect(back.lastF).toBeNaN();
    expect(back.mesh.pinned).toEqual(s.mesh.pinned);
    expect(back.mesh.face).toHaveLength(16);
    // the rest compares by value (toEqual tells −0 from 0 and handles NaN)
    expect(back).toEqual(s);
  });

  it('refuses another case, a damaged text and another format, each in one sentence naming the folder', () => {
    const text = encodeCheckpoint(c, sample());
    const other = { ...c, material: { ...c.material, GF: c.material.GF * 1.01 } };
    expect(caseHash(other)).not.toBe(caseHash(c));
    // the file name alone does not make another case
    expect(caseHash({ ...c, name: 'renamed' })).toBe(caseHash(c));
    expect(() => decodeCheckpoint(text, other, 'out/x')).toThrow(InputError);
    expect(() => decodeCheckpoint(text, other, 'out/x')).toThrow(/^the case has changed since the run in out\/x was started/);
    expect(() => decodeCheckpoint(text.slice(0, 100), c, 'out/x')).toThrow(/^the checkpoint in out\/x is damaged/);
    expect(() => decodeCheckpoint(text.replace('"format":2', '"format":7'), c, 'out/x')).toThrow(/format 7, expected 2/);
  });

  it('refuses a text that still parses but was damaged or edited, by its checksum and its rows', () => {
    const text = encodeCheckpoint(c, sample());
    // one digit changed in the body: valid JSON, wrong checksum
    const edited = text.replace('"load_N":0.3333333333333333', '"load_N":0.3333333333333334');
    expect(edited).not.toBe(text);
    expect(() => decodeCheckpoint(edited, c, 'out/x')).toThrow(/^the checkpoint in out\/x is damaged \(checkpoint\.json does not match its checksum\)/);
    // emptied rows with a checksum made to match: the rows no longer reach the checkpoint's step
    const s = sample();
    s.rows = [];
    expect(() => decodeCheckpoint(encodeCheckpoint(c, s), c, 'out/x')).toThrow(/is damaged \(its rows or state are incomplete\)/);
    expect(() => decodeCheckpoint(text.split('\n')[1]!, c, 'out/x')).toThrow(/^the checkpoint in out\/x is (damaged|not one this version)/);
  });
});
