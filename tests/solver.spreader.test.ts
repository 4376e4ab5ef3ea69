// A spreader shares one machine force between load points in stated shares; the machine's
// travel is the share-weighted mean of the points' travels. Checked by statics (common
// practice: a statically determinate linkage passes each point its share whatever the
// specimen's stiffness) and by Clapeyron's theorem (work of the machine = twice the strain energy).
import { describe, expect, it } from 'vitest';
import { near, solveRig } from './support/rig.js';
import { parseCase } from '../src/case/index.js';
import { wedgeRatio } from '../src/output/warnings.js';

function beam(loads: string, supports = '{at: [10,0], fix: xy, width: 8}, {at: [190,0], fix: y, width: 8}'): string {
  return `
format: 1
units: mm-N-MPa
thickness: 10
geometry: {outline: [[0,0],[200,0],[200,40],[0,40]]}
material: {E: 30000, nu: 0.2, ft: 3, GF: 0.1}
supports: [${supports}]
loads: [${loads}]
control: {by: displacement, target: 0.01}
mesh: {size: 6, tipSize: 6, refineRadius: 6, seed: 4, lloyd: 4}
`;
}

/** Force of the vertices within r of p on the machine, along −y (positive when pushed down). */
function pushed(s: ReturnType<typeof solveRig>, p: [number, number], r: number): { F: number; M: number; travel: number } {
  let F = 0, M = 0, travel = 0;
  for (const v of near(s.mesh, p, r)) {
    F -= s.f[2 * v + 1]; M -= s.f[2 * v + 1] * (s.mesh.xy[2 * v] - p[0]);
    if (Math.hypot(s.mesh.xy[2 * v] - p[0], s.mesh.xy[2 * v + 1] - p[1]) < 1e-9) travel = -s.u[2 * v + 1];
  }
  return { F, M, travel };
}

function strainEnergy(s: ReturnType<typeof solveRig>): number {
  let e = 0;
  for (let i = 0; i < s.u.length; i++) e += 0.5 * s.u[i] * s.f[i];
  return e;
}

describe('spreader', () => {
  it('passes two point loads their shares 1:2, the machine travel being their weighted mean', () => {
    const s = solveRig(beam('{at: [70,40], direction: [0,-1], share: 1}, {at: [130,40], direction: [0,-1], share: 2}'));
    const F = s.load, a = pushed(s, [70, 40], 1e-6), b = pushed(s, [130, 40], 1e-6);
    expect(F).toBeGreaterThan(0);
    expect(Math.abs(a.F - F / 3) / F).toBeLessThan(1e-9);
    expect(Math.abs(b.F - 2 * F / 3) / F).toBeLessThan(1e-9);
    expect(Math.abs(s.lambda - (a.travel + 2 * b.travel) / 3) / s.lambda).toBeLessThan(1e-12);
    expect(a.travel).not.toBeCloseTo(b.travel, 6); // the points move apart: the spreader tilts
    // support reactions by the lever rule over the 180 mm between the pivots
    let left = 0;
    for (const v of near(s.mesh, [10, 0], 4.001)) left += s.f[2 * v + 1];
    expect(Math.abs(left - (a.F * 120 + b.F * 60) / 180) / F).toBeLessThan(1e-8);
    expect(Math.abs(0.5 * F * s.lambda - strainEnergy(s)) / (F * s.lambda)).toBeLessThan(1e-9);
  });

  it('drives rocker strips with equal shares, each carrying half and no moment', () => {
    const s = solveRig(beam('{at: [60,40], direction: [0,-1], width: 8, share: 1}, {at: [140,40], direction: [0,-1], width: 8, share: 1}'));
    const F = s.load, a = pushed(s, [60, 40], 4.001), b = pushed(s, [140, 40], 4.001);
    expect(Math.abs(a.F - F / 2) / F).toBeLessThan(1e-9);
    expect(Math.abs(b.F - F / 2) / F).toBeLessThan(1e-9);
    expect(Math.abs(a.M) / (F * 4)).toBeLessThan(1e-8);
    expect(Math.abs(b.M) / (F * 4)).toBeLessThan(1e-8);
  });

  it('shares among three points as stated (1:1:2)', () => {
    const s = solveRig(beam('{at: [50,40], direction: [0,-1], share: 1}, {at: [100,40], direction: [0,-1], share: 1}, {at: [150,40], direction: [0,-1], share: 2}'));
    const F = s.load;
    expect(Math.abs(pushed(s, [50, 40], 1e-6).F - F / 4) / F).toBeLessThan(1e-9);
    expect(Math.abs(pushed(s, [100, 40], 1e-6).F - F / 4) / F).toBeLessThan(1e-9);
    expect(Math.abs(pushed(s, [150, 40], 1e-6).F - F / 2) / F).toBeLessThan(1e-9);
  });

  it('refuses a share on some loads only, and an oblique direction, in one sentence', () => {
    expect(() => parseCase(beam('{at: [70,40], direction: [0,-1], share: 1}, {at: [130,40], direction: [0,-1]}'), 'x.yaml'))
      .toThrow(/^loads\[1\]\.share must be given on every load when loads\[0\] has one .* \(found none\)$/);
    expect(() => parseCase(beam('{at: [70,40], direction: [1,-1], share: 1}, {at: [130,40], direction: [0,-1], share: 1}'), 'x.yaml'))
      .toThrow(/^loads\[0\]\.direction must be along x or y when the loads share a spreader/);
    expect(() => parseCase(beam('{at: [70,40], direction: [0,-1], share: 0}, {at: [130,40], direction: [0,-1], share: 1}'), 'x.yaml'))
      .toThrow(/^loads\[0\]\.share must be a positive share of the machine force/);
  });

  it('a wedge puts the machine force on each groove face and travels by the opening between them (statics)', () => {
    const text = `
format: 1
units: mm-N-MPa
thickness: 10
geometry: {outline: [[0,0],[100,0],[100,100],[60,100],[60,80],[40,80],[40,100],[0,100]], notches: [{from: [50, 80], to: [50, 50], width: 2}]}
material: {E: 30000, nu: 0.2, ft: 3, GF: 0.1}
supports: [{at: [40,0], fix: xy}, {at: [60,0], fix: y}]
loads: [{at: [40,90], direction: [-1,0], width: 6}, {at: [60,90], direction: [1,0], width: 6}]
wedge: {angle: 15}
control: {by: displacement, target: 0.01}
mesh: {size: 5, tipSize: 5, refineRadius: 5, seed: 2, lloyd: 4}
`;
    const s = solveRig(text);
    let left = 0, right = 0;
    for (const v of near(s.mesh, [40, 90], 3.001)) left -= s.f[2 * v];
    for (const v of near(s.mesh, [60, 90], 3.001)) right += s.f[2 * v];
    expect(Math.abs(left - s.load) / s.load).toBeLessThan(1e-9);
    expect(Math.abs(right - s.load) / s.load).toBeLessThan(1e-9);
    const a = near(s.mesh, [40, 90], 1e-6)[0], b = near(s.mesh, [60, 90], 1e-6)[0];
    expect(Math.abs(s.u[2 * b] - s.u[2 * a] - s.lambda) / s.lambda).toBeLessThan(1e-12);
    // a frictionless wedge of included angle 2θ: vertical force = 2·tan θ × splitting force (statics)
    expect(wedgeRatio(15)).toBeCloseTo(2 * Math.tan(7.5 * Math.PI / 180), 14);
  });
});
