// The dissipation-driven path following (Gutiérrez 2004, "Energy release control for numerical
// simulations of failure in quasi-brittle solids"; Verhoosel, Remmers & Gutiérrez 2009, "A
// dissipation-based arc-length method for robust simulation of brittle and ductile failure"):
// its constraint is the energy the faces dissipate, D(u) = Σ A·d(max(κ, λ(u))). Checked: its
// value against the interface energies, its gradient against finite differences (on all
// unknowns and condensed on the jumps), and a bar that snaps back traced by it with the energy
// balance closed (work = stored + dissipated: common practice).
import { describe, expect, it } from 'vitest';
import { dissipationPoint, interfaceEnergy, type CohesiveParams } from '../src/cohesive/interface.js';
import { makeLaw } from '../src/cohesive/laws.js';
import { Analysis } from '../src/fracture/analysis.js';
import type { Equations } from '../src/fracture/equations.js';
import { meshCase } from '../src/run.js';
import { prng } from '../src/mesh/prng.js';
import { coarseBeam } from './support/beam.js';
import { gridMesh } from './support/grid.js';
import { BAR, barCase } from './support/bar.js';

const g = new Float64Array(2);

describe('the energy a cohesive point dissipates, as a function of its opening', () => {
  for (const kind of ['linear', 'bilinear', 'exponential'] as const) {
    it(`${kind} law: d equals the interface's dissipated energy, its gradient the finite differences on loading and zero on unloading`, () => {
      const p: CohesiveParams = { law: makeLaw(kind, 3, 0.1), penalty: 1e5, beta: 0.7 };
      const l0 = 3 / 1e5, wc = p.law.wc;
      for (const [w, s, kappa] of [[0.2 * wc, 0.05 * wc, 0.1 * wc], [0.6 * wc, -0.1 * wc, 0], [0.05 * wc, 0, 0.3 * wc], [0.5 * l0, 0, 0], [-0.01, 0.4 * wc, 0.2 * wc]]) {
        const d = dissipationPoint(p, w, s, kappa, g);
        expect(d).toBeCloseTo(interfaceEnergy(p, w, s, kappa).dissipated, 12);
        const grad = [g[0], g[1]];
        const h = 1e-7 * wc, lam = Math.hypot(Math.max(w, 0), Math.sqrt(p.beta) * s);
        const fd = [(dissipationPoint(p, w + h, s, kappa, g) - dissipationPoint(p, w - h, s, kappa, g)) / (2 * h),
          (dissipationPoint(p, w, s + h, kappa, g) - dissipationPoint(p, w, s - h, kappa, g)) / (2 * h)];
        if (lam > Math.max(kappa, l0)) {
          // loading: d' = ½(τ − τ'λ) > 0 along λ
          expect(grad[0] * Math.max(w, 0) + grad[1] * s).toBeGreaterThan(0);
          for (let i = 0; i < 2; i++) expect(Math.abs(grad[i] - fd[i])).toBeLessThan(1e-5 * Math.max(Math.abs(fd[i]), 1e-3));
        } else {
          // unloading or intact: nothing more is dissipated
          expect(grad).toEqual([0, 0]);
          expect(fd).toEqual([0, 0]);
        }
      }
    });
  }
});

describe('the faces\' dissipation on a cracked beam', () => {
  it('equals the equations\' dissipated energy, and its gradient the finite differences, on all unknowns and on the condensed jumps', async () => {
    const c = coarseBeam({ target: 0.15, increments: 20 });
    const a = new Analysis(c, meshCase(c).mesh);
    const res = await a.run(() => {});
    expect(res.status, res.reason).toBe('complete');
    const inner = a as unknown as { eq: Equations; coh: CohesiveParams; s: { lambda: number } };
    const eq = inner.eq, sys = eq.sys, coh = inner.coh, kap = eq.kap;
    expect(sys.pairs.plus.length).toBeGreaterThan(10);
    // past the last state by 5 %: the faces that were opening load on beyond their history
    const uf = eq.uf.map((v) => 1.05 * v), lambda = 1.05 * inner.s.lambda;
    const u = new Float64Array(sys.nDof);
    sys.expand(uf, lambda, u);
    const D = sys.dissipation(u, coh, kap, sys.dissipationWeights);
    eq.work.u.set(u);
    expect(D).toBeCloseTo(eq.energies(coh, kap).dissipated, 9);
    sys.expand(eq.uf, inner.s.lambda, eq.work.u);
    const D0 = eq.energies(coh, kap).dissipated;
    expect(D).toBeGreaterThan(D0 + 1e-3 * D0);
    // gradient on all unknowns along a random direction
    const rnd = prng(7), v = new Float64Array(sys.nDof).map(() => rnd() - 0.5);
    const { gauge } = sys.openingGauge, wts = sys.dissipationWeights.slice();
    let gv = 0;
    for (let i = 0; i < gauge.length; i++) gv += wts[i] * v[gauge[i]];
    let umax = 0;
    for (const x of u) umax = Math.max(umax, Math.abs(x));
    const h = 1e-6 * umax, up = u.map((x, i) => x + h * v[i]), um = u.map((x, i) => x - h * v[i]);
    const fd = (sys.dissipation(up, coh, kap) - sys.dissipation(um, coh, kap)) / (2 * h);
    expect(Math.abs(gv)).toBeGreaterThan(0);
    expect(Math.abs(gv - fd)).toBeLessThan(1e-5 * Math.abs(fd));
    // condensed on the jumps: the same value, and the gradient on the jumps
    const cd = eq.work.cond!;
    expect(cd).toBeTruthy();
    const y = cd.gatherC(uf, lambda), gy = new Float64Array(cd.nc);
    expect(cd.dissipation(y, coh, kap, gy)).toBeCloseTo(D, 9);
    const vy = new Float64Array(cd.nc).map(() => rnd() - 0.5);
    let gvy = 0;
    for (let i = 0; i < cd.nc; i++) gvy += gy[i] * vy[i];
    const hy = 1e-6 * umax;
    const fdy = (cd.dissipation(y.map((x, i) => x + hy * vy[i]), coh, kap, null) - cd.dissipation(y.map((x, i) => x - hy * vy[i]), coh, kap, null)) / (2 * hy);
    expect(Math.abs(gvy - fdy)).toBeLessThan(1e-5 * Math.abs(fdy));
  }, 60_000);
});

describe('a bar that snaps back under end displacement (Hillerborg, Modéer, Petersson 1976)', () => {
  it('is traced through the snap-back by the dissipation with the work equal to stored plus dissipated energy at every step', async () => {
    // exponential law, GF 0.01 N/mm: L/l_ch = 3, so dδ/dw = 1 + Lσ'(0)/E < 0 (common practice)
    const { L, H, T, E, FT } = BAR, GF = 0.01, sl = makeLaw('exponential', FT, GF);
    const out: Record<string, Awaited<ReturnType<Analysis['run']>>> = {};
    for (const pathDrive of ['dissipation', 'opening'] as const) {
      const cm = barCase('exponential', GF, { target: sl.wc * 1.02, increments: 80, gaugeHalf: 1, by: 'displacement', mesh: '{size: 1, tipSize: 1, refineRadius: 1, coarsen: false}' });
      const a = new Analysis(cm, gridMesh(0, 0, L, H, 100, 10), { pathDrive });
      a.tips.splice(0);
      a.addCohesiveCut([L / 2, 0], [L / 2, H]);
      out[pathDrive] = await a.run(() => {});
    }
    const res = out.dissipation;
    expect(res.status, res.reason).toBe('complete');
    expect(1 + L * sl.slope(0) / E).toBeLessThan(0);
    // the elongation falls back after the peak (the snap-back) and the load falls on
    let back = false;
    for (let i = 2; i < res.rows.length; i++) if (res.rows[i].displacement_mm < res.rows[i - 1].displacement_mm - 1e-9) back = true;
    expect(back).toBe(true);
    const A = H * T, end = Math.abs(res.rows.at(-1)!.external_work_Nmm);
    expect(res.rows.at(-1)!.load_N).toBeLessThan(0.05 * FT * A);
    // every step: work = stored + dissipated within 1 % of the work (common practice)
    for (const r of res.rows) {
      if (!(Math.abs(r.external_work_Nmm) > 1e-3 * end)) continue;
      expect(Math.abs(r.external_work_Nmm - r.elastic_energy_Nmm - r.dissipated_Nmm), `step ${r.step}`).toBeLessThan(0.01 * Math.abs(r.external_work_Nmm));
    }
    // at separation the faces have dissipated GF·A (definition of GF), plus the penalty energy at the peak
    expect(res.rows.at(-1)!.dissipated_Nmm).toBeGreaterThan(0.97 * GF * A);
    expect(res.rows.at(-1)!.dissipated_Nmm).toBeLessThan(1.03 * GF * A);
    // the crack opening drive traces the same curve (a single crack: its opening grows as it dissipates)
    const o = out.opening;
    expect(o.status, o.reason).toBe('complete');
    expect(Math.abs(o.rows.at(-1)!.dissipated_Nmm - res.rows.at(-1)!.dissipated_Nmm)).toBeLessThan(0.02 * GF * A);
  }, 60_000);
});
