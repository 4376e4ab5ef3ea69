// The growth criterion and the step control as pure functions: each rule of DEVELOPERS.md's
// method notes ("Segments are laid ahead of the process zone", "The step is cut back …") is
// checked on hand-made inputs. These are the project's own rules, not published values; the
// kink formula is Erdogan & Sih (1963), REFERENCES.md.
import { describe, expect, it } from 'vitest';
import { readiness, endPairLoad, frontDistance, softeningJump, overshootLimit, faceKink, limitTurn } from '../src/fracture/criterion.js';
import { startState, propose, cut, accept, settle, MIN_FRACTION } from '../src/fracture/steps.js';
import { emptyState, save, restore, SOLUTION } from '../src/fracture/state.js';
import { makeLaw } from '../src/cohesive/laws.js';

// a straight crack along x: vertices 0..4 at x = 0, 2, 4, 6, 8; vertex 0 is the start
// (no twin), 4 the tip (no twin yet); pairs on 1, 2, 3
const x = [0, 2, 4, 6, 8], y = [0, 0, 0, 0, 0];
const faces = { path: [0, 1, 2, 3, 4], twins: [-1, 11, 12, 13, -1], fromEnd: true };
const pairOf = new Map([[1, 0], [2, 1], [3, 2]]);
const ft = 3, penalty = 1000;
const load = (k: number[]) => ({ pairOf, kap: Float64Array.from(k), penalty, ft });

describe('readiness of a tip to lay its next segment (own rule, DEVELOPERS.md)', () => {
  it('reads the face pair next to the tip as its traction over ft', () => {
    // κ = 0.0015 mm on the intact branch: traction 1.5 MPa = 0.5 ft
    expect(endPairLoad(faces, load([0, 0, 0.0015]))).toBeCloseTo(0.5, 12);
    expect(endPairLoad({ ...faces, fromEnd: false }, load([0.0015, 0, 0]))).toBeCloseTo(0.5, 12);
    expect(endPairLoad({ path: [0, 4], twins: [-1, -1], fromEnd: true }, load([]))).toBe(0);
  });

  it('measures the front distance back along the path to the first pair at insertAt·ft', () => {
    // pair on vertex 2 (x = 4) has reached 0.9 ft; from the tip at x = 8 that is 4 mm
    const l = load([0.003, 0.0027, 0.001]);
    expect(frontDistance(faces, l, x, y, 0.9)).toBeCloseTo(4, 12);
    expect(frontDistance(faces, l, x, y, 0.95)).toBeCloseTo(6, 12);
    expect(frontDistance(faces, l, x, y, 1.5)).toBe(Infinity);
  });

  it("reads each pair against its own ft where a strength field varies it", () => {
    // the same κ = 0.0015 mm (1.5 MPa) on a pair of strength 2 MPa is 0.75 of its ft, not 0.5
    const own = { ...load([0, 0, 0.0015]), pairFt: [3, 3, 2] };
    expect(endPairLoad(faces, own)).toBeCloseTo(0.75, 12);
    // the pair on x = 6 (ft 2) has reached 0.9 of its own ft at κ = 0.0018: 2 mm from the tip
    expect(frontDistance(faces, { ...load([0, 0, 0.0018]), pairFt: [3, 3, 2] }, x, y, 0.9)).toBeCloseTo(2, 12);
    expect(frontDistance(faces, load([0, 0, 0.0018]), x, y, 0.9)).toBe(Infinity);
  });

  it('lays a first segment at any tensile stress, then by stress only while the front is near', () => {
    const base = { ft, insertAt: 0.9, growthStep: 4 };
    expect(readiness({ ...base, s1: 0.1, faces: null })).toBe(Infinity);
    expect(readiness({ ...base, s1: -0.1, faces: null })).toBe(0);
    // front within one growth step: s1/(insertAt·ft)
    expect(readiness({ ...base, s1: 2.7, faces: { frontDistance: 4, endPairLoad: 0.1 } })).toBeCloseTo(1, 12);
    // front too far back: only the end pair counts
    expect(readiness({ ...base, s1: 2.7, faces: { frontDistance: 6, endPairLoad: 0.45 } })).toBeCloseTo(0.5, 12);
    expect(overshootLimit(0.9)).toBeCloseTo(1 / 0.9, 12);
    expect(overshootLimit(1)).toBe(1.05);
  });
});

describe('softening allowed in one step (own rule, DEVELOPERS.md: 5 % of ft, the peak counts ten times)', () => {
  const law = makeLaw('linear', ft, 0.06); // wc = 2 GF/ft = 0.04 mm (common practice)
  const l0 = ft / penalty;
  const jump = (k0: number[], k1: number[]) => softeningJump(Float64Array.from(k0), Float64Array.from(k1), ft, penalty, (w) => law.stress(w));
  it('is the largest stress drop over ft between the committed and trial histories', () => {
    // on the linear branch σ falls by ft·Δw/wc: Δw = 0.002 mm → 5 %
    expect(jump([l0 + 0.01], [l0 + 0.012])).toBeCloseTo(0.05, 12);
    expect(jump([l0 + 0.01, l0], [l0 + 0.011, l0])).toBeCloseTo(0.025, 12);
    // unloading or still intact: no softening
    expect(jump([l0 + 0.01], [l0 + 0.005])).toBe(0);
    expect(jump([0], [0.5 * l0])).toBe(0);
  });
  it('counts the step over the peak ten times', () => {
    expect(jump([0.5 * l0], [l0 + 0.0002])).toBeCloseTo(10 * 0.005, 12);
  });
});

describe('kink and turn limit', () => {
  it('goes straight on for pure opening and turns away from sliding (Erdogan & Sih 1963)', () => {
    // faces behind a tip at x = 8 running +x; plus face above: opening only
    const path = [0, 1, 2], twins = [-1, 3, -1], xs = [4, 6, 8, 6], ys = [0, 0, 0, 0];
    const u = new Float64Array(8);
    u[2 * 1 + 1] = 0.01; // plus face of the pair at x = 6 moves up
    const d = faceKink(path, twins, 1, xs, ys, u, { v: 2, dx: 1, dy: 0 }, 3)!;
    expect(d[0]).toBeCloseTo(1, 12); expect(d[1]).toBeCloseTo(0, 12);
    // K_II/K_I = 1: θc = 2 arctan((1 − 3)/4) = −53.13° (Erdogan & Sih 1963)
    u[2 * 1] = 0.01;
    const k = faceKink(path, twins, 1, xs, ys, u, { v: 2, dx: 1, dy: 0 }, 3)!;
    expect(Math.atan2(k[1], k[0]) * 180 / Math.PI).toBeCloseTo(-53.130, 3);
    // closed faces: no kink from them
    expect(faceKink(path, twins, 1, xs, ys, new Float64Array(8), { v: 2, dx: 1, dy: 0 }, 3)).toBeNull();
  });
  it('limits the turn per growth step', () => {
    const [gx, gy] = limitTurn(1, 0, 0, 1, Math.PI / 12);
    expect(Math.atan2(gy, gx)).toBeCloseTo(Math.PI / 12, 12);
    expect(limitTurn(1, 0, Math.cos(0.1), Math.sin(0.1), Math.PI / 12)).toEqual([Math.cos(0.1), Math.sin(0.1)]);
  });
});

describe('step control on plain data', () => {
  it('proposes the rest of the increment, cuts in halves and widens after success', () => {
    const at = startState();
    expect(propose(at, 1, 10)).toBeCloseTo(0.1, 15);
    expect(cut(at)).toBe(false);
    expect(propose(at, 1, 10)).toBeCloseTo(0.05, 15);
    accept(at, 0.05, false);
    settle(at, { load_N: 5, displacement_mm: 0.05, cmod_mm: null } as never);
    expect(at).toMatchObject({ step: 1, done: 0.05, frac: 1, peak: { load_N: 5, step: 1 } });
    expect(propose(at, 1, 10)).toBeCloseTo(0.1, 15);
    accept(at, 0.1, false);
    expect(propose(at, 1, 10)).toBeNull();
    expect(at.inc).toBe(2);
    for (let i = 0; i < 6; i++) cut(at);
    expect(at.frac).toBe(MIN_FRACTION);
    expect(cut(at)).toBe(true);
  });
  it('keeps the crack opening in charge while the control value falls back (snap-back)', () => {
    const at = startState();
    at.done = 0.2;
    accept(at, 0.19, true);
    expect(at).toMatchObject({ opening: true, done: 0.2 });
    accept(at, 0.21, true);
    expect(at).toMatchObject({ opening: false, done: 0.21 });
  });
});

describe('the loop state is one plain record', () => {
  it('saves and puts back parts as copies, so one snapshot serves more than once', () => {
    const s = emptyState(3);
    s.uw[1] = 1; s.W = 2;
    const saved = save(s, SOLUTION);
    s.uw[1] = 5; s.W = 7;
    restore(s, saved);
    expect([s.uw[1], s.W]).toEqual([1, 2]);
    s.uw[1] = 9;
    restore(s, saved);
    expect(s.uw[1]).toBe(1);
    expect(structuredClone(s)).toEqual(s);
  });
});
