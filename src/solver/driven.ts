// Which vertices the supports hold, the machine drives and the gauge reads, picked once
// on the initial mesh (vertex ids are stable afterwards).
import type { CaseModel, Load, Vec2 } from '../case/model.js';
import type { PolyMesh } from '../mesh/polymesh.js';
import { InputError } from '../errors.js';
import type { DrivenDofs } from './system.js';

import { rockerPlaten, spreaderSlaves, type SlaveDof, type VertexDof } from './platens.js';

export type { SlaveDof, VertexDof };

export interface Driven {
  fixed: VertexDof[];
  load: VertexDof[];
  /** Points of rocker platens (and spreaders): they follow the platen's translation and rotation. */
  slaves: SlaveDof[];
  gauge: VertexDof[];
  /** The control gauge's opening (the CMOD column), whatever the control reads. */
  opening: VertexDof[];
  gaugeVerts: [number, number] | null;
}

/** Σ w·u over vertex dofs, u on the compact mesh (co: stable vertex id → compact index). */
export function readDofs(dofs: readonly VertexDof[], u: Float64Array, co: Int32Array): number {
  let g = 0;
  for (const d of dofs) if (co[d.v] >= 0) g += d.w * u[2 * co[d.v] + d.comp];
  return g;
}

/** Vertices on the boundary: those with an edge that only one cell has. */
export function boundaryVertices(m: PolyMesh): Uint8Array {
  const nv = m.xy.length >> 1, on = new Uint8Array(nv);
  const edges = new Map<number, number>();
  const key = (a: number, b: number) => a * nv + b;
  const { cellStart, cellVerts } = m;
  for (let c = 0; c + 1 < cellStart.length; c++) {
    const s = cellStart[c], e = cellStart[c + 1];
    for (let k = s; k < e; k++) edges.set(key(cellVerts[k], cellVerts[k + 1 < e ? k + 1 : s]), 1);
  }
  for (let c = 0; c + 1 < cellStart.length; c++) {
    const s = cellStart[c], e = cellStart[c + 1];
    for (let k = s; k < e; k++) {
      const a = cellVerts[k], b = cellVerts[k + 1 < e ? k + 1 : s];
      if (!edges.has(key(b, a))) { on[a] = 1; on[b] = 1; }
    }
  }
  return on;
}

function nearestBoundary(m: PolyMesh, on: Uint8Array, p: Vec2): { v: number; d: number } {
  let best = -1, bd = Infinity;
  for (let v = 0; v < on.length; v++) {
    if (!on[v]) continue;
    const d = Math.hypot(m.xy[2 * v] - p[0], m.xy[2 * v + 1] - p[1]);
    if (d < bd) { bd = d; best = v; }
  }
  return { v: best, d: bd };
}

function segDist(px: number, py: number, a: Vec2, b: Vec2): number {
  const ex = b[0] - a[0], ey = b[1] - a[1], L2 = ex * ex + ey * ey;
  const t = L2 > 0 ? Math.max(0, Math.min(1, ((px - a[0]) * ex + (py - a[1]) * ey) / L2)) : 0;
  return Math.hypot(px - a[0] - t * ex, py - a[1] - t * ey);
}

/** Boundary vertices a support or load acts on. */
function pick(m: PolyMesh, on: Uint8Array, field: string, at: Vec2 | undefined, along: [Vec2, Vec2] | undefined, width: number, tol: number): number[] {
  const out: number[] = [];
  if (along) {
    for (let v = 0; v < on.length; v++) if (on[v] && segDist(m.xy[2 * v], m.xy[2 * v + 1], along[0], along[1]) <= tol) out.push(v);
    if (out.length === 0) throw new InputError(`${field}.along does not run along the specimen boundary (no mesh vertex within ${tol.toPrecision(2)} mm of it)`);
    return out;
  }
  const p = at!;
  const near = nearestBoundary(m, on, p);
  if (near.v < 0 || near.d > Math.max(tol, 1e-6)) {
    throw new InputError(`${field}.at must be a point on the specimen boundary in mm (found [${p[0]}, ${p[1]}], ${near.d.toPrecision(3)} mm away from it)`);
  }
  if (width > 0) return alongBoundary(m, near.v, width / 2 + tol).pts;
  return [near.v];
}

/**
 * Boundary vertices within arc length r of vertex v0, walking the boundary both ways (curves,
 * corners and holes alike), with each one's share of the strip's length (half of each strip
 * edge it ends).
 */
function alongBoundary(m: PolyMesh, v0: number, r: number, mid?: Uint8Array): { pts: number[]; len: number[] } {
  const nv = m.xy.length >> 1, next = new Int32Array(nv).fill(-1), prev = new Int32Array(nv).fill(-1);
  const edges = new Set<number>();
  const { cellStart, cellVerts } = m;
  for (let c = 0; c + 1 < cellStart.length; c++) {
    const s = cellStart[c], e = cellStart[c + 1];
    for (let k = s; k < e; k++) edges.add(cellVerts[k] * nv + cellVerts[k + 1 < e ? k + 1 : s]);
  }
  for (let c = 0; c + 1 < cellStart.length; c++) {
    const s = cellStart[c], e = cellStart[c + 1];
    for (let k = s; k < e; k++) {
      const a = cellVerts[k], b = cellVerts[k + 1 < e ? k + 1 : s];
      if (!edges.has(b * nv + a)) { next[a] = b; prev[b] = a; }
    }
  }
  const out = [v0], len = [0];
  for (const step of [next, prev]) {
    let v = v0, d = 0;
    for (let guard = 0; guard < nv; guard++) {
      const w = step[v];
      if (w < 0 || w === v0) break;
      const e = Math.hypot(m.xy[2 * w] - m.xy[2 * v], m.xy[2 * w + 1] - m.xy[2 * v + 1]);
      d += e;
      if (d > r || out.includes(w)) break;
      len[out.indexOf(v)] += e * share(v, mid);
      out.push(w); len.push(e * share(w, mid));
      v = w;
    }
  }
  return { pts: out, len };
}

/**
 * A node's share of a boundary segment it ends: half of it (trapezoid) on an order-1 mesh; on
 * an order-2 node mesh, whose segments are half edges, ⅓ at a vertex and ⅔ at a midpoint, so a
 * whole edge gives Simpson's 1/6, 4/6, 1/6 (the consistent loads of a quadratic edge).
 */
const share = (v: number, mid: Uint8Array | undefined): number => (mid ? (mid[v] ? 2 / 3 : 1 / 3) : 1 / 2);

/** A load's strip points with their lengths along the boundary (pressure platens). */
function stripLengths(m: PolyMesh, on: Uint8Array, l: Load, tol: number, mid?: Uint8Array): { pts: number[]; len: number[] } {
  const near = nearestBoundary(m, on, l.at!);
  return alongBoundary(m, near.v, l.width / 2 + tol, mid);
}

/**
 * Loads as the spreader sees them: a pressure strip becomes one load per point, each with
 * the share of the strip's force its length along the boundary gives (uniform pressure).
 */
function spreadLoads(c: CaseModel, m: PolyMesh, on: Uint8Array, tol: number, which: number[], mid?: Uint8Array): { loads: (Load & { of: number })[]; pts: number[][] } {
  const loads: (Load & { of: number })[] = [], pts: number[][] = [];
  for (const i of which) {
    const l = c.loads[i];
    if (l.platen === 'pressure' && l.at && l.width > 0) {
      const s = stripLengths(m, on, l, tol, mid), total = s.len.reduce((a, b) => a + b, 0);
      s.pts.forEach((v, k) => {
        loads.push({ at: [m.xy[2 * v], m.xy[2 * v + 1]], width: 0, direction: l.direction, share: (l.share ?? 1) * s.len[k] / total, of: i });
        pts.push([v]);
      });
    } else {
      loads.push({ ...l, of: i });
      pts.push(pick(m, on, `loads[${i}]`, l.at, l.along, l.width, tol));
    }
  }
  return { loads, pts };
}

/** Axis (0 = x, 1 = y) across which the points of a strip spread less: the strip's normal. */
function stripNormal(m: PolyMesh, pts: number[]): 0 | 1 {
  let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity;
  for (const v of pts) {
    x0 = Math.min(x0, m.xy[2 * v]); x1 = Math.max(x1, m.xy[2 * v]);
    y0 = Math.min(y0, m.xy[2 * v + 1]); y1 = Math.max(y1, m.xy[2 * v + 1]);
  }
  return x1 - x0 >= y1 - y0 ? 1 : 0;
}

/** mid: on an order-2 node mesh (vem/dofs2.ts), 1 for the edge-midpoint nodes. */
export function selectDriven(c: CaseModel, m: PolyMesh, tol: number, mid?: Uint8Array): Driven {
  const on = boundaryVertices(m);
  const fixed: VertexDof[] = [], load: VertexDof[] = [], slaves: SlaveDof[] = [];
  const seen = new Map<number, string>();
  const claim = (v: number, comp: number, who: string, what: string) => {
    const other = seen.get(2 * v + comp);
    if (other) throw new InputError(`${who} acts on a point that ${other} already holds in the same direction; move the ${what} or the support`);
    seen.set(2 * v + comp, who);
  };
  const addPlaten = (p: { master: number; slaves: SlaveDof[] }, comp: 0 | 1, who: string, what: string) => {
    claim(p.master, comp, who, what);
    for (const sd of p.slaves) { claim(sd.v, comp, who, what); slaves.push(sd); }
  };
  c.supports.forEach((s, i) => {
    const who = `supports[${i}]`, pts = pick(m, on, who, s.at, s.along, s.width, tol);
    // a strip of width > 0 is a rocker unless clamped: held at its centre along its normal, free to rotate
    const normal: 0 | 1 = s.fix === 'x' ? 0 : s.fix === 'y' ? 1 : stripNormal(m, pts);
    const rock = s.at && s.width > 0 && s.platen !== 'clamped' && pts.length > 1 ? rockerPlaten(m, pts, s.at, normal, 0, tol) : null;
    if (rock) addPlaten(rock, normal, who, 'support');
    for (const v of pts) {
      for (const comp of [0, 1] as const) {
        if ((comp === 0 ? s.fix === 'y' : s.fix === 'x') || (rock && comp === normal)) continue;
        fixed.push({ v, comp, w: 0 }); claim(v, comp, who, 'support');
      }
    }
  });
  const spread = (which: number[], wedge = false) => {
    const { loads, pts } = spreadLoads(c, m, on, tol, which, mid);
    // a wedge: each face takes the machine's force (the splitting force) and λ is the opening at the load line
    if (wedge) for (const l of loads) l.share = (l.share ?? 1);
    const sp = spreaderSlaves(loads, pts, m, tol, !wedge);
    for (const q of sp.masters) claim(q.v, q.comp, `loads[${loads[q.load].of}]`, 'load');
    for (const sd of sp.slaves) { claim(sd.v, sd.comp, `loads[${loads[sd.load].of}]`, 'load'); slaves.push(sd); }
  };
  if (c.wedge) spread(c.loads.map((_, i) => i), true);
  else if (c.loads.some((l) => l.share !== undefined)) spread(c.loads.map((_, i) => i));
  else c.loads.forEach((l, i) => {
    // a pressure strip shares its load among its points by their lengths
    if (l.platen === 'pressure' && l.at && l.width > 0) { spread([i]); return; }
    const [dx, dy] = l.direction, who = `loads[${i}]`;
    const pts = pick(m, on, who, l.at, l.along, l.width, tol);
    // an axis-aligned platen prescribes its own axis only; an oblique one moves the points rigidly
    const comps: [0 | 1, number][] = Math.abs(dy) < 1e-12 ? [[0, dx]] : Math.abs(dx) < 1e-12 ? [[1, dy]] : [[0, dx], [1, dy]];
    const rock = l.at && l.width > 0 && l.platen !== 'clamped' && comps.length === 1 && pts.length > 1
      ? rockerPlaten(m, pts, l.at, comps[0][0], comps[0][1], tol) : null;
    if (rock) { addPlaten(rock, comps[0][0], who, 'load'); return; }
    for (const v of pts) {
      for (const [comp, w] of comps) { claim(v, comp, who, 'load'); load.push({ v, comp, w }); }
    }
  });
  let gauge: VertexDof[] = [], opening: VertexDof[] = [], gaugeVerts: [number, number] | null = null;
  const g = c.control.gauge;
  if (g) {
    // gauge points are mesh vertices anywhere on the face (the domain makes them so)
    const all = new Uint8Array(on.length).fill(1);
    const a = nearestBoundary(m, all, g.from), b = nearestBoundary(m, all, g.to);
    if (a.d > Math.max(tol, 1e-6)) throw new InputError(`control.gauge.from must be a point of the specimen in mm (found [${g.from}], ${a.d.toPrecision(3)} mm from the nearest mesh vertex)`);
    if (b.d > Math.max(tol, 1e-6)) throw new InputError(`control.gauge.to must be a point of the specimen in mm (found [${g.to}], ${b.d.toPrecision(3)} mm from the nearest mesh vertex)`);
    const ex = g.to[0] - g.from[0], ey = g.to[1] - g.from[1], L = Math.hypot(ex, ey);
    if (!(L > 0)) throw new InputError('control.gauge.to must differ from control.gauge.from (found the same point)');
    // opening along from→to, or sliding across it (to its left)
    const [wx, wy] = c.control.reading === 'sliding' ? [-ey / L, ex / L] : [ex / L, ey / L];
    gauge = [{ v: b.v, comp: 0, w: wx }, { v: b.v, comp: 1, w: wy }, { v: a.v, comp: 0, w: -wx }, { v: a.v, comp: 1, w: -wy }];
    opening = [{ v: b.v, comp: 0, w: ex / L }, { v: b.v, comp: 1, w: ey / L }, { v: a.v, comp: 0, w: -ex / L }, { v: a.v, comp: 1, w: -ey / L }];
    gaugeVerts = [a.v, b.v];
  }
  if (load.length === 0 && !slaves.some((d) => d.z !== 0)) throw new InputError('loads must name at least one point or strip on the specimen boundary (found none)');
  return { fixed, load, slaves, gauge, opening, gaugeVerts };
}

/** The dofs of the current compact mesh (co: stable vertex id → compact index, −1 when gone). */
export function compactDriven(d: Driven, co: Int32Array): DrivenDofs {
  const live = (x: { v: number }) => co[x.v] >= 0;
  const dof = (x: { v: number; comp: number }) => 2 * co[x.v] + x.comp;
  const fixed = d.fixed.filter(live), load = d.load.filter(live), gauge = d.gauge.filter(live);
  // a slave whose master is gone keeps its translation only
  const sl = d.slaves.filter(live), start = [0], md: number[] = [], mw: number[] = [];
  for (const s of sl) {
    for (const q of s.masters) if (live(q)) { md.push(dof(q)); mw.push(q.w); }
    start.push(md.length);
  }
  return {
    fixed: Int32Array.from(fixed.map(dof)),
    load: Int32Array.from(load.map(dof)), loadW: Float64Array.from(load.map((x) => x.w)),
    gauge: Int32Array.from(gauge.map(dof)), gaugeW: Float64Array.from(gauge.map((x) => x.w)),
    slaves: {
      slave: Int32Array.from(sl.map(dof)), slaveZ: Float64Array.from(sl.map((x) => x.z)),
      slaveStart: Int32Array.from(start), masterDof: Int32Array.from(md), masterW: Float64Array.from(mw),
    },
  };
}
