// The brittle mode (crack.model lefm): the ceramic bend-bar template run to separation, its
// K_Ic back-computed from the predicted peak as the test standard does, the energy released
// against Irwin's G = K²/E′, and the snap-back of unstable growth drawn as it is.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseCase } from '../src/case/index.js';
import { LefmAnalysis } from '../src/fracture/lefm.js';
import { meshCase } from '../src/run.js';
import { SLIT_W, chordKink, pathLength, slitPlate } from './support/slit.js';
import { describeCase } from '../src/case/describe.js';
import { mtsKink } from '../src/fracture/sif.js';
import { rootSlitLength } from '../src/fracture/lefm.js';

describe('crack.model lefm: ceramic bend bar (template example)', () => {
  it('runs to separation; K_Ic from the peak by the SEVNB expression within 3 % of the input; energy released = G·area', async () => {
    // run on past the example's stop at 5 % of the peak, to the loaded face
    const text = readFileSync(new URL('../cases/ceramic-bend-bar-example.yaml', import.meta.url), 'utf8').replace(/stopAtLoadFraction: [0-9.]+/, 'stopAtLoadFraction: 0');
    const c = parseCase(text, 'ceramic.yaml');
    expect(c.crack?.model).toBe('lefm');
    expect(describeCase(c)).toMatch(/model lefm/);
    const a = new LefmAnalysis(c, meshCase(c).mesh);
    const res = await a.run(() => {});
    expect(res.status, res.reason).toBe('complete');
    // to separation: the crack crosses the ligament (3 mm) until the load is all but gone
    expect(res.reason).toMatch(/come apart/);
    expect(res.rows.at(-1)!.crack_length_mm).toBeGreaterThan(0.85 * 3);
    // the crack runs through to the loaded face under the load strip, like a cohesive one (it
    // used to stop a tip cell short of it, where K can no longer be read)
    const end = res.crackPaths.at(-1)!.at(-1)!, load = c.loads[0];
    expect(end[1]).toBeCloseTo(load.at![1], 6);
    expect(Math.abs(end[0] - load.at![0])).toBeLessThan(load.width / 2);
    // The single-edge V-notched beam (ISO 23146 / ASTM C1421) evaluates K_Ic in three-point bending
    // with the same expression as ASTM E399 (Srawley 1976) for S/W = 4: the template's bar is 4 mm
    // deep on a 16 mm span, notched 1 mm (the standard's use of Srawley's expression: from memory).
    const S = 16, W = 4, B = 3, a0 = 1, al = a0 / W;
    expect(c.loads[0].at![0] - c.supports[0].at![0]).toBeCloseTo(S / 2, 9);
    const f = 3 * Math.sqrt(al) * (1.99 - al * (1 - al) * (2.15 - 3.93 * al + 2.7 * al * al)) / (2 * (1 + 2 * al) * (1 - al) ** 1.5);
    const K = res.peak.load_N * S / (B * W ** 1.5) * f / Math.sqrt(1000);
    console.log(`ceramic bar: peak ${res.peak.load_N.toFixed(2)} N, K_Ic back-computed ${K.toFixed(3)} MPa√m against ${c.material.KIc} (${(100 * (K / c.material.KIc! - 1)).toFixed(2)} %), ${res.rows.length - 1} critical states, reason: ${res.reason}`);
    expect(Math.abs(K / c.material.KIc! - 1)).toBeLessThan(0.03);
    // unstable growth in three-point bending: the load-point travel falls back after the peak (snap-back)
    const d = res.rows.map((r) => r.displacement_mm);
    expect(d[2]).toBeLessThan(d[1]);
    // energy released = G·B·Δa with G = K_Ic²/E′ (Irwin; J = K²/E′, REFERENCES.md), plane stress E′ = E
    const last = res.rows.at(-1)!, G = (c.material.KIc! * Math.sqrt(1000)) ** 2 / c.material.E;
    const expected = G * B * last.crack_length_mm;
    console.log(`energy: dissipated ${last.dissipated_Nmm.toFixed(4)} N·mm against G·B·Δa ${expected.toFixed(4)} (${(100 * (last.dissipated_Nmm / expected - 1)).toFixed(2)} %)`);
    expect(Math.abs(last.dissipated_Nmm / expected - 1)).toBeLessThan(0.05);
  });
});

/** The brittle run of the slanted central slit (β degrees), stopped after `growths` growths. */
function lefmSlit(beta: number, growthStep: number, mesh: string, growths: number): LefmAnalysis {
  const c = slitPlate(beta, {
    thickness: 1, material: '{E: 30000, nu: 0.2, ft: 3, GF: 0.1, KIc: 1}',
    control: '{by: displacement, target: 1, increments: 10}',
    crack: `{model: lefm, growthStep: ${growthStep}}`,
    mesh,
  });
  const an = new LefmAnalysis(c, meshCase(c).mesh);
  an.stopRequested = () => an.growthLog.length >= growths;
  return an;
}

describe('crack.model lefm: slanted central slit under remote tension', () => {
  it('both tips of the point-symmetric problem grow together, first along the MTS kink (Erdogan & Sih 1963), then alike', async () => {
    const W = 160, b = 45 * Math.PI / 180;
    const an = lefmSlit(45, 1.5, '{size: 16, tipSize: 0.5, refineRadius: 6, seed: 3}', 8);
    const res = await an.run(() => {});
    expect(res.status).toBe('interrupted');
    const log = an.growthLog;
    // ties: every critical state grows both tips
    for (let i = 0; i + 1 < log.length; i += 2) {
      const p = log[i], q = log[i + 1];
      // point symmetry about the centre: opposite positions, opposite directions
      expect(Math.hypot(p.x + q.x - W, p.y + q.y - W)).toBeLessThan(0.2);
      const dot = p.dx * q.dx + p.dy * q.dy;
      expect(Math.acos(Math.max(-1, Math.min(1, -dot))) * 180 / Math.PI).toBeLessThan(2);
    }
    // the first growth: the slit direction turned by the MTS kink of the central-slit K (REFERENCES.md)
    const th = mtsKink(Math.sin(b) ** 2, Math.sin(b) * Math.cos(b));
    const up = log.slice(0, 2).find((g) => g.y > 80)!;
    const slit = Math.atan2(Math.cos(b), Math.sin(b));
    const got = Math.atan2(up.dy, up.dx) - slit;
    console.log(`lefm slit β = 45°: first kink ${(got * 180 / Math.PI).toFixed(2)}° against MTS ${(th * 180 / Math.PI).toFixed(2)}°; later directions ${log.filter((g) => g.y > 80).map((g) => (Math.atan2(g.dy, g.dx) * 180 / Math.PI).toFixed(1)).join(', ')}`);
    expect(Math.abs(got - th) * 180 / Math.PI).toBeLessThan(2);
  });

  it('K at the tip of a kink shorter than two tip cells is read in the kink\'s own frame: little K_II at the MTS angle (Cotterell & Rice 1980)', async () => {
    // Cotterell & Rice's first-order solution for a kinked crack gives the kink's K_II the
    // angular factor of the shear stress ahead of the parent tip, which vanishes at the MTS
    // angle (from memory). The chord that sets the tip frame once ran back past the kink into
    // the slit: measured K_II/K_I = 0.58 and 0.63 at the two 0.8 mm kinks; now −0.007 at this
    // 0.75 mm kink (seed 1; −0.017 to +0.059 at the first kink of each tip over seeds 1–5).
    const W = 160, b = 30 * Math.PI / 180;
    const an = lefmSlit(30, 0.75, '{size: 10, tipSize: 0.5, refineRadius: 4, seed: 1}', 3);
    await an.run(() => {});
    const log = an.growthLog;
    // the slit's two tips first, then the tip of a kink
    const kinks = log.filter((g) => an.cracks[g.crack].grown);
    expect(kinks.length).toBeGreaterThan(0);
    const first = kinks[0];
    console.log(`lefm slit β = 30°: K_II/K_I at a 0.75 mm kink ${(first.KII / first.KI).toFixed(3)}`);
    expect(Math.abs(first.KII / first.KI)).toBeLessThan(0.2);
  });

  it('every opened tip grown at each critical state (tie 1): the path past the MTS kink turns with the sign of the slit\'s T-stress (Cotterell & Rice 1980)', async () => {
    // The T-stress of a slit at β to the load is σ cos 2β: positive at 30°, negative at 60°. A
    // kinked crack under T > 0 goes on turning away from its line, under T < 0 back toward it
    // (Cotterell & Rice 1980, from memory). Measured on 0.5 mm tip cells and 1 mm steps (seeds
    // 1–3, both tips) at 4 mm: 30° −3.4 to −6.8° past the MTS kink, 60° +6.3 to +9.2°; the
    // two tips within 3.3° of each other.
    for (const [beta, sign] of [[30, -1], [60, 1]]) {
      const b = beta * Math.PI / 180;
      const mts = mtsKink(Math.sin(b) ** 2, Math.sin(b) * Math.cos(b)) * 180 / Math.PI;
      const an = lefmSlit(beta, 1, '{size: 10, tipSize: 0.5, refineRadius: 4, seed: 1}', 0);
      an.tie = 1;
      const { x, y } = an.wm, grown = () => an.cracks.filter((k) => k.grown);
      an.stopRequested = () => { const k = grown(); return k.length === 2 && k.every((q) => pathLength(x, y, q.path) >= 4.5); };
      const res = await an.run(() => {});
      expect(res.status, res.reason).toBe('interrupted');
      // both tips grow at every critical state, though the mesh makes one of them critical first
      expect(an.growthLog.length % 2).toBe(0);
      for (let i = 0; i < an.growthLog.length; i += 2) expect((an.growthLog[i].y - SLIT_W / 2) * (an.growthLog[i + 1].y - SLIT_W / 2)).toBeLessThan(0);
      const d = grown().map((k) => chordKink(x, y, k.path, beta, 4) - mts);
      console.log(`lefm slit β = ${beta}°, both tips grown: 4 mm chords ${d.map((v) => v.toFixed(2)).join('/')}° past the MTS kink ${mts.toFixed(1)}°`);
      for (const v of d) expect(sign * v).toBeGreaterThan(2);
      expect(Math.abs(d[0] - d[1])).toBeLessThan(4);
    }
  });

  it('refuses a brittle case without KIc or without any notch, in one sentence (InputError)', () => {
    const base = readFileSync(new URL('../cases/ceramic-bend-bar-example.yaml', import.meta.url), 'utf8');
    expect(() => parseCase(base.replace(/^  KIc: .*$/m, ''), 'x.yaml')).toThrow(/^material\.KIc must be a positive number .*MPa√m.*lefm/);
    expect(() => parseCase(base.replace(/^  notches:[\s\S]*?\n(?=\S)/m, '  notches: []\n'), 'x.yaml')).toThrow(/crack\.model lefm needs a notch in geometry\.notches/);
  });
});

describe('crack.model lefm from a notch of finite width', () => {
  it('starts a short slit at the notch root: the first critical load is that of an edge crack of notch plus slit depth, within 3 % (ASTM E399; Srawley 1976)', async () => {
    // a bend beam S/W = 4 with a 1 mm wide notch 20 mm deep; the slit at its root takes the notch
    // and slit together as one edge crack once it is longer than the root radius (common practice)
    const W = 50, S = 200, B = 10, a0 = 20, wN = 1, h = 0.5, KIc = 1;
    for (const seed of [1, 2]) {
      const c = parseCase(`
format: 1
title: blunt-notched beam
units: mm-N-MPa
thickness: ${B}
geometry:
  outline: [[0,0],[220,0],[220,${W}],[0,${W}]]
  notches: [{from: [110, 0], to: [110, ${a0}], width: ${wN}}]
material: {E: 30000, nu: 0.2, ft: 3, GF: 0.1, KIc: ${KIc}}
supports: [{at: [10,0], fix: xy}, {at: [210,0], fix: y}]
loads: [{at: [110,${W}], direction: [0, -1]}]
control: {by: displacement, target: 1, increments: 10}
crack: {model: lefm, growthStep: 1}
mesh: {size: 8, tipSize: ${h}, refineRadius: 8, seed: ${seed}}
output: {frames: []}
`, 'blunt-lefm.yaml');
      const an = new LefmAnalysis(c, meshCase(c).mesh);
      an.stopRequested = () => an.growthLog.length > 0;
      const res = await an.run(() => {});
      const first = res.rows[1];
      expect(first).toBeDefined();
      // the depth as cut: the slit ends on a vertex, within a cell of its length
      const slit = an.cracks.find((k) => !k.grown)!, depth = an.wm.y[slit.path.at(-1)!];
      expect(Math.abs(depth - a0 - rootSlitLength(wN, h))).toBeLessThan(h);
      const al = depth / W;
      const f = 3 * Math.sqrt(al) * (1.99 - al * (1 - al) * (2.15 - 3.93 * al + 2.7 * al * al)) / (2 * (1 + 2 * al) * (1 - al) ** 1.5);
      const P = KIc * Math.sqrt(1000) * B * W ** 1.5 / (S * f);
      console.log(`blunt notch, seed ${seed}: first critical load ${first.load_N.toFixed(1)} N against ${P.toFixed(1)} N for an edge crack of ${depth.toFixed(2)} mm (${(100 * (first.load_N / P - 1)).toFixed(2)} %)`);
      expect(Math.abs(first.load_N / P - 1)).toBeLessThan(0.03);
      // the crack grows from the slit straight along the plane of symmetry
      const g = an.growthLog[0];
      expect(Math.abs(g.x - 110)).toBeLessThan(h);
      expect(Math.abs(Math.atan2(g.dx, g.dy)) * 180 / Math.PI).toBeLessThan(3);
    }
  });
});
