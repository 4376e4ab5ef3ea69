// Cohesive growth out of a slanted sharp slit under remote tension, at both tips of the
// point-symmetric problem, over 5 seeds, two mesh sizes and three slit angles. The direction of
// the first 4 mm is the chord from the slit tip to the point 4 mm along the crack, which is also
// the mean direction of the segments weighted by their length over those 4 mm.
// - Against the MTS prediction of the path (the 5°): the traction-free crack grown by the
//   maximum tangential stress criterion (Erdogan & Sih 1963) with K from the interaction
//   integral (Yau, Wang & Corten 1980) at every step, on the same plate, mesh, seed and growth
//   step (second block).
// - Against the MTS kink at the slit, with the K of a central slit, K_I = σ√(πa) sin²β,
//   K_II = σ√(πa) sinβ cosβ (REFERENCES.md): the first growth, and the 4 mm chord as a
//   documented measurement of how far the path turns past the first kink (first block).
import { describe, expect, it } from 'vitest';
import { Analysis } from '../src/fracture/analysis.js';
import { LefmAnalysis } from '../src/fracture/lefm.js';
import { meshCase } from '../src/run.js';
import { SLIT_W, chordKink, pathLength, pointAlong, slitPlate } from './support/slit.js';
import { mtsKink } from '../src/fracture/sif.js';

const W = SLIT_W;

function slitCase(betaDeg: number, size: number, tip: number, seed: number) {
  return slitPlate(betaDeg, {
    control: '{by: displacement, target: 0.0125, increments: 13, stopAtLoadFraction: 0.3}',
    crack: `{start: notch-tips, growthStep: ${2 * tip}, averagingRadius: ${3 * tip}}`,
    mesh: `{size: ${size}, tipSize: ${tip}, refineRadius: ${8 * tip}, seed: ${seed}}`,
  });
}

/**
 * The MTS prediction of the path: the same plate, mesh and growth step, the slit traction-free
 * and grown by the criterion with K from the interaction integral (Yau, Wang & Corten 1980) at
 * every step, both tips at each critical state (brittle mode, tie 1). For each crack (upper tip
 * first): the kink of the chord to the point 4 mm along it and that point.
 */
async function mtsPath(betaDeg: number, size: number, tip: number, seed: number): Promise<{ at4: number; x: number; y: number }[]> {
  const c = slitPlate(betaDeg, {
    material: '{E: 30000, nu: 0.2, ft: 3, GF: 0.03, KIc: 1}',
    control: '{by: displacement, target: 100, increments: 10}',
    crack: `{model: lefm, growthStep: ${2 * tip}}`,
    mesh: `{size: ${size}, tipSize: ${tip}, refineRadius: ${8 * tip}, seed: ${seed}}`,
  });
  const a = new LefmAnalysis(c, meshCase(c).mesh);
  a.tie = 1;
  const { x, y } = a.wm, grown = () => a.cracks.filter((k) => k.grown);
  a.stopRequested = () => { const k = grown(); return k.length === 2 && k.every((q) => pathLength(x, y, q.path) >= 4); };
  await a.run(() => {});
  return grown().map((k) => ({ upper: y[k.path[0]] > W / 2, at4: chordKink(x, y, k.path, betaDeg, 4), ...pointAlong(x, y, k.path, 4) }))
    .sort((p, q) => Number(q.upper) - Number(p.upper));
}

/**
 * For each cohesive crack (upper tip first): the kink (deg, relative to the slit) of its first
 * growth, as the criterion chose it at the slit tip, and of the chord from the slit tip to the
 * point 4 mm along the crack.
 */
async function firstKinks(betaDeg: number, size: number, tip: number, seed: number): Promise<{ first: number; at4: number; x: number; y: number }[]> {
  const c = slitCase(betaDeg, size, tip, seed);
  const a = new Analysis(c, meshCase(c).mesh);
  const { x, y } = a.wm;
  const cohesive = () => a.cracks.filter((k) => k.kind === 'cohesive');
  // stop as soon as both cracks reach 4 mm (the path laid up to there does not change after)
  a.stopRequested = () => { const k = cohesive(); return k.length === 2 && k.every((q) => pathLength(x, y, q.path) >= 4); };
  await a.run(() => {});
  const b = betaDeg * Math.PI / 180, slit = Math.atan2(Math.cos(b), Math.sin(b));
  return cohesive().map((k) => {
    const x0 = x[k.path[0]], y0 = y[k.path[0]];
    const g = a.growthLog.find((e) => e.first && Math.hypot(e.x - x0, e.y - y0) < 1e-9)!;
    const k1 = Math.atan2(g.dy, g.dx) - (y0 > W / 2 ? slit : slit + Math.PI);
    return { upper: y0 > W / 2, first: Math.atan2(Math.sin(k1), Math.cos(k1)) * 180 / Math.PI, at4: chordKink(x, y, k.path, betaDeg, 4), ...pointAlong(x, y, k.path, 4) };
  }).sort((p, q) => Number(q.upper) - Number(p.upper));
}

describe('kink out of a slanted slit during cohesive growth (Erdogan & Sih 1963)', () => {
  for (const beta of [30, 45, 60]) {
    it(`β = ${beta}°: both tips, 5 seeds, two mesh sizes: first growth along the MTS kink, the first 4 mm within the tolerance of it`, async () => {
      const b = beta * Math.PI / 180;
      const mts = mtsKink(Math.sin(b) ** 2, Math.sin(b) * Math.cos(b)) * 180 / Math.PI;
      // The plate's l_ch = E·G_F/f_t² = 100 mm is ten times the slit's half-length: the cohesive
      // zone is not small against the crack, outside the domain of MTS, an LEFM criterion.
      // The MTS kink is the direction at the slit tip; 4 mm further on (0.4 of the half-length)
      // the slit's T-stress, σ cos 2β, has turned the crack on past it where T > 0 (β = 30°) and
      // back where T < 0 (β = 60°) (Cotterell & Rice 1980; the generalized MTS criterion with its
      // T term, Smith, Ayatollahi & Pavier 2001, turns the kink the same ways; from memory).
      // Measured at 30°: 3.1–6.4° beyond the MTS angle at 4 mm on these meshes, 4.0–5.9° with
      // 0.25 mm tip cells and 0.5 mm steps (it does not shrink with the mesh), 1.1–6.0° with a
      // slit four times longer and l_ch/a = 0.39 instead of 10 (it is not the cohesive zone).
      // The MTS prediction of the path, the traction-free crack grown by the criterion with K
      // at every step (brittle mode, both tips together), turns at 4 mm −5.9 to −7.9° (30°),
      // −0.8 to +1.8° (45°), +5.2 to +7.5° (60°) from the kink on 0.25 mm tip cells and 0.5 mm
      // steps; on these meshes and steps its chord is not settled (30° −0.4 to −4.6°, 45° +1.0
      // to +9.3°, 60° +3.6 to +11.8°) and lies −9.5 to +0.9° from the cohesive chord of the same
      // mesh and seed, so the 5° is checked against that path on finer meshes below.
      // The turn past the first kink is kept here as a measurement, with the tolerances it had
      // as the check: 5° at 45° and 60°, 7.5° at 30° (DEVELOPERS.md, known gaps).
      const tol = beta === 30 ? 7.5 : 5;
      const devs: string[] = [], firsts: string[] = [];
      let sum = 0, n = 0;
      for (const [size, tip] of [[16, 1], [10, 0.75]]) {
        for (let seed = 1; seed <= 5; seed++) {
          const k = await firstKinks(beta, size, tip, seed);
          expect(k.length).toBe(2);
          const d = k.map((v) => v.at4 - mts), f = k.map((v) => v.first - mts);
          devs.push(d.map((v) => v.toFixed(1)).join('/'));
          firsts.push(f.map((v) => v.toFixed(1)).join('/'));
          for (const v of d) { sum += v; n++; }
          // the first growth takes the MTS kink of the K read at the slit tip (Erdogan & Sih
          // with the central-slit K above; measured −0.2 to +0.4°)
          for (const v of f) expect(Math.abs(v), `first growth, seed ${seed}, mesh ${size}/${tip}: ${f}`).toBeLessThan(1);
          for (const v of d) expect(Math.abs(v), `seed ${seed}, mesh ${size}/${tip}: ${d}`).toBeLessThan(tol);
          // point symmetry: the two tips take the same turn
          expect(Math.abs(d[0] - d[1]), `seed ${seed}, mesh ${size}/${tip}: ${d}`).toBeLessThan(3);
        }
      }
      console.log(`β = ${beta}°: first growths against MTS (tip/tip, deg) ${firsts.join(', ')}`);
      console.log(`β = ${beta}°: MTS ${mts.toFixed(1)}°, deviations at 4 mm (tip/tip, deg) ${devs.join(', ')}; mean ${(sum / n).toFixed(2)}`);
      // the turn past the MTS kink follows the sign of T (same sources as above): measured means
      // −4.6° (30°), −0.7° (45°, T = 0), +2.0° (60°); a sign error in the mixity read at the
      // cohesive tips would turn the cracks the other way
      if (beta === 30) expect(sum / n, devs.join(', ')).toBeLessThan(0);
      if (beta === 60) expect(sum / n, devs.join(', ')).toBeGreaterThan(0);
    });
  }
});

describe('the first 4 mm of cohesive growth against the MTS prediction of the path (Erdogan & Sih 1963; K by the interaction integral, Yau, Wang & Corten 1980)', () => {
  for (const beta of [30, 45, 60]) {
    it(`β = ${beta}°: both tips, 5 seeds, two mesh sizes, the chords at 4 mm within 5°`, async () => {
      // The criterion applied at every step turns the path on past the slit's kink (the slit's
      // T-stress, Cotterell & Rice 1980), so the MTS prediction for the first 4 mm is that path,
      // not the first kink. Both are discretized: on 1 mm and 0.75 mm tip cells with 2 and
      // 1.5 mm steps the traction-free chord has not settled (45°, T = 0: +1.0 to +9.3° from
      // the kink, against −0.8 to +1.8° on 0.25 mm cells) and the two chords lie up to 9.5°
      // apart. On 0.5 and 0.4 mm tip cells with 1 and 0.8 mm steps, measured: 30° −1.9 to
      // +2.7°, 45° −4.4 to −0.3°, 60° −4.9 to −1.3° (the cohesive crack turns a little less),
      // the 4 mm points 0.01–0.34 mm apart (DEVELOPERS.md, known gaps).
      const devs: string[] = [], offs: string[] = [];
      for (const [size, tip] of [[16, 0.5], [10, 0.4]]) {
        for (let seed = 1; seed <= 5; seed++) {
          const k = await firstKinks(beta, size, tip, seed), m = await mtsPath(beta, size, tip, seed);
          expect(k.length).toBe(2);
          expect(m.length).toBe(2);
          const d = k.map((v, i) => v.at4 - m[i].at4), off = k.map((v, i) => Math.hypot(v.x - m[i].x, v.y - m[i].y));
          devs.push(d.map((v) => v.toFixed(1)).join('/'));
          offs.push(off.map((v) => v.toFixed(2)).join('/'));
          for (const v of d) expect(Math.abs(v), `seed ${seed}, mesh ${size}/${tip}: ${d}`).toBeLessThan(5);
        }
      }
      console.log(`β = ${beta}°: cohesive against the MTS path, chords at 4 mm (tip/tip, deg) ${devs.join(', ')}; offsets of the 4 mm points (mm) ${offs.join(', ')}`);
    });
  }
});
