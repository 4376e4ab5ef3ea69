// The exact scalings the fit relies on, and its small searches.
import { describe, expect, it } from 'vitest';
import { loadCase } from '../src/case/index.js';
import { buildDomain } from '../src/geometry/domain.js';
import { generateMesh } from '../src/mesh/generate.js';
import { simulateCurve } from '../src/lab/fitworker.js';
import { nelderMead, parabolaAt, parabolaVertex, scaledMaterial, scalingDirections, shapeOf } from '../src/lab/fitscale.js';

describe('scaling at fixed l_ch', () => {
  // Dimensional analysis of the cohesive crack model (Hillerborg, Modéer, Petersson 1976):
  // with a linear elastic bulk and σ = ft·f(w·ft/GF), the curve of (b²/c·E, b·ft, c·GF) is the
  // curve of (E, ft, GF) with loads × b and openings × c/b; l_ch = E·GF/ft² is the same.
  // adaptive steps decide from iteration counts and relative measures, so they scale too
  for (const [softening, steps] of [['bilinear', 'fixed'], ['exponential', 'fixed'], ['bilinear', 'adaptive']] as const) {
    it(`the beam with ${softening} softening, ${steps} steps, cracking through: loads × b, CMOD and displacement × c/b, to round-off`, async () => {
      const c = loadCase('cases/fit-demo.yaml');
      c.mesh = { ...c.mesh, size: 12.5, tipSize: 3.125 };
      c.control = { ...c.control, target: 0.2, increments: 12, steps };
      c.material = { ...c.material, softening };
      const mesh = generateMesh(buildDomain(c), c.mesh);
      const b = 1.15, cf = 0.85, lb = Math.log(b), ll = Math.log(cf / b);
      const m = scaledMaterial(c.material, lb, ll);
      expect(m.E).toBeCloseTo((c.material.E * b * b) / cf, 6);
      expect(shapeOf(m)).toBeCloseTo(shapeOf(c.material), 12);
      const k = structuredClone(c);
      k.material = { ...k.material, ...m };
      k.control.target *= cf / b;
      const [s0, s1] = [await simulateCurve(c, mesh), await simulateCurve(k, mesh)];
      expect(s0.status).toBe('complete');
      expect(s1.load.length).toBe(s0.load.length);
      let P = 0;
      for (const v of s0.load) P = Math.max(P, v);
      for (let i = 0; i < s0.load.length; i++) {
        expect(Math.abs(s1.load[i]! / b - s0.load[i]!) / P).toBeLessThan(1e-8);
        expect(s1.cmod![i]! / (cf / b)).toBeCloseTo(s0.cmod![i]!, 10);
        expect(s1.displacement[i]! / (cf / b)).toBeCloseTo(s0.displacement[i]!, 10);
      }
      // the crack grew: the scaling holds through growth events, not only in the elastic part
      expect(s0.load[s0.load.length - 1]!).toBeLessThan(0.8 * P);
    }, 120_000);
  }

  it('the directions that keep every parameter not fitted as it is', () => {
    const m0 = { E: 30000, ft: 3, GF: 0.1 };
    const cases: [('E' | 'ft' | 'GF')[], number][] = [[['E', 'ft', 'GF'], 2], [['ft', 'GF'], 1], [['E', 'GF'], 1], [['E', 'ft'], 1], [['GF'], 0]];
    for (const [fitted, n] of cases) {
      const d = scalingDirections(fitted);
      expect(d).toHaveLength(n);
      for (const [db, dl] of d) {
        const m = scaledMaterial(m0, 0.1 * db, 0.1 * dl);
        for (const p of ['E', 'ft', 'GF'] as const) if (!fitted.includes(p)) expect(m[p]).toBeCloseTo(m0[p], 10);
        expect(shapeOf(m)).toBeCloseTo(shapeOf(m0), 12);
      }
    }
  });
});

describe('small searches', () => {
  it('Nelder–Mead finds the minimum of a tilted quadratic in two variables (common practice)', () => {
    const r = nelderMead(([x, y]) => (x! - 0.3) ** 2 + 2 * (y! + 0.2) ** 2 + 0.5 * (x! - 0.3) * (y! + 0.2), [0, 0], 0.05, 1e-7);
    expect(r.x[0]!).toBeCloseTo(0.3, 5);
    expect(r.x[1]!).toBeCloseTo(-0.2, 5);
  });

  it('Nelder–Mead stays out of a region where the function is infinite', () => {
    const r = nelderMead(([x]) => (x! < 0.1 ? Infinity : (x! - 0.05) ** 2), [0.5], 0.05, 1e-8);
    expect(r.x[0]!).toBeGreaterThanOrEqual(0.1);
    expect(r.x[0]!).toBeCloseTo(0.1, 4);
  });

  it('the parabola through three points: its vertex and values (exact for a parabola)', () => {
    const f = (x: number) => 2 * (x - 0.7) ** 2 + 1;
    const p: [number, number][] = [[0, f(0)], [0.5, f(0.5)], [2, f(2)]];
    expect(parabolaVertex(p[0]!, p[1]!, p[2]!)).toBeCloseTo(0.7, 12);
    expect(parabolaAt(p[0]!, p[1]!, p[2]!, 1.3)).toBeCloseTo(f(1.3), 12);
    expect(parabolaVertex([0, 0], [1, 1], [2, 0])).toBeNull(); // opens downward
  });
});
