// Rigid platens: a bearing strip is a rocker (rigid, rotating about its centre) unless the
// case clamps it. Checks: a uniform field through a platen (patch test, Beirão da Veiga et
// al. 2013: a linear displacement field is reproduced exactly), and the statics of a simply
// supported beam on rockers, whose reactions follow from the lever rule alone (common practice).
import { describe, expect, it } from 'vitest';
import { near, solveRig } from './support/rig.js';

const block = `
format: 1
units: mm-N-MPa
thickness: 5
geometry: {outline: [[0,0],[40,0],[40,20],[0,20]]}
material: {E: 30000, nu: 0.2, ft: 3, GF: 0.1}
supports: [{along: [[0,0],[40,0]], fix: y}, {at: [0,0], fix: x}]
loads: [{at: [20,20], direction: [0,-1], width: 40}]
control: {by: displacement, target: 0.01}
mesh: {size: 5, tipSize: 5, refineRadius: 5, seed: 3, lloyd: 4}
`;

function beam(platen: string, loadWidth = 0): string {
  return `
format: 1
units: mm-N-MPa
thickness: 10
geometry: {outline: [[0,0],[200,0],[200,40],[0,40]]}
material: {E: 30000, nu: 0.2, ft: 3, GF: 0.1}
supports: [{at: [10,0], fix: xy, width: 8, platen: ${platen}}, {at: [190,0], fix: y, width: 8, platen: ${platen}}]
loads: [{at: [70,40], direction: [0,-1], width: ${loadWidth}, platen: ${platen}}]
control: {by: displacement, target: 0.01}
mesh: {size: 6, tipSize: 6, refineRadius: 6, seed: 2, lloyd: 4}
`;
}

/** Sum of the y reactions over the vertices within r of p, and their moment about p. */
function reaction(s: ReturnType<typeof solveRig>, p: [number, number], r: number): { R: number; M: number } {
  let R = 0, M = 0;
  for (const v of near(s.mesh, p, r)) { R += s.f[2 * v + 1]; M += s.f[2 * v + 1] * (s.mesh.xy[2 * v] - p[0]); }
  return { R, M };
}

describe('rocker platens', () => {
  it('pass a uniform compression exactly (patch test)', () => {
    const s = solveRig(block);
    // uniaxial stress E·λ/H over the width W and thickness t
    const exact = 30000 * 0.01 / 20 * 40 * 5;
    expect(Math.abs(s.load - exact) / exact).toBeLessThan(1e-9);
    for (const v of near(s.mesh, [20, 20], 20.001)) if (Math.abs(s.mesh.xy[2 * v + 1] - 20) < 1e-9) expect(s.u[2 * v + 1]).toBeCloseTo(-0.01, 12);
  });

  it('carry no moment, so the beam reactions follow the lever rule (statics, common practice)', () => {
    const s = solveRig(beam('rocker'));
    const F = s.load, left = reaction(s, [10, 0], 4.001), right = reaction(s, [190, 0], 4.001);
    // pivots 180 mm apart, load 60 mm from the left pivot
    expect(Math.abs(left.R - F * 120 / 180) / F).toBeLessThan(1e-8);
    expect(Math.abs(right.R - F * 60 / 180) / F).toBeLessThan(1e-8);
    expect(Math.abs(left.M) / (F * 4)).toBeLessThan(1e-8);
    expect(Math.abs(right.M) / (F * 4)).toBeLessThan(1e-8);
    // the strip stays straight: its points' uy are linear in x
    const pts = near(s.mesh, [10, 0], 4.001).filter((v) => Math.abs(s.mesh.xy[2 * v + 1]) < 1e-9);
    const [a, b] = [pts[0], pts[pts.length - 1]];
    const slope = (s.u[2 * b + 1] - s.u[2 * a + 1]) / (s.mesh.xy[2 * b] - s.mesh.xy[2 * a]);
    expect(Math.abs(slope)).toBeGreaterThan(1e-6); // it does rotate
    for (const v of pts) expect(Math.abs(s.u[2 * v + 1] - (s.u[2 * a + 1] + slope * (s.mesh.xy[2 * v] - s.mesh.xy[2 * a])))).toBeLessThan(1e-12);
  });

  it('differ from clamped strips, which take up a moment', () => {
    const s = solveRig(beam('clamped'));
    const left = reaction(s, [10, 0], 4.001);
    expect(Math.abs(left.M) / (s.load * 4)).toBeGreaterThan(1e-3);
    expect(s.load).toBeGreaterThan(solveRig(beam('rocker')).load);
  });

  it('let a loading strip tilt under an off-centre load with no moment about its pivot', () => {
    const s = solveRig(beam('rocker', 10));
    const top = reaction(s, [70, 40], 5.001);
    expect(Math.abs(top.R + s.load) / s.load).toBeLessThan(1e-9); // the machine force is the strip's resultant
    expect(Math.abs(top.M) / (s.load * 5)).toBeLessThan(1e-8);
  });
});
