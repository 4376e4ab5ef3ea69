import { describe, expect, it } from 'vitest';
import { makeLaw } from '../src/cohesive/laws.js';
import { cohesivePoint, interfaceEnergy, penaltyFor, type CohesiveParams } from '../src/cohesive/interface.js';
import type { Softening } from '../src/case/model.js';

const ft = 3, GF = 0.1, E = 30000; // normal-strength concrete (common practice)
const kp = penaltyFor(E, 10);
const params = (kind: Softening, beta = 1): CohesiveParams => ({ law: makeLaw(kind, ft, GF), penalty: kp, beta });
const out = new Float64Array(6);

/** Tangent by central differences at fixed history. */
function fdTangent(p: CohesiveParams, w: number, s: number, kappa: number): number[] {
  const h = 1e-9, a = new Float64Array(6), b = new Float64Array(6);
  cohesivePoint(p, w + h, s, kappa, a); cohesivePoint(p, w - h, s, kappa, b);
  const dn_dw = (a[0]! - b[0]!) / (2 * h), ds_dw = (a[1]! - b[1]!) / (2 * h);
  cohesivePoint(p, w, s + h, kappa, a); cohesivePoint(p, w, s - h, kappa, b);
  const dn_ds = (a[0]! - b[0]!) / (2 * h), ds_ds = (a[1]! - b[1]!) / (2 * h);
  return [dn_dw, dn_ds, ds_dw, ds_ds];
}
function expectTangent(p: CohesiveParams, w: number, s: number, kappa: number): void {
  cohesivePoint(p, w, s, kappa, out);
  const fd = fdTangent(p, w, s, kappa);
  const scale = Math.max(Math.abs(out[2]!), Math.abs(out[5]!), 1);
  for (let i = 0; i < 4; i++) expect(Math.abs(out[2 + i]! - fd[i]!)).toBeLessThan(1e-5 * scale);
  expect(out[3]).toBe(out[4]); // symmetric: t derives from a potential of λ
}

describe('cohesive interface point', () => {
  it('penalty adds 0.05 % compliance to a 10 mm cell (common practice: series springs)', () => {
    expect(E / (kp * 10)).toBeCloseTo(5e-4, 12);
  });

  it('intact: tn = kp·w, ts = kp·β·s below ft (common practice: penalty branch)', () => {
    const p = params('linear', 0.5);
    const k = cohesivePoint(p, 1e-7, 2e-7, 0, out);
    expect(ft / kp).toBeGreaterThan(k);
    expect(out[0]).toBeCloseTo(kp * 1e-7, 12);
    expect(out[1]).toBeCloseTo(kp * 0.5 * 2e-7, 12);
    expect(out[2]).toBe(kp);
    expect(out[5]).toBe(kp * 0.5);
    expect(k).toBeCloseTo(Math.sqrt(1e-14 + 0.5 * 4e-14), 18);
  });

  it('λ → 0 gives the intact stiffness, no NaN (common practice)', () => {
    for (const kappa of [0, 1e-3, 1]) {
      cohesivePoint(params('exponential'), 0, 0, kappa, out);
      for (let i = 0; i < 6; i++) expect(Number.isFinite(out[i]!)).toBe(true);
      expect(out[0]).toBe(0);
      expect(out[1]).toBe(0);
    }
    cohesivePoint(params('exponential'), 0, 0, 0, out);
    expect(out[2]).toBe(kp);
  });

  for (const kind of ['linear', 'bilinear', 'exponential'] as Softening[]) {
    it(`${kind}: mode-I loading follows the shifted softening curve (Hillerborg fictitious crack)`, () => {
      const p = params(kind);
      const l0 = ft / kp;
      for (const w of [0.005, 0.02, 0.05]) {
        cohesivePoint(p, w, 0, 0, out);
        expect(out[0]).toBeCloseTo(p.law.stress(w - l0), 10);
        expect(out[2]).toBeCloseTo(p.law.slope(w - l0), 8);
      }
    });
    it(`${kind}: tangents match finite differences in loading, unloading and mixed mode (common practice)`, () => {
      for (const beta of [1, 0.3, 4]) {
        const p = params(kind, beta);
        expectTangent(p, 0.01, 0, 0); // mode I loading
        expectTangent(p, 0.01, 0.004, 0); // mixed loading
        expectTangent(p, 0.002, 0.012, 0.005); // mixed loading past the history
        expectTangent(p, 0.01, 0.005, 0.03); // unloading, secant
        expectTangent(p, 1e-7, 1e-7, 0); // intact
        expectTangent(p, -0.002, 0.01, 0); // closed, shear loading
        expectTangent(p, -0.002, 0.01, 0.05); // closed, shear on the secant
      }
    });
  }

  it('unloading and reloading follow the secant and rejoin the envelope (common practice: secant unloading to the origin)', () => {
    const p = params('bilinear');
    const l0 = ft / kp;
    let kappa = 0;
    kappa = cohesivePoint(p, 0.02, 0, kappa, out);
    const peak = out[0]!;
    expect(peak).toBeCloseTo(p.law.stress(0.02 - l0), 12);
    for (const w of [0.015, 0.005, 0.001, 0.01, 0.0199]) {
      kappa = cohesivePoint(p, w, 0, kappa, out);
      expect(out[0]).toBeCloseTo(peak * w / 0.02, 12);
      expect(out[2]).toBeCloseTo(peak / 0.02, 10);
      expect(kappa).toBe(0.02);
    }
    kappa = cohesivePoint(p, 0.03, 0, kappa, out);
    expect(out[0]).toBeCloseTo(p.law.stress(0.03 - l0), 12);
    expect(kappa).toBe(0.03);
  });

  it('contact: tn = kp·w for w < 0 whatever the damage (common practice: penalty contact)', () => {
    const p = params('linear');
    for (const kappa of [0, 0.01, 10]) {
      cohesivePoint(p, -1e-3, 0, kappa, out);
      expect(out[0]).toBe(kp * -1e-3);
      expect(out[2]).toBe(kp);
      expect(out[3]).toBe(0);
    }
  });

  it('fully separated: no traction in opening, contact still acts (Hillerborg fictitious crack)', () => {
    const p = params('exponential', 1);
    const wBig = p.law.wc + ft / kp + 0.01;
    let kappa = cohesivePoint(p, wBig, 0.003, 0, out);
    for (let i = 0; i < 6; i++) expect(out[i]).toBe(0);
    kappa = cohesivePoint(p, 0.001, 0.001, kappa, out);
    expect(out[0]).toBe(0);
    expect(out[1]).toBe(0);
    cohesivePoint(p, -0.001, 0.001, kappa, out);
    expect(out[0]).toBe(-0.001 * kp);
    expect(out[1]).toBe(0);
  });

  it('energy: work on the interface = stored + dissipated along a loading–unloading–reloading path (energy balance, Hillerborg, Modéer, Petersson 1976)', () => {
    for (const kind of ['linear', 'bilinear', 'exponential'] as Softening[]) {
      const p = params(kind, 0.7);
      const path: [number, number][] = [
        [0, 0], [0.01, 0.002], [0.004, 0.001], [-0.00002, 0.003], [0.006, -0.004],
        [0.02, 0.0], [0.002, 0.0], [0.025, 0.01], [0.0, 0.0], [0.25, 0.02], [0.01, 0.0],
      ];
      let kappa = 0, work = 0;
      const t0 = new Float64Array(6);
      cohesivePoint(p, 0, 0, kappa, t0);
      const m = 4000;
      for (let leg = 0; leg + 1 < path.length; leg++) {
        const [wa, sa] = path[leg]!, [wb, sb] = path[leg + 1]!;
        for (let i = 1; i <= m; i++) {
          const w = wa + ((wb - wa) * i) / m, s = sa + ((sb - sa) * i) / m;
          kappa = cohesivePoint(p, w, s, kappa, out);
          work += 0.5 * ((t0[0]! + out[0]!) * (wb - wa) + (t0[1]! + out[1]!) * (sb - sa)) / m;
          t0.set(out);
        }
        const e = interfaceEnergy(p, wb, sb, kappa);
        expect(Math.abs(work - e.stored - e.dissipated)).toBeLessThan(2e-4 * GF);
      }
      // After full separation the dissipated energy is GF plus the penalty energy at the peak.
      const e = interfaceEnergy(p, 0.01, 0, kappa);
      expect(e.dissipated).toBeCloseTo(GF + 0.5 * ft * ft / kp, 12);
      expect(e.stored).toBe(0);
    }
  });

  it('energy: dissipation never decreases with the history (common practice: irreversibility)', () => {
    const p = params('exponential');
    let prev = -1;
    for (let i = 0; i <= 200; i++) {
      const k = (i / 200) * 0.06;
      const d = interfaceEnergy(p, 0, 0, k).dissipated;
      expect(d).toBeGreaterThanOrEqual(prev - 1e-15);
      prev = d;
    }
  });
});
