// Bar in tension with one cohesive crack across the section, traced under CMOD control:
// the load–elongation curve follows δ = σL/E + w(σ) (Hillerborg, Modéer, Petersson 1976,
// fictitious crack model), including the snap-back of a bar longer than about l_ch.
import { describe, expect, it } from 'vitest';
import { parseCase } from '../src/case/index.js';
import { Analysis } from '../src/fracture/analysis.js';
import { makeLaw } from '../src/cohesive/laws.js';
import { penaltyFor } from '../src/cohesive/interface.js';
import { gridMesh } from './support/grid.js';
import { BAR, barCase as sharedBar } from './support/bar.js';

const { L, H, T, E, FT } = BAR;

function barCase(law: string, GF: number, target: number, by = 'cmod') {
  return sharedBar(law, GF, { target, increments: 80, gaugeHalf: 1, by, mesh: '{size: 1, tipSize: 1, refineRadius: 1, coarsen: false}' });
}

async function runBar(law: 'linear' | 'bilinear' | 'exponential', GF: number, by = 'cmod') {
  const sl = makeLaw(law, FT, GF);
  const cm = barCase(law, GF, sl.wc * 1.02, by);
  const a = new Analysis(cm, gridMesh(0, 0, L, H, 100, 10));
  a.tips.splice(0); // no growth: the one crack is placed across the section beforehand
  a.addCohesiveCut([L / 2, 0], [L / 2, H]);
  const res = await a.run(() => {});
  return { res, sl };
}

describe('cohesive bar in tension (Hillerborg fictitious crack model)', () => {
  // Under displacement control the snap-back cannot be followed by the elongation; there the
  // energy the faces dissipate drives the steps where no shorter displacement step converges
  // (tests/solver.dissipation.test.ts checks that drive, and the total crack opening's).
  const runs = [
    ...(['linear', 'bilinear', 'exponential'] as const).flatMap((law) => [0.1, 0.01].map((GF) => ({ law, GF, by: 'cmod' }))),
    { law: 'exponential' as const, GF: 0.01, by: 'displacement' },
  ];
  for (const { law, GF, by } of runs) {
    {
      const lch = E * GF / (FT * FT);
      it(`${law} law, GF ${GF} N/mm (L/l_ch = ${(L / lch).toFixed(2)}), ${by} control: every step within 1 % of the peak load`, async () => {
        const { res, sl } = await runBar(law, GF, by);
        expect(res.status).toBe('complete');
        const A = H * T, Fpeak = FT * A;
        expect(res.peak.load_N).toBeGreaterThan(0.99 * Fpeak);
        expect(res.peak.load_N).toBeLessThan(1.01 * Fpeak);
        let snapBack = false;
        for (let i = 1; i < res.rows.length; i++) {
          const r = res.rows[i];
          const sigma = r.load_N / A;
          const w = r.cmod_mm! - sigma * 2 / E; // gauge = 2 mm of bulk + crack opening
          // pre-peak: elastic bar δ = σL/E; softening: σ = f(w) and δ = σL/E + w
          // the intact interface opens by at most ft/kp (the penalty branch, 1e-7 mm here)
          const w0 = FT / penaltyFor(E, 1);
          const fAn = w <= 1.001 * w0 ? E * A * r.displacement_mm / L : A * sl.stress(w - w0);
          expect(Math.abs(r.load_N - fAn), `step ${r.step}: load ${r.load_N}, analytical ${fAn}, w ${w}`).toBeLessThan(0.01 * Fpeak);
          expect(Math.abs(r.displacement_mm - (sigma * L / E + w))).toBeLessThan(1e-3 * (FT * L / E));
          if (i > 1 && r.displacement_mm < res.rows[i - 1].displacement_mm - 1e-9) snapBack = true;
        }
        // snap-back exactly when dδ/dw = 1 + L σ'(0)/E < 0 (common practice)
        expect(snapBack).toBe(1 + L * sl.slope(0) / E < 0);
      });
    }
  }

  it('the intact interface (penalty branch) softens the pre-peak response by less than 1 % (Hillerborg bar, elastic range)', async () => {
    const text = (crack: boolean) => `
format: 1
title: bar, elastic range
units: mm-N-MPa
thickness: ${T}
geometry: {outline: [[0,0],[${L},0],[${L},${H}],[0,${H}]]}
material: {E: ${E}, nu: 0.2, ft: ${FT}, GF: 0.1}
supports: [{along: [[0,0],[0,${H}]], fix: x}, {at: [0,0], fix: y}]
loads: [{along: [[${L},0],[${L},${H}]], direction: [1, 0]}]
control: {by: displacement, target: ${0.8 * FT * L / E}, increments: 2}
${crack ? 'crack: {start: [[0, 0]], growthStep: 1, averagingRadius: 2}' : ''}
mesh: {size: 1, tipSize: 1, refineRadius: 1, coarsen: false}
output: {frames: []}
`;
    const plain = new Analysis(parseCase(text(false), 'a.yaml'), gridMesh(0, 0, L, H, 100, 10));
    const withCrack = new Analysis(parseCase(text(true), 'b.yaml'), gridMesh(0, 0, L, H, 100, 10));
    withCrack.tips.splice(0);
    withCrack.addCohesiveCut([L / 2, 0], [L / 2, H]);
    const a = (await plain.run(() => {})).rows.at(-1)!, b = (await withCrack.run(() => {})).rows.at(-1)!;
    const exact = E * H * T * a.displacement_mm / L; // uniform bar, σ = Eδ/L
    expect(Math.abs(a.load_N / exact - 1)).toBeLessThan(1e-9);
    expect(b.load_N / a.load_N).toBeGreaterThan(0.99);
    expect(b.load_N / a.load_N).toBeLessThanOrEqual(1 + 1e-12);
  });
});
