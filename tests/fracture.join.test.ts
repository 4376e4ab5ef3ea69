// Cracks meeting things: a crack that reaches a hole or another crack joins it, and a new
// crack starts on the far side of a reached hole where the stress there reaches the strength,
// so the specimen separates and its load falls (common practice: a specimen cut through carries
// no load). Energy balance at every step: external work = elastic energy + dissipated energy
// (definition of GF).
import { describe, expect, it } from 'vitest';
import { parseCase } from '../src/case/index.js';
import type { CaseModel } from '../src/case/model.js';
import { Analysis } from '../src/fracture/analysis.js';
import { pairGeometry } from '../src/fracture/equations.js';
import { meshCase } from '../src/run.js';
import { renderTemplate } from '../src/templates/index.js';
import { coarseBeam } from './support/beam.js';
import { coarseDen, expectJoinedApart } from './support/den.js';
import { expectBalance, expectLoadFalls, runToEnd } from './support/falls.js';

// the demo beam (coarse) with a hole of 20 mm on the ligament, 20 mm above the notch tip
const HOLE: [number, number, number] = [220, 60, 10];

describe('a crack through a hole on the ligament of a notched beam', () => {
  for (const start of ['notch-tips', 'anywhere']) {
    it(`joins the hole, starts again on its far side and loses its load (crack.start: ${start})`, async () => {
      const c = coarseBeam({ target: 0.6, increments: 60, hole: HOLE, start });
      const { a, res } = await runToEnd(c);
      expect(res.status, res.reason).toBe('complete');
      // the crack from the notch ends on the hole, its tip consumed
      expect(a.tips.some((t) => !t.active && t.end === 'hole')).toBe(true);
      // a crack starts on the rim, on the side of the hole away from the notch
      const rimStarts = res.crackPaths.filter((p) => Math.abs(Math.hypot(p[0][0] - HOLE[0], p[0][1] - HOLE[1]) - HOLE[2]) < 0.5);
      expect(rimStarts.length).toBeGreaterThan(0);
      for (const p of rimStarts) expect(p[0][1]).toBeGreaterThan(HOLE[1]);
      // and runs on toward the top face
      expect(Math.max(...rimStarts.flatMap((p) => p.map((q) => q[1])))).toBeGreaterThan(85);
      // the load falls after the first peak and does not rise again: no warning
      expectLoadFalls(res, { below: 0.2, once: true, quiet: c });
      // work of the machine = stored + dissipated (definition of GF): the hole on the line ahead
      // of the notch has its rim zone and far side refined before loading (with anywhere, the
      // notch's line too), measured 0.16 % (notch tips) and 0.75 % (anywhere, at the start from
      // the notch, step 2); 1.50 % and 2.07 % when only the rim was, the rest refined under load
      // as the cracks beyond it started
      expectBalance(res, 0.01);
    }, 120_000);
  }

  it('with the boundary stabilisation, under which a cell keeps its stiffness when a neighbour\'s refinement adds a vertex to its edge, the balance (definition of GF) closes within 1 % (crack.start: notch-tips)', async () => {
    // measured 0.04 % (0.16 % with the vertex form above; 0.40 % against 1.50 % when only the
    // rim was refined before loading): the refinement beside a loaded cell no longer stiffens or
    // softens it (DEVELOPERS.md, known gaps)
    const c = coarseBeam({ target: 0.6, increments: 60, hole: HOLE, start: 'notch-tips' });
    const { a, res } = await runToEnd(c, { stabilisation: 'boundary' });
    expect(res.status, res.reason).toBe('complete');
    expect(a.tips.some((t) => !t.active && t.end === 'hole')).toBe(true);
    expectLoadFalls(res, { below: 0.2 });
    expectBalance(res, 0.01);
  }, 120_000);
});

/** Distance from a point to a polyline. */
function toPath(p: [number, number], path: [number, number][]): number {
  let d = Infinity;
  for (let i = 0; i + 1 < path.length; i++) {
    const [ax, ay] = path[i], ex = path[i + 1][0] - ax, ey = path[i + 1][1] - ay, L2 = ex * ex + ey * ey;
    const u = L2 > 0 ? Math.max(0, Math.min(1, ((p[0] - ax) * ex + (p[1] - ay) * ey) / L2)) : 0;
    d = Math.min(d, Math.hypot(p[0] - ax - u * ex, p[1] - ay - u * ey));
  }
  return d;
}

describe('two cracks that meet', () => {
  it('offset notches (20 mm apart in height): the cracks pass, hook into each other\'s faces and the panel comes apart', async () => {
    const c = coarseDen(10);
    const { a, res } = await runToEnd(c);
    expect(res.status, res.reason).toBe('complete');
    // before the turn toward a face beside the tip, one crack ran past the other to the far edge
    const grown = a.tips.filter((t) => t.crack >= 0);
    expect(grown.length).toBe(2);
    for (const t of grown) { expect(t.active).toBe(false); expect(t.end).toBe('crack'); }
    // each crack ends on the other one, beyond where the two tips passed (x = 100): an S-shaped link
    const [p, q] = res.crackPaths;
    expect(toPath(p.at(-1)!, q)).toBeLessThan(0.1);
    expect(toPath(q.at(-1)!, p)).toBeLessThan(0.1);
    expect(p.at(-1)![0]).toBeGreaterThan(100);
    expect(q.at(-1)![0]).toBeLessThan(100);
    // where a crack ended on a face, the vertex there was twinned: its copy pairs with the met
    // crack's other face too, and the pairs of each crack cover its face once (lumped
    // integration, one node pair per vertex with half of each adjacent segment: common practice)
    const co = a.wm.toPolyMesh().compactOf, t = c.thickness;
    const { geom } = pairGeometry(a.wm, a.cracks, co, t);
    const paired = new Set([...geom.plus, ...geom.minus]);
    let first = 0;
    for (const k of a.cracks) {
      if (k.kind !== 'cohesive') continue;
      expect(k.joins?.length ?? 0).toBe(1);
      for (const j of k.joins!) { expect(paired.has(co[j.copy])).toBe(true); expect(paired.has(co[j.v])).toBe(true); }
      // both ends are twinned (the notch tip it grew from, the face it ended on): the pairs cover its whole length
      expect(k.twins.every((w) => w >= 0)).toBe(true);
      const n = k.twins.length + k.joins!.length;
      let area = 0, length = 0;
      for (let i = first; i < first + n; i++) area += geom.area[i];
      for (let i = 0; i + 1 < k.path.length; i++) length += Math.hypot(a.wm.x[k.path[i + 1]] - a.wm.x[k.path[i]], a.wm.y[k.path[i + 1]] - a.wm.y[k.path[i]]);
      expect(area / t).toBeCloseTo(length, 9);
      first += n;
    }
    // a panel cut through carries no load (common practice)
    expectLoadFalls(res, { below: 0.2, once: true });
    // measured 0.28 % (0.35 % when one crack ran past the other): checked at the 1 % of a ligament meshed fine from the start
    expectBalance(res, 0.01);
  }, 120_000);

  it('double-edge-notched tension: the cracks from both notches join and the panel comes apart', async () => {
    const c = coarseDen(0);
    const { a, res } = await runToEnd(c);
    // both tips end on the other crack's faces
    expectJoinedApart(a, res);
    // measured 0.05 %: checked at the 1 % the beam tests ask of a ligament meshed fine from the start
    expectBalance(res, 0.01);
  }, 120_000);
});

describe('a split disc', () => {
  it('starts further cracks beside its strips once the split has run through to them, and its load falls', async () => {
    // a short run (a third of the critical opening in 60 increments): the template's own run
    // goes on to three critical openings and is checked in templates.rigs
    const text = renderTemplate('disc-splitting', { 'mesh-size': '10', 'tip-size': '3' }).replace(/^output:.*$/m, 'output: {frames: [], animation: none}')
      .replace(/^  target: .*$/m, '  target: 0.04').replace(/^  increments: .*$/m, '  increments: 60');
    const c = parseCase(text, 'disc.yaml');
    const { a, res } = await runToEnd(c);
    expect(res.status, res.reason).toBe('complete');
    // the split runs from the centre through to both strips (its tips end on points of the rig)
    expect(a.tips[0].end).toBe('rig');
    expect(a.tips[1].end).toBe('rig');
    // then cracks start in the bulk beside it, away from the split (not on it)
    const split = [...res.crackPaths[0]].reverse().concat(res.crackPaths[1]);
    const later = res.crackPaths.slice(2);
    expect(later.length).toBeGreaterThan(0);
    for (const p of later) expect(toPath(p[0], split)).toBeGreaterThan(c.mesh.tipSize);
    // the halves no longer stand as columns between the strips: measured 66 % of the peak at the
    // end of the run, 88-90 % when no crack started after the split (a specimen cracked into
    // pieces carries less: common practice; the issue asks that the load falls after the peak)
    expectLoadFalls(res, { below: 0.75 });
    // measured 11.3 %: the split's step creates 80 N·mm as it runs across the diameter at once
    // (DEVELOPERS.md, known gaps), and the join at step 59, traced as a snap-back by the
    // dissipation, gives work back to the machine (1677 to 581 N·mm), so that gap weighs more
    // (7.2 % with the join's re-solve held at the fixed lateral opening, whose +60 N·mm snap
    // offset part of the split's)
    expectBalance(res, 0.12);
    // where the gap arises: along a converged quasi-static path on one mesh the machine's work is
    // the stored plus the dissipated energy (common practice), so a step in which no crack grows
    // keeps the balance; measured at most 0.03 % of the largest work, against 80 N·mm (7 %) in
    // the split's step
    const Wmax = Math.max(...res.rows.map((r) => Math.abs(r.external_work_Nmm)));
    const gap = (r: (typeof res.rows)[number]): number => r.external_work_Nmm - r.elastic_energy_Nmm - r.dissipated_Nmm;
    for (let i = 1; i < res.rows.length; i++) {
      const r0 = res.rows[i - 1], r1 = res.rows[i];
      if (r1.crack_length_mm === r0.crack_length_mm) expect(Math.abs(gap(r1) - gap(r0)), `step ${r1.step}`).toBeLessThan(1e-3 * Wmax);
    }
  }, 300_000);
});

describe('a hole beside the path of a crack', () => {
  // A hole concentrates the stress around it, so a crack passing beside it turns toward it
  // (common practice); mirrored hole, mirrored turn. The beam's own crack runs straight up the
  // plane of symmetry x = 220 (within 0.4 mm on this mesh).
  const xAt = (p: [number, number][], y: number): number => {
    for (let i = 1; i < p.length; i++) if ((p[i - 1][1] - y) * (p[i][1] - y) <= 0) {
      const t = (y - p[i - 1][1]) / (p[i][1] - p[i - 1][1] || 1);
      return p[i - 1][0] + t * (p[i][0] - p[i - 1][0]);
    }
    return NaN;
  };
  it('turns the crack toward the hole, on either side', async () => {
    // measured at y = 70 mm: no hole 220.3, hole of 16 mm at x = 240: 223.0, at x = 200: 217.9
    const xs: number[] = [];
    for (const hole of [undefined, [240, 55, 8], [200, 55, 8]] as const) {
      const c = coarseBeam({ target: 0.6, increments: 60, ...(hole ? { hole: [...hole] as [number, number, number] } : {}) });
      const { res } = await runToEnd(c);
      expect(res.status, res.reason).toBe('complete');
      xs.push(xAt(res.crackPaths[0] as [number, number][], 70));
    }
    const [none, right, left] = xs;
    expect(right - none).toBeGreaterThan(1.5);
    expect(none - left).toBeGreaterThan(1.5);
  }, 120_000);
});

describe('two notches in one beam', () => {
  // Two sharp slits of unequal depth, 20 mm either side of the load point (equal moment at both):
  // the crack from the slit with the larger elastic K_I (interaction integral, Yau, Wang & Corten
  // 1980; checked against Srawley's SENB expression in fracture.sif) runs through and the other
  // unloads and arrests (common practice: of competing cracks the one releasing more energy runs).
  // Mirrored depths, mirrored outcome.
  const beam = (deep: number, shallow: number, crack: boolean): CaseModel => {
    const c = coarseBeam({ target: 0.6, increments: 60 });
    c.geometry.notches = [{ from: [deep, 0], to: [deep, 30], width: 0 }, { from: [shallow, 0], to: [shallow, 20], width: 0 }];
    c.control.gauge = { from: [deep - 1, 0], to: [deep + 1, 0] };
    if (!crack) delete c.crack;
    return c;
  };
  for (const [deep, shallow] of [[200, 240], [240, 200]]) {
    it(`the deeper slit (at x = ${deep}) wins, as its K_I says; the shallower one arrests`, async () => {
      // elastic: K_I at each slit tip (tips.csv rows); measured 0.520 against 0.313 MPa√m (×1.66;
      // mirrored 0.521 against 0.312)
      const el = beam(deep, shallow, false);
      let K: number[] = [];
      await new Analysis(el, meshCase(el).mesh).run((e) => { if (e.row.step === 1) K = e.tips.map((t) => t.KI_MPa_sqrtm ?? NaN); });
      expect(K.length).toBe(2);
      expect(K[0]).toBeGreaterThan(1.3 * K[1]);
      expect(K[1]).toBeGreaterThan(0);
      // cohesive: both slits lay their first segments before loading and both grow at first
      const c = beam(deep, shallow, true);
      const { a, res } = await runToEnd(c);
      expect(res.status, res.reason).toBe('complete');
      expect(res.crackPaths.length).toBe(2);
      const [won, lost] = res.crackPaths;
      expect(Math.abs(won[0][0] - deep)).toBeLessThan(0.5);
      expect(Math.abs(lost[0][0] - shallow)).toBeLessThan(0.5);
      // the deep one runs through to the top face; the other stops a little above its slit
      // (measured: the whole laid path ends at y = 37.7 mm, mirrored 32.5 mm)
      expect(a.tips[0].end).toBe('outline');
      expect(Math.max(...won.map((p) => p[1]))).toBeGreaterThan(95);
      expect(a.tips[1].active).toBe(true);
      expect(Math.max(...lost.map((p) => p[1]))).toBeLessThan(50);
      // it stops while the deep one goes on: more than five growths of the deep crack after its last
      const log = a.growthLog, lastOfLost = log.map((g, i) => (g.tip === 1 ? i : -1)).reduce((p, q) => Math.max(p, q), -1);
      expect(lastOfLost).toBeGreaterThanOrEqual(0);
      expect(log.slice(lastOfLost + 1).filter((g) => g.tip === 0).length).toBeGreaterThan(5);
      // cut through, the beam carries no load (common practice)
      expectLoadFalls(res, { below: 0.2, once: true, quiet: c });
      // measured 1.01 % (mirrored 0.80 %): the winning crack turns toward the load point, so its
      // line ahead sweeps new cells under load
      expectBalance(res, 0.015);
    }, 120_000);
  }
});
