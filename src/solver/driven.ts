// Which vertices the supports hold, the machine drives and the gauge reads, picked once
// on the initial mesh (vertex ids are stable afterwards).
import type { CaseModel, Load, Vec2 } from '../case/model.js';
import type { PolyMesh } from '../mesh/polymesh.js';
import { InputError } from '../errors.js';
import type { DrivenDofs } from './system.js';

import { spreaderSlaves, type SlaveDof, type VertexDof } from './platens.js';

export type { SlaveDof, VertexDof };

/** A held or driven vertex dof, with the bearing strip that made it (if any). */
export type StripDof = VertexDof & { strip?: number };

/**
 * A bearing strip (a support or a load of width > 0 along one axis): a platen that can push on
 * the specimen but not pull. Its points (stable ids) bear along `comp`; `push` is the sign along
 * it of the force the platen puts on the specimen; `s` the offset of each point across the axis
 * from the strip's centre; the centre travels z·λ; a rocker may turn about it, a clamped strip
 * not; `holdOther` holds each bearing point across the axis too (a support fixed in x and y).
 */
export interface BearingStrip { pts: number[]; s: number[]; comp: 0 | 1; push: number; z: number; rocker: boolean; holdOther: boolean; support: boolean }

export interface Driven {
  fixed: StripDof[];
  load: StripDof[];
  /** Points of rocker platens (and spreaders): they follow the platen's translation and rotation. */
  slaves: (SlaveDof & { strip?: number })[];
  /** Bearing strips; the holds above made for strip k carry strip: k. */
  strips: BearingStrip[];
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

/** The bearing point (index) farthest from a rocker's centre, which carries its rotation; −1 without a lever. */
function leverEnd(st: BearingStrip, on: number[], tol: number): number {
  if (!st.rocker || on.length < 2) return -1;
  let e = on[0];
  for (const i of on) if (Math.abs(st.s[i]) > Math.abs(st.s[e])) e = i;
  return Math.abs(st.s[e]) > tol ? e : -1;
}

/**
 * The holds of a bearing strip on its points in contact (`bearing`): a rocker's farthest point
 * carries the platen's rotation and the others follow it by the lever rule, u = z·λ·(1 − c) + c·u_e
 * with c = s/s_e; without a lever (clamped, one point, or all points on the centre line) every
 * point travels z·λ.
 */
export function stripHolds(st: BearingStrip, k: number, bearing: (i: number) => boolean, tol: number):
  { fixed: StripDof[]; load: StripDof[]; slaves: (SlaveDof & { strip: number })[] } {
  const fixed: StripDof[] = [], load: StripDof[] = [], slaves: (SlaveDof & { strip: number })[] = [];
  const on = st.pts.map((_, i) => i).filter(bearing), comp = st.comp, e = leverEnd(st, on, tol);
  for (const i of on) {
    const v = st.pts[i];
    if (e >= 0 && i !== e) {
      const ci = st.s[i] / st.s[e];
      slaves.push({ v, comp, z: st.z * (1 - ci), masters: [{ v: st.pts[e], comp, w: ci }], strip: k });
    } else if (e < 0) {
      if (st.z === 0) fixed.push({ v, comp, w: 0, strip: k }); else load.push({ v, comp, w: st.z, strip: k });
    }
    if (st.holdOther) fixed.push({ v, comp: (1 - comp) as 0 | 1, w: 0, strip: k });
  }
  return { fixed, load, slaves };
}

/** Sign along axis comp of the direction from boundary vertex v into the specimen (toward the centroids of its cells). */
function inward(m: PolyMesh, v: number, comp: 0 | 1): number {
  const { cellStart, cellVerts, xy } = m;
  let sum = 0;
  for (let c = 0; c + 1 < cellStart.length; c++) {
    let has = false, g = 0;
    for (let k = cellStart[c]; k < cellStart[c + 1]; k++) { if (cellVerts[k] === v) has = true; g += xy[2 * cellVerts[k] + comp]; }
    if (has) sum += g / (cellStart[c + 1] - cellStart[c]) - xy[2 * v + comp];
  }
  return sum >= 0 ? 1 : -1;
}

/** mid: on an order-2 node mesh (vem/dofs2.ts), 1 for the edge-midpoint nodes. */
export function selectDriven(c: CaseModel, m: PolyMesh, tol: number, mid?: Uint8Array): Driven {
  const on = boundaryVertices(m);
  const fixed: StripDof[] = [], load: StripDof[] = [], slaves: (SlaveDof & { strip?: number })[] = [], strips: BearingStrip[] = [];
  /** A strip of points bearing along comp: its holds go in as made by stripHolds with every point in contact. */
  const addStrip = (st: BearingStrip) => {
    const k = strips.length, h = stripHolds(st, k, () => true, tol);
    strips.push(st);
    fixed.push(...h.fixed); load.push(...h.load); slaves.push(...h.slaves);
  };
  const offsets = (pts: number[], centre: Vec2, comp: 0 | 1) => pts.map((v) => m.xy[2 * v + 1 - comp] - centre[1 - comp]);
  const seen = new Map<number, string>();
  const claim = (v: number, comp: number, who: string, what: string) => {
    const other = seen.get(2 * v + comp);
    if (other) throw new InputError(`${who} acts on a point that ${other} already holds in the same direction; ${what === 'support' ? 'move one of the two supports' : `move the ${what} or the support`}`);
    seen.set(2 * v + comp, who);
  };
  c.supports.forEach((s, i) => {
    const who = `supports[${i}]`, pts = pick(m, on, who, s.at, s.along, s.width, tol);
    // a strip of width > 0 is a rocker unless clamped: held at its centre along its normal, free to rotate
    const normal: 0 | 1 = s.fix === 'x' ? 0 : s.fix === 'y' ? 1 : stripNormal(m, pts);
    if (s.at && s.width > 0 && pts.length > 1) {
      // a bearing strip: it pushes into the specimen along its normal, never pulls
      for (const v of pts) for (const comp of [0, 1] as const) if (comp === normal || s.fix === 'xy') claim(v, comp, who, 'support');
      addStrip({ pts, s: offsets(pts, s.at, normal), comp: normal, push: inward(m, pts[0], normal), z: 0, rocker: s.platen !== 'clamped', holdOther: s.fix === 'xy', support: true });
      return;
    }
    for (const v of pts) {
      for (const comp of [0, 1] as const) {
        if (comp === 0 ? s.fix === 'y' : s.fix === 'x') continue;
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
    if (l.at && l.width > 0 && comps.length === 1 && pts.length > 1) {
      // a bearing strip driven by the machine: it pushes along the load direction, never pulls
      const [comp, z] = comps[0];
      for (const v of pts) claim(v, comp, who, 'load');
      addStrip({ pts, s: offsets(pts, l.at, comp), comp, push: Math.sign(z), z, rocker: l.platen !== 'clamped', holdOther: false, support: false });
      return;
    }
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
  return { fixed, load, slaves, strips, gauge, opening, gaugeVerts };
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

/** Every vertex a support, load or platen holds (stable ids, each once). */
export function rigVertices(d: Driven): number[] {
  const out = new Set<number>();
  for (const x of [...d.fixed, ...d.load, ...d.slaves]) out.add(x.v);
  for (const s of d.slaves) for (const q of s.masters) out.add(q.v);
  return [...out].sort((a, b) => a - b);
}

/**
 * The rig with its holds carried over to the twins of its vertices where a crack has cut
 * through them: both halves then bear on the support or load. A twin of a platen's master
 * follows the master (same point of a rigid platen).
 */
export function withTwins(d: Driven, cracks: readonly { path: number[]; twins: number[] }[]): Driven {
  const twinOf = new Map<number, number>();
  for (const k of cracks) k.path.forEach((v, i) => { if (k.twins[i] >= 0) twinOf.set(v, k.twins[i]); });
  if (twinOf.size === 0) return d;
  const fixed = [...d.fixed], load = [...d.load], slaves = [...d.slaves];
  // a twin bears on the strip like its original, at the same offset
  const strips = d.strips.map((st) => {
    const pts = [...st.pts], s = [...st.s];
    st.pts.forEach((v, i) => { const t = twinOf.get(v); if (t !== undefined) { pts.push(t); s.push(st.s[i]); } });
    return { ...st, pts, s };
  });
  for (const x of d.fixed) { const t = twinOf.get(x.v); if (t !== undefined) fixed.push({ ...x, v: t }); }
  for (const x of d.load) { const t = twinOf.get(x.v); if (t !== undefined) load.push({ ...x, v: t }); }
  for (const x of d.slaves) { const t = twinOf.get(x.v); if (t !== undefined) slaves.push({ ...x, v: t }); }
  const held = new Set([...d.fixed, ...d.load, ...d.slaves].map((x) => 2 * x.v + x.comp)), seen = new Set<number>();
  for (const s of d.slaves) for (const q of s.masters) {
    const t = twinOf.get(q.v), key = 2 * q.v + q.comp;
    if (t === undefined || held.has(key) || seen.has(key)) continue;
    seen.add(key);
    slaves.push({ v: t, comp: q.comp, z: 0, masters: [{ v: q.v, comp: q.comp, w: 1 }], ...(s.strip !== undefined ? { strip: s.strip } : {}) });
  }
  return { ...d, fixed, load, slaves, strips };
}

/**
 * The rig with the points in `released` (stable ids) lifted off their bearing strips: each
 * strip that has lost a point is held again on the points still in contact.
 */
export function releaseFrom(d: Driven, released: readonly number[], tol: number): Driven {
  if (released.length === 0) return d;
  const off = new Set(released), redo = new Set<number>();
  d.strips.forEach((st, k) => { if (st.pts.some((v) => off.has(v))) redo.add(k); });
  if (redo.size === 0) return d;
  const keep = (x: { strip?: number }) => x.strip === undefined || !redo.has(x.strip);
  const fixed = d.fixed.filter(keep), load = d.load.filter(keep), slaves = d.slaves.filter(keep);
  for (const k of redo) {
    const st = d.strips[k], h = stripHolds(st, k, (i) => !off.has(st.pts[i]), tol);
    fixed.push(...h.fixed); load.push(...h.load); slaves.push(...h.slaves);
  }
  return { ...d, fixed, load, slaves };
}

/** Where one point of a bearing strip stands: the force the platen puts on it along the push (≥ 0 bears), and its gap to the platen (< 0 inside it). */
export interface Bearing { strip: number; v: number; force: number; gap: number; inContact: boolean }

/**
 * Force and gap at every point of the bearing strips (u, f on the compact mesh, co: stable id →
 * compact index). The platen's position at each point comes from its points in contact: a
 * rocker turns about its centre with its farthest bearing point, otherwise it travels z·λ.
 */
export function bearings(d: Driven, released: readonly number[], co: Int32Array, u: Float64Array, f: Float64Array, lambda: number, tol: number): Bearing[] {
  const off = new Set(released), out: Bearing[] = [];
  d.strips.forEach((st, k) => {
    const at = (i: number) => 2 * co[st.pts[i]] + st.comp;
    const on = st.pts.map((_, i) => i).filter((i) => co[st.pts[i]] >= 0 && !off.has(st.pts[i])), e = leverEnd(st, on, tol);
    const a = st.z * lambda, turn = e >= 0 ? (u[at(e)] - a) / st.s[e] : 0;
    st.pts.forEach((v, i) => {
      if (co[v] < 0) return;
      const platen = a + turn * st.s[i];
      out.push({ strip: k, v, force: st.push * f[at(i)], gap: st.push * (u[at(i)] - platen), inContact: !off.has(v) });
    });
  });
  return out;
}

/**
 * One update of the contact set (an active-set method for unilateral contact: Wriggers,
 * Computational Contact Mechanics, 2nd ed. 2006, ch. 6): a point in contact that the platen
 * pulls (force < −tolF) lifts off, a point off the platen that has gone into it (gap < −tolU)
 * comes back; a strip keeps at least its most loaded point. Returns the new set (sorted) or
 * null when nothing changes.
 */
export function contactUpdate(b: readonly Bearing[], released: readonly number[], tolF: number, tolU: number): number[] | null {
  const off = new Set(released);
  let changed = false;
  const byStrip = new Map<number, Bearing[]>();
  for (const x of b) { if (!byStrip.has(x.strip)) byStrip.set(x.strip, []); byStrip.get(x.strip)!.push(x); }
  for (const pts of byStrip.values()) {
    const on = pts.filter((x) => x.inContact), pulled = on.filter((x) => x.force < -tolF);
    if (pulled.length === on.length && on.length > 0) {
      // the whole strip pulls: it keeps the point it pulls least
      let best = on[0];
      for (const x of on) if (x.force > best.force) best = x;
      pulled.splice(pulled.indexOf(best), 1);
    }
    for (const x of pulled) { off.add(x.v); changed = true; }
    for (const x of pts) if (!x.inContact && x.gap < -tolU) { off.delete(x.v); changed = true; }
  }
  return changed ? [...off].sort((p, q) => p - q) : null;
}
