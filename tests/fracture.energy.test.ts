// Energy balance and the definition of GF: the work of the machine equals the elastic energy
// stored plus the energy dissipated on the crack faces (energy balance); once a straight
// mode-I crack has separated a ligament of area A, the energy dissipated is GF·A
// (definition of GF; RILEM TC 50-FMC work of fracture).
import { describe, expect, it } from 'vitest';
import { parseCase } from '../src/case/index.js';
import { Analysis } from '../src/fracture/analysis.js';
import { meshCase } from '../src/run.js';
import { penaltyFor } from '../src/cohesive/interface.js';

const GF = 0.05, FT = 3, T = 10, E = 30000, TIP = 1.5;
const plate = parseCase(`
format: 1
title: single-edge-notched plate in tension
units: mm-N-MPa
thickness: ${T}
geometry:
  outline: [[0,0],[100,0],[100,100],[0,100]]
  notches: [{from: [0, 50], to: [20, 50], width: 0}]
material: {E: ${E}, nu: 0.2, ft: ${FT}, GF: ${GF}, softening: linear}
supports: [{along: [[0,0],[100,0]], fix: y}, {at: [0,0], fix: x}]
loads: [{along: [[0,100],[100,100]], direction: [0, 1]}]
control: {by: cmod, gauge: {from: [0, 48], to: [0, 52]}, target: 0.2, increments: 100, stopAtLoadFraction: 0.01}
crack: {start: notch-tips, growthStep: 3, averagingRadius: 5}
mesh: {size: 8, tipSize: ${TIP}, refineRadius: 12, seed: 3}
output: {frames: []}
`, 'sen.yaml');

describe('energy balance on a single-edge-notched plate pulled apart', () => {
  it('work = elastic + dissipated within 1 % at every step, and dissipation = GF × separated area within 3 %', async () => {
    const a = new Analysis(plate, meshCase(plate).mesh);
    const res = await a.run(() => {});
    expect(res.status).toBe('complete');
    const last = res.rows.at(-1)!;
    for (const r of res.rows) {
      if (r.external_work_Nmm < 1e-3 * last.external_work_Nmm) continue;
      expect(Math.abs(r.external_work_Nmm - r.elastic_energy_Nmm - r.dissipated_Nmm) / r.external_work_Nmm).toBeLessThan(0.01);
    }
    // the crack has run straight through the 80 mm ligament and the load has gone
    expect(last.crack_length_mm).toBeGreaterThan(79);
    expect(Math.max(...res.crackPaths[0].map((p) => Math.abs(p[1] - 50)))).toBeLessThan(2 * TIP);
    expect(last.load_N).toBeLessThan(0.01 * res.peak.load_N);
    // each separated point also lost its penalty energy ½ft²/kp (negligible here)
    const A = 80 * T, expected = (GF + 0.5 * FT * FT / penaltyFor(E, TIP)) * A;
    expect(Math.abs(last.dissipated_Nmm / expected - 1)).toBeLessThan(0.03);
  });
});
