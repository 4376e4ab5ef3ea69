// Elastic runs of order 2 through the runner (runCase: case file → mesh → solve → files),
// against published elastic checks, each beside order 1 on the same mesh.
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { parseCase } from '../src/case/index.js';
import { runCase } from '../src/run.js';
import { renderTemplate } from '../src/templates/index.js';

const root = mkdtempSync(join(tmpdir(), 'rupta-order2-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

async function run(yaml: string, name: string) {
  const r = await runCase(parseCase(yaml, `${name}.yaml`), { out: join(root, name) });
  expect(r.result.status, r.result.reason).toBe('complete');
  return r;
}

const rel = (x: number, ref: number) => Math.abs(x - ref) / Math.abs(ref);

/** Cantilever 100 × 10 mm, clamped at x = 0, a uniform shear strip over the free end (P = 1 N). */
const cantilever = (order: number, h: number) => `
format: 1
title: cantilever
units: mm-N-MPa
thickness: 1
geometry: {outline: [[0,-5],[100,-5],[100,5],[0,5]]}
material: {E: 1000, nu: 0.25, ft: 3, GF: 0.1}
supports: [{along: [[0,-5],[0,5]], fix: xy}]
loads: [{at: [100, 0], width: 10, platen: pressure, direction: [0, -1]}]
control: {by: force, target: 1}
mesh: {size: ${h}, tipSize: ${h}, refineRadius: ${h}, seed: 4, order: ${order}}
output: {frames: [], vtk: true}
`;

describe('elastic runs of order 2', () => {
  it('cantilever with end shear (Timoshenko & Goodier): the mean end deflection within 0.5 % on a 2.5 mm mesh, where order 1 is more than 1 % off', async () => {
    // T&G's u_y(L, y) = P/(6EI)[(4 + 5ν) D² L/4 + 2L³] does not depend on y, so it is also the
    // mean over the end face, which is what the pressure strip's travel λ reads (its work
    // conjugate). Measured: order 2 −0.21 % (602 dofs), order 1 −1.93 % (242 dofs); the rest
    // of order 2's error is the fully clamped end (T&G hold one point and one slope).
    const E = 1000, nu = 0.25, L = 100, D = 10, I = D ** 3 / 12, ref = ((4 + 5 * nu) * D * D * L / 4 + 2 * L ** 3) / (6 * E * I);
    const r2 = await run(cantilever(2, 2.5), 'cant2'), r1 = await run(cantilever(1, 2.5), 'cant1');
    const d2 = r2.result.rows.at(-1)!.displacement_mm, d1 = r1.result.rows.at(-1)!.displacement_mm;
    expect(rel(d2, ref)).toBeLessThan(0.005);
    expect(rel(d1, ref)).toBeGreaterThan(0.01);
    // the consistent end loads (Simpson's 1/6, 4/6, 1/6 per edge) add up to the machine force
    expect(r2.result.rows.at(-1)!.load_N).toBeCloseTo(1, 8);
    // VTK: quadratic cells written as polygons through their edge midpoints (2n points per cell)
    const vtu = readFileSync(join(root, 'cant2', 'vtk', 'step-0001.vtu'), 'utf8');
    const cells = Number(/NumberOfCells="(\d+)"/.exec(vtu)![1]), points = Number(/NumberOfPoints="(\d+)"/.exec(vtu)![1]);
    expect(2 * r2.result.dofs.initial).toBe(4 * points);
    expect(points).toBe(r2.result.mesh.vertices + (r2.result.mesh.vertices + r2.result.mesh.polygons - 1));
    expect(cells).toBe(r2.result.mesh.polygons);
  });

  it('circular hole in a wide plate (Kirsch 1898): σxx at the hole within 3 % of 3σ, where order 1 on the same mesh is more than 10 % off', async () => {
    // plate 40a wide: the finite width raises the factor by about 0.3 % (Heywood's
    // K_tn = 2 + (1 − d/W)³, from memory); σ is the mean stress F/(W t). Probes around the
    // hole make its edge a ring of named points (cells about a/8 there).
    // Measured: order 2 2.930 (23k dofs), order 1 2.476 (9k dofs).
    const W = 400, a = 10, c = W / 2, ring = Array.from({ length: 22 }, (_, i) => {
      const t = 2 * Math.PI * (i + 0.5) / 22;
      return `, {name: r${i}, at: [${c + a * Math.cos(t)}, ${c + a * Math.sin(t)}]}`;
    }).join('');
    const plate = (order: number) => `
format: 1
title: hole
units: mm-N-MPa
thickness: 1
geometry:
  outline: [[0,0],[${W},0],[${W},${W}],[0,${W}]]
  holes: [{circle: {center: [${c}, ${c}], radius: ${a}}}]
material: {E: 30000, nu: 0.2, ft: 3, GF: 0.1}
supports: [{along: [[0,0],[0,${W}]], fix: x}, {at: [0,0], fix: y}]
loads: [{along: [[${W},0],[${W},${W}]], direction: [1, 0]}]
control: {by: displacement, target: 0.1}
probes: [{name: top, at: [${c}, ${c + a}]}, {name: bottom, at: [${c}, ${c - a}]}${ring}]
mesh: {size: 40, tipSize: 0.25, refineRadius: 0.25, seed: 4, order: ${order}}
output: {frames: []}
`;
    const k = async (order: number) => {
      const r = await run(plate(order), `hole${order}`), p = r.result.probes, sigma = r.result.rows.at(-1)!.load_N / W;
      return (p[0].sxx_MPa + p[1].sxx_MPa) / 2 / sigma;
    };
    const k2 = await k(2), k1 = await k(1);
    expect(rel(k2, 3)).toBeLessThan(0.03);
    expect(rel(k1, 3)).toBeGreaterThan(0.1);
  });

  it('single-edge-cracked strip in tension (Tada, Paris & Irwin handbook): K_I in tips.csv within 1.5 %', async () => {
    // the set-up of fracture.sif's strip: pinned at the middle of both ends; K from the
    // interaction integral on each cell's projected stress. Measured −0.7 %, ring spread 0.4 %.
    const b = 40, H = 240, a = 16, P = 400;
    const r = await run(`
format: 1
title: SECT
units: mm-N-MPa
thickness: 1
geometry:
  outline: [[0,0],[${b},0],[${b},${H}],[0,${H}]]
  notches: [{from: [0, ${H / 2}], to: [${a}, ${H / 2}], width: 0}]
material: {E: 30000, nu: 0.2, ft: 3, GF: 0.1}
supports: [{at: [${b / 2},0], fix: xy}, {at: [${b / 2},${H}], fix: x}]
loads: [{at: [${b / 2},${H}], direction: [0, 1]}]
control: {by: force, target: ${P}, increments: 1}
mesh: {size: 8, tipSize: 0.5, refineRadius: 8, seed: 4, order: 2}
output: {frames: []}
`, 'sect');
    const rows = readFileSync(join(r.dir, 'tips.csv'), 'utf8').trim().split('\n');
    const last = rows.at(-1)!.split(','), KI = Number(last[5]), KII = Number(last[6]);
    const al = a / b, K = (P / b) * Math.sqrt(Math.PI * a) * (1.12 - 0.231 * al + 10.55 * al ** 2 - 21.72 * al ** 3 + 30.39 * al ** 4) / Math.sqrt(1000);
    expect(rel(KI, K)).toBeLessThan(0.015);
    expect(Math.abs(KII)).toBeLessThan(0.01 * K);
  });

  it('rupta new --order 2: a cohesive template keeps its crack block, a brittle one becomes an elastic case that runs', async () => {
    const beam = parseCase(renderTemplate('beam-3pb', { order: '2' }), 'b.yaml');
    expect(beam.mesh.order).toBe(2);
    expect(beam.crack?.model).toBe('cohesive');
    const c = parseCase(renderTemplate('ceramic-bend-bar', { order: '2' }), 'c.yaml');
    expect(c.mesh.order).toBe(2);
    expect(c.crack).toBeUndefined();
    const r = await runCase(c, { out: join(root, 'bar') });
    expect(r.result.status).toBe('complete');
    // under CMOD control the gauge reads its target exactly
    expect(r.result.rows.at(-1)!.cmod_mm).toBeCloseTo(c.control.target, 10);
  });

  it('refuses --resume of an elastic run (one solve, no checkpoint) with one sentence', async () => {
    await expect(runCase(parseCase(cantilever(2, 5), 'c.yaml'), { out: join(root, 'resume'), resume: true }))
      .rejects.toThrow('--resume goes on from a checkpoint, and elastic runs of mesh.order 2 write none (they are one solve): run the case again with --force');
  });
});
