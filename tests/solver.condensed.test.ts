// The bulk condensed onto the crack faces: the Schur complement read from the trailing block
// of the LDLᵀ against a dense one (block elimination, common practice; ml-matrix for the dense
// solves), and a cracking beam whose condensed Newton iterations give the curve of the
// iterations on all free unknowns (the condensation is exact algebra: round-off and the
// Newton tolerance only).
import { describe, expect, it, vi } from 'vitest';
import { Matrix, solve as denseSolve } from 'ml-matrix';
import { analyze, factorize, fillReducingOrder, toDense, trailingSchur } from '../src/linalg/index.js';
import { randomDominant } from '../src/linalg/samples.js';
import { Analysis, type AnalysisResult } from '../src/fracture/analysis.js';
import { meshCase } from '../src/run.js';
import { readFileSync } from 'node:fs';
import { parseCase } from '../src/case/index.js';
import { coarseBeam } from './support/beam.js';
import { Condensation } from '../src/solver/condensed.js';
import type { System } from '../src/solver/system.js';

/** A pair with one face slaved to a platen (it moves with λ and the platen's masters) and the other an unknown. */
function slavedAgainstFree(sys: System): boolean {
  const slaved = new Set(sys.driven.slaves?.slave ?? []), P = sys.pairs, fo = sys.freeOf;
  for (let p = 0; p < P.plus.length; p++) for (let c = 0; c < 2; c++) {
    const a = 2 * P.plus[p] + c, b = 2 * P.minus[p] + c;
    if ((slaved.has(a) && fo[b] >= 0) || (slaved.has(b) && fo[a] >= 0)) return true;
  }
  return false;
}

/** The condensed run (a) against the full Newton (b): condensed, complete, the same rows and iterations. */
function expectSameCurve(a: { res: AnalysisResult; condensed: boolean | null }, b: { res: AnalysisResult }): void {
  expect(a.condensed).toBe(true);
  expect(a.res.status).toBe('complete');
  expect(a.res.rows.length).toBe(b.res.rows.length);
  for (let i = 0; i < a.res.rows.length; i++) {
    expect(a.res.rows[i].iterations).toBe(b.res.rows[i].iterations);
    expect(a.res.rows[i].load_N).toBeCloseTo(b.res.rows[i].load_N, 4);
  }
}

describe('condensation onto the crack faces', () => {
  it('the trailing block of L D Lᵀ is the Schur complement A_cc − A_cb A_bb⁻¹ A_bc (dense block elimination)', () => {
    const n = 120, A = randomDominant(n, 6, 7, 'positive');
    const last = new Uint8Array(n);
    for (let i = 0; i < n; i += 9) last[i] = 1;
    const sym = analyze(A, { ordering: fillReducingOrder(A, 'mindegree', {}, last) });
    let first = n;
    for (let i = 0; i < n; i++) if (last[i]) first = Math.min(first, sym.iperm[i]);
    const nt = n - first, S = new Float64Array(nt * nt);
    trailingSchur(factorize(A, sym), first, S);
    // the dense reference on the same split: b = the leading columns, c = the trailing ones
    const d = toDense(A), c = Array.from(sym.perm.slice(first)), b = Array.from(sym.perm.slice(0, first));
    const sub = (r: number[], k: number[]) => new Matrix(r.map((i) => k.map((j) => d[i * n + j])));
    const ref = sub(c, c).sub(sub(c, b).mmul(denseSolve(sub(b, b), sub(b, c))));
    let err = 0, scale = 0;
    for (let i = 0; i < nt; i++) for (let j = 0; j < nt; j++) {
      err = Math.max(err, Math.abs(S[i * nt + j] - ref.get(i, j)));
      scale = Math.max(scale, Math.abs(ref.get(i, j)));
    }
    expect(nt).toBeGreaterThanOrEqual(14);
    expect(err / scale).toBeLessThan(1e-12);
  });

  it('a cracking beam gives the same curve, crack and iterations condensed as on all unknowns', async () => {
    const c = coarseBeam({ target: 0.15, increments: 20 });
    const runs = [];
    for (const condense of [true, false]) runs.push(await new Analysis(c, meshCase(c).mesh, { condense }).run(() => {}));
    const [a, b] = runs;
    expect(a.status).toBe('complete');
    expect(a.rows.length).toBe(b.rows.length);
    // the path through the same cells, its points to round-off
    expect(a.crackPaths.map((k) => k.length)).toEqual(b.crackPaths.map((k) => k.length));
    a.crackPaths.forEach((k, i) => k.forEach((p, j) => expect(Math.hypot(p[0] - b.crackPaths[i][j][0], p[1] - b.crackPaths[i][j][1])).toBeLessThan(1e-6)));
    expect(a.rows.at(-1)!.crack_length_mm).toBeGreaterThan(10);
    for (let i = 0; i < a.rows.length; i++) {
      expect(a.rows[i].iterations).toBe(b.rows[i].iterations);
      expect(a.rows[i].load_N).toBeCloseTo(b.rows[i].load_N, 4);
      expect(Math.abs(a.rows[i].displacement_mm - b.rows[i].displacement_mm)).toBeLessThan(1e-9 + 1e-7 * Math.abs(b.rows[i].displacement_mm));
    }
  });

  it('two cracks that join (a face dof in two pairs) condense and give the curve of all unknowns', async () => {
    // the double-notched panel of the examples on a coarse mesh: its cracks meet in the middle
    const text = readFileSync(new URL('../cases/den-tension-example.yaml', import.meta.url), 'utf8')
      .replace(/^mesh:.*$/m, 'mesh: {size: 20, tipSize: 6, refineRadius: 24, coarsen: true, seed: 1, lloyd: 6}')
      .replace(/^  increments: .*$/m, '  increments: 30').replace(/^  growthStep: .*$/m, '  growthStep: 12')
      .replace(/^  averagingRadius: .*$/m, '  averagingRadius: 18').replace(/^output:.*$/m, 'output: {frames: [], animation: none}');
    const c = parseCase(text, 'den-coarse.yaml');
    const runs = [];
    for (const condense of [true, false]) {
      const a = new Analysis(c, meshCase(c).mesh, { condense });
      // whether each step's topology ran condensed (null before its first cohesive solve)
      const perStep: (boolean | null)[] = [];
      const res = await a.run(() => { perStep.push(a.condensedFaces); });
      runs.push({ res, condensed: a.condensedFaces, tips: a.tips.map((t) => t.end), perStep });
    }
    const [a, b] = runs;
    expect(a.tips).toContain('crack');
    // every topology condenses, those after the cracks met included
    expect(a.perStep).not.toContain(false);
    expectSameCurve(a, b);
  });

  it('a crack cut through to the load point condenses too (the point and its twin driven alike) and gives the curve of all unknowns', async () => {
    const c = coarseBeam({ target: 0.15, increments: 12 });
    const runs = [];
    for (const condense of [true, false]) {
      const a = new Analysis(c, meshCase(c).mesh, { condense });
      a.tips.splice(0);
      a.addCohesiveCut([220, 30], [220, 100]);
      runs.push({ res: await a.run(() => {}), condensed: a.condensedFaces });
    }
    const [a, b] = runs;
    expectSameCurve(a, b);
  });

  it('a crack cut through to a rocker strip whose points lift off one by one condenses (a face slaved to the platen, its twin let go) and gives the curve of all unknowns', async () => {
    // the load through a 10 mm rocker strip: as the halves turn, points of the strip on one side
    // of the cut lift off while their twins still bear, so a pair has one face on the platen
    const c = coarseBeam({ target: 0.15, increments: 12 });
    c.loads[0].width = 10;
    const build = vi.spyOn(Condensation, 'build');
    const runs = [];
    try {
      for (const condense of [true, false]) {
        build.mockClear();
        const a = new Analysis(c, meshCase(c).mesh, { condense });
        a.tips.splice(0);
        a.addCohesiveCut([220, 30], [220, 100]);
        const perStep: (boolean | null)[] = [];
        const res = await a.run(() => { perStep.push(a.condensedFaces); });
        // the topologies with such a pair, and how many of them condensed
        let slaved = 0, condensed = 0;
        build.mock.calls.forEach(([sys], i) => {
          if (!slavedAgainstFree(sys)) return;
          slaved++;
          if (build.mock.results[i].value) condensed++;
        });
        runs.push({ res, condensed: a.condensedFaces, perStep, slaved, condensedSlaved: condensed });
      }
    } finally { build.mockRestore(); }
    const [a, b] = runs;
    expect(a.slaved).toBeGreaterThanOrEqual(1);
    expect(a.condensedSlaved).toBe(a.slaved);
    expect(a.perStep).not.toContain(false);
    expectSameCurve(a, b);
  });
});
