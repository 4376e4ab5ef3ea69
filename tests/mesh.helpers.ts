// Shared case builders and mesh checks for the mesh and geometry tests.

import { orient2d } from 'robust-predicates';
import type { CaseModel, Hole, Notch, Vec2 } from '../src/case/model.js';
import type { Domain } from '../src/geometry/domain.js';
import { onBoundary, domainExtent } from '../src/geometry/domain.js';
import { cellArea, cellCount, type PolyMesh } from '../src/mesh/polymesh.js';

export function makeCase(p: {
  outline: Vec2[]; holes?: Hole[]; notches?: Notch[]; size?: number; tipSize?: number; refineRadius?: number; seed?: number; lloyd?: number;
  supports?: CaseModel['supports']; loads?: CaseModel['loads']; gauge?: { from: Vec2; to: Vec2 }; probes?: Vec2[];
}): CaseModel {
  return {
    format: 1, name: 'test', title: 'test', units: 'mm-N-MPa', model: 'plane-stress', thickness: 10,
    geometry: { outline: p.outline, holes: p.holes ?? [], notches: p.notches ?? [] },
    material: { E: 30000, nu: 0.2, ft: 3, GF: 0.1, softening: 'linear', shearWeight: 1 },
    supports: p.supports ?? [], loads: p.loads ?? [],
    control: { by: p.gauge ? 'cmod' : 'displacement', gauge: p.gauge, target: 0.1, increments: 10, stopAtLoadFraction: 0.05 },
    mesh: { size: p.size ?? 10, tipSize: p.tipSize ?? 2, refineRadius: p.refineRadius ?? 20, coarsen: false, seed: p.seed ?? 1, lloyd: p.lloyd ?? 6 },
    probes: (p.probes ?? []).map((at, i) => ({ name: `p${i}`, at })),
    output: { frames: [], every: 1, maxFrames: 40, animation: 'none', vtk: false, pngWidth: 800 },
  };
}

const disc = (cx: number, cy: number, r: number, n: number): Vec2[] =>
  Array.from({ length: n }, (_, k) => [cx + r * Math.cos((2 * Math.PI * k) / n), cy + r * Math.sin((2 * Math.PI * k) / n)] as Vec2);

/** The test domains: rectangle, notched beam, plate with holes, L-shape, disc. */
export function testCases(seed: number): Record<string, CaseModel> {
  return {
    rectangle: makeCase({ outline: [[0, 0], [120, 0], [120, 60], [0, 60]], size: 8, seed, probes: [[37.3, 21.9], [37.31, 21.9], [60, 0.4]] }),
    notched: makeCase({
      outline: [[0, 0], [200, 0], [200, 50], [0, 50]], notches: [{ from: [100, 0], to: [100, 20], width: 2 }],
      size: 8, tipSize: 1.5, refineRadius: 12, seed,
      supports: [{ at: [10, 0], fix: 'y', width: 0 }, { at: [190, 0], fix: 'xy', width: 0 }],
      loads: [{ at: [100, 50], direction: [0, -1], width: 6 }], gauge: { from: [96, 0], to: [104, 0] },
    }),
    holes: makeCase({
      outline: [[0, 0], [100, 0], [100, 80], [0, 80]],
      holes: [{ kind: 'circle', center: [30, 40], radius: 12 }, { kind: 'polygon', points: [[60, 20], [80, 25], [75, 50], [65, 45]] }],
      size: 6, seed, supports: [{ along: [[0, 0], [0, 80]], fix: 'x', width: 0 }], probes: [[90, 70]],
    }),
    lshape: makeCase({
      outline: [[0, 0], [80, 0], [80, 30], [30, 30], [30, 80], [0, 80]], size: 6, tipSize: 1, refineRadius: 8, seed,
      notches: [{ from: [30, 30], to: [22, 22], width: 0 }],
    }),
    disc: makeCase({ outline: disc(0, 0, 40, 64), size: 5, seed, loads: [{ at: [40, 0], direction: [-1, 0], width: 0 }] }),
  };
}

/** Check simplicity, orientation, conformity and boundary; returns the list of problems (empty when fine). */
export function checkMesh(m: PolyMesh, d: Domain): string[] {
  const bad: string[] = [];
  const { xy, cellStart, cellVerts } = m, nc = cellCount(m);
  const ext = domainExtent(d), tol = 1e-7 * ext;
  const P = (v: number): [number, number] => [xy[2 * v], xy[2 * v + 1]];
  const sides = new Map<string, number>();
  for (let c = 0; c < nc; c++) {
    const s = cellStart[c], e = cellStart[c + 1], n = e - s;
    const vs = Array.from(cellVerts.subarray(s, e));
    if (n < 3) bad.push(`cell ${c} has ${n} vertices`);
    if (new Set(vs).size !== n) bad.push(`cell ${c} repeats a vertex`);
    if (!(cellArea(m, c) > 0)) bad.push(`cell ${c} area ${cellArea(m, c)}`);
    // simple: no two non-adjacent sides meet (exact orientation tests)
    for (let i = 0; i < n; i++) for (let j = i + 2; j < n; j++) {
      if (i === 0 && j === n - 1) continue;
      const [a, b] = [P(vs[i]), P(vs[(i + 1) % n])], [p, q] = [P(vs[j]), P(vs[(j + 1) % n])];
      const d1 = orient2d(a[0], a[1], b[0], b[1], p[0], p[1]), d2 = orient2d(a[0], a[1], b[0], b[1], q[0], q[1]);
      const d3 = orient2d(p[0], p[1], q[0], q[1], a[0], a[1]), d4 = orient2d(p[0], p[1], q[0], q[1], b[0], b[1]);
      if (d1 * d2 < 0 && d3 * d4 < 0) bad.push(`cell ${c} sides ${i} and ${j} cross`);
    }
    for (let i = 0; i < n; i++) {
      const k = `${vs[i]},${vs[(i + 1) % n]}`;
      if (sides.has(k)) bad.push(`side ${k} used twice in one orientation`);
      sides.set(k, c);
    }
  }
  for (const k of sides.keys()) {
    const [a, b] = k.split(',').map(Number);
    if (sides.has(`${b},${a}`)) continue;
    const [ax, ay] = P(a), [bx, by] = P(b);
    if (!onBoundary(d, ax, ay, tol) || !onBoundary(d, bx, by, tol) || !onBoundary(d, (ax + bx) / 2, (ay + by) / 2, tol)) bad.push(`unshared side ${k} is not on the boundary`);
  }
  const used = new Uint8Array(xy.length >> 1);
  for (const v of cellVerts) used[v] = 1;
  if (used.includes(0)) bad.push('unused vertex');
  return bad.slice(0, 10);
}
