// The specimen domain: outline minus holes and cut notches, plus the points and strips the mesh must honour.

import polygonClipping from 'polygon-clipping';
import type { CaseModel, Vec2 } from '../case/model.js';
import { InputError } from '../errors.js';
import { makeSizeField } from '../mesh/sizefield.js';
import { EdgeGrid } from './edgegrid.js';
import { flatRing, orientRing, ringArea, segDist2 } from './rings.js';

export interface Domain {
  /** CCW ring, flat xy, after subtracting the notches of width > 0 that cut the outline. */
  outline: Float64Array;
  /** CW rings of interior holes, including interior notches of width > 0. */
  holes: Float64Array[];
  area: number;
  /** Width-0 notches: not cut from the domain; inserted after meshing. */
  slits: [Vec2, Vec2][];
  /** Refinement centres: the `to` end of each notch. */
  tips: Vec2[];
  /** Points that must become mesh vertices. */
  points: Vec2[];
  /** Boundary segments that must be resolved by vertices. */
  strips: [Vec2, Vec2][];
}

const grids = new WeakMap<Domain, EdgeGrid>();

/** The edge grid of a domain (outline first, then holes), built once per domain. */
export function domainGrid(d: Domain): EdgeGrid {
  let g = grids.get(d);
  if (!g) { g = new EdgeGrid([d.outline, ...d.holes]); grids.set(d, g); }
  return g;
}

/** Largest side of the bounding box of the outline. */
export function domainExtent(d: Domain): number {
  const o = d.outline;
  let xmin = Infinity, ymin = Infinity, xmax = -Infinity, ymax = -Infinity;
  for (let i = 0; i < o.length; i += 2) {
    if (o[i] < xmin) xmin = o[i]; if (o[i] > xmax) xmax = o[i];
    if (o[i + 1] < ymin) ymin = o[i + 1]; if (o[i + 1] > ymax) ymax = o[i + 1];
  }
  return Math.max(xmax - xmin, ymax - ymin);
}

export function pointInDomain(d: Domain, x: number, y: number): boolean {
  return domainGrid(d).contains(x, y);
}

export function distanceToBoundary(d: Domain, x: number, y: number): number {
  const out = [0, 0, 0];
  domainGrid(d).nearest(x, y, out);
  return Math.sqrt(out[0]);
}

export function onBoundary(d: Domain, x: number, y: number, tol: number): boolean {
  return distanceToBoundary(d, x, y) <= tol;
}

/** First crossing of segment a→b with the outline or a hole ring, with t in (0, 1]. */
export function segmentHitsBoundary(d: Domain, ax: number, ay: number, bx: number, by: number): { t: number; x: number; y: number } | null {
  const g = domainGrid(d), v = g.vx, nx = g.next;
  const dx = bx - ax, dy = by - ay;
  const tiny = 1e-12;
  let best = Infinity;
  for (let e = 0; e < nx.length; e++) {
    const px = v[2 * e], py = v[2 * e + 1], qx = v[2 * nx[e]], qy = v[2 * nx[e] + 1];
    const ex = qx - px, ey = qy - py;
    const den = dx * ey - dy * ex;
    if (den === 0) continue;
    const t = ((px - ax) * ey - (py - ay) * ex) / den;
    const u = ((px - ax) * dy - (py - ay) * dx) / den;
    if (t > tiny && t <= 1 && u >= 0 && u <= 1 && t < best) best = t;
  }
  return best === Infinity ? null : { t: best, x: ax + best * dx, y: ay + best * dy };
}

function notchRect(from: Vec2, to: Vec2, w: number, extendBack: number): [number, number][] {
  const L = Math.hypot(to[0] - from[0], to[1] - from[1]);
  const ux = (to[0] - from[0]) / L, uy = (to[1] - from[1]) / L, nx = -uy * w / 2, ny = ux * w / 2;
  const fx = from[0] - ux * extendBack, fy = from[1] - uy * extendBack;
  return [[fx - nx, fy - ny], [to[0] - nx, to[1] - ny], [to[0] + nx, to[1] + ny], [fx + nx, fy + ny], [fx - nx, fy - ny]];
}

function closed(r: Float64Array): [number, number][] {
  const out: [number, number][] = [];
  for (let i = 0; i < r.length; i += 2) out.push([r[i], r[i + 1]]);
  out.push([r[0], r[1]]);
  return out;
}

/** The point a distance `len` along the boundary ring from edge e at parameter t (backwards when len < 0). */
export function walkBoundary(g: EdgeGrid, e: number, t: number, len: number): Vec2 {
  const v = g.vx, ring = g.ringOf[e], r0 = g.ringStart[ring], r1 = g.ringStart[ring + 1];
  const prev = (k: number) => (k === r0 ? r1 - 1 : k - 1);
  let left = Math.abs(len);
  for (let guard = 0; guard <= r1 - r0; guard++) {
    const f = g.next[e], ex = v[2 * f] - v[2 * e], ey = v[2 * f + 1] - v[2 * e + 1], L = Math.hypot(ex, ey);
    const room = len > 0 ? (1 - t) * L : t * L;
    if (left <= room && L > 0) {
      const tt = len > 0 ? t + left / L : t - left / L;
      return [v[2 * e] + tt * ex, v[2 * e + 1] + tt * ey];
    }
    left -= room;
    if (len > 0) { e = f; t = 0; } else { e = prev(e); t = 1; }
  }
  return [v[2 * e], v[2 * e + 1]];
}

export function buildDomain(c: CaseModel): Domain {
  const g = c.geometry;
  const outline0 = orientRing(flatRing(g.outline), true);
  const ext = Math.max(1e-300, ...[0, 1].map(k => {
    let lo = Infinity, hi = -Infinity;
    for (let i = k; i < outline0.length; i += 2) { lo = Math.min(lo, outline0[i]); hi = Math.max(hi, outline0[i]); }
    return hi - lo;
  }));
  const tolOn = 1e-7 * ext;
  const tips: Vec2[] = [], slits: [Vec2, Vec2][] = [], cut: [number, number][][][] = [];
  const outlineGrid = new EdgeGrid([outline0]);
  const nearOutline = (p: Vec2) => { const o = [0, 0, 0]; outlineGrid.nearest(p[0], p[1], o); return Math.sqrt(o[0]) <= tolOn; };

  for (const n of g.notches) {
    tips.push([n.to[0], n.to[1]]);
    if (n.width > 0) {
      const L = Math.hypot(n.to[0] - n.from[0], n.to[1] - n.from[1]);
      // a notch starting on the edge is extended outwards so the cut is clean
      const back = nearOutline(n.from) ? Math.max(n.width, 0.05 * L) : 0;
      cut.push([notchRect(n.from, n.to, n.width, back)]);
    } else {
      slits.push([[n.from[0], n.from[1]], [n.to[0], n.to[1]]]);
      // a slit inside the material has a tip at each end
      if (!nearOutline(n.from)) tips.push([n.from[0], n.from[1]]);
    }
  }

  // points and strip ends, gathered before the rings so circles can be sized by them
  const raw: Vec2[] = [];
  const strips: [Vec2, Vec2][] = [];
  const at: { p: Vec2; w: number }[] = [];
  for (const s of [...c.supports, ...c.loads]) {
    if (s.at) at.push({ p: [s.at[0], s.at[1]], w: s.width });
    if (s.along) { strips.push([[...s.along[0]] as Vec2, [...s.along[1]] as Vec2]); raw.push([...s.along[0]] as Vec2, [...s.along[1]] as Vec2); }
  }
  if (c.control.gauge) raw.push([...c.control.gauge.from] as Vec2, [...c.control.gauge.to] as Vec2);
  for (const p of c.probes) raw.push([p.at[0], p.at[1]]);
  for (const g of c.gauges ?? []) raw.push([...g.from] as Vec2, [...g.to] as Vec2);
  for (const s of slits) raw.push([...s[0]] as Vec2, [...s[1]] as Vec2);
  for (const n of g.notches) if (n.width > 0) raw.push([n.to[0], n.to[1]]);
  for (const a of at) raw.push(a.p);

  // A load strip ahead of a notch (beyond its tip, and within mesh.refineRadius plus half its
  // width of the notch's line) is meshed at the tip size like the tip: the crack from the
  // notch, straight or curving, ends on it or beside it, and once loading has begun the cells
  // at the rig are kept as meshed. Left coarse, the last cuts jumped a cell at a time and the
  // crack met the face where the cells put it (the four-point shear beam, DEVELOPERS.md);
  // refined before loading instead, the points added under a strip were not held by its
  // platen. A point load (width 0) draws the crack onto itself whatever the cells.
  if (c.crack?.start === 'notch-tips') {
    for (const q of c.loads) {
      if (!q.at || !(q.width > 0)) continue;
      const [x, y] = q.at, r = c.mesh.refineRadius + q.width / 2;
      const ahead = g.notches.some((k) => {
        const ex = k.to[0] - k.from[0], ey = k.to[1] - k.from[1], L = Math.hypot(ex, ey);
        return ((x - k.to[0]) * ex + (y - k.to[1]) * ey) / L > 0 && Math.abs((x - k.to[0]) * ey - (y - k.to[1]) * ex) / L <= r;
      });
      if (ahead) tips.push([x, y]);
    }
  }
  const h = makeSizeField(c.mesh, tips, raw);
  for (const hole of g.holes) {
    if (hole.kind === 'circle') {
      const { center: [cx, cy], radius: r } = hole;
      let hm = Infinity;
      for (let k = 0; k < 32; k++) hm = Math.min(hm, h(cx + r * Math.cos(k * Math.PI / 16), cy + r * Math.sin(k * Math.PI / 16)));
      const m = Math.max(16, Math.ceil(2 * Math.PI * r / hm));
      // named points on the circle (pins, gauges, probes) become corners of its polygon,
      // so they lie on the meshed boundary and not a sagitta away from it
      const angles: number[] = [];
      for (let k = 0; k < m; k++) angles.push((2 * Math.PI * k) / m);
      for (const p of raw) {
        if (Math.abs(Math.hypot(p[0] - cx, p[1] - cy) - r) > 1e-6 * r) continue;
        let a = Math.atan2(p[1] - cy, p[0] - cx);
        if (a < 0) a += 2 * Math.PI;
        const step = (2 * Math.PI) / m, k = Math.round(a / step) % m;
        if (Math.abs(a - k * step) < 0.25 * step || Math.abs(a - k * step - 2 * Math.PI) < 0.25 * step) angles[k] = a; else angles.push(a);
      }
      angles.sort((a, b) => a - b);
      const ring: [number, number][] = angles.map((a) => [cx + r * Math.cos(a), cy + r * Math.sin(a)]);
      ring.push([ring[0][0], ring[0][1]]);
      cut.push([ring]);
    } else {
      const ring = hole.points.map(p => [p[0], p[1]] as [number, number]);
      ring.push([ring[0][0], ring[0][1]]);
      cut.push([ring]);
    }
  }

  const res = cut.length ? polygonClipping.difference([closed(outline0)], ...cut) : [[closed(outline0)]];
  if (res.length !== 1) {
    throw new InputError(res.length === 0
      ? 'geometry: holes and notches remove the whole specimen; expected a specimen with material left.'
      : `geometry: holes and notches cut the specimen into ${res.length} separate pieces; expected one connected specimen.`);
  }
  const rings = [orientRing(flatRing(res[0][0]), true), ...res[0].slice(1).map(r => orientRing(flatRing(r), false))];

  // strips of width > 0 run along the boundary, w/2 either way from the point, round
  // corners and curved outlines and holes alike (test rigs); their ends become vertices
  const grid0 = new EdgeGrid(rings);
  const o = [0, 0, 0];
  for (const a of at) {
    if (!(a.w > 0)) continue;
    grid0.nearest(a.p[0], a.p[1], o);
    const s0 = walkBoundary(grid0, o[1], o[2], -a.w / 2), s1 = walkBoundary(grid0, o[1], o[2], a.w / 2);
    strips.push([s0, s1]);
    raw.push(s0, s1);
  }

  // snap points that lie on the boundary into the rings; keep interior ones; refuse outside ones
  const points: Vec2[] = [];
  const inserts: { e: number; t: number; x: number; y: number }[] = [];
  // a point within tolOn of one kept already is the same point: kept ones are bucketed by tolOn-sized cells
  const buckets = new Map<string, Vec2[]>();
  const cellOf = (v: number) => Math.floor(v / tolOn);
  const seen = (p: Vec2) => {
    const i0 = cellOf(p[0]), j0 = cellOf(p[1]);
    for (let j = j0 - 1; j <= j0 + 1; j++) for (let i = i0 - 1; i <= i0 + 1; i++) {
      if (buckets.get(`${i},${j}`)?.some(q => Math.abs(q[0] - p[0]) <= tolOn && Math.abs(q[1] - p[1]) <= tolOn)) return true;
    }
    return false;
  };
  const keep = (p: Vec2) => { const k = `${cellOf(p[0])},${cellOf(p[1])}`; const b = buckets.get(k); if (b) b.push(p); else buckets.set(k, [p]); points.push(p); };
  for (const p of raw) {
    grid0.nearest(p[0], p[1], o);
    const snapTol = Math.max(tolOn, 0.02 * h(p[0], p[1]));
    let q: Vec2 = [p[0], p[1]];
    if (Math.sqrt(o[0]) <= snapTol) {
      const e = o[1], f = grid0.next[e], v = grid0.vx;
      const L = Math.hypot(v[2 * f] - v[2 * e], v[2 * f + 1] - v[2 * e + 1]);
      if (o[2] * L <= snapTol) q = [v[2 * e], v[2 * e + 1]];
      else if ((1 - o[2]) * L <= snapTol) q = [v[2 * f], v[2 * f + 1]];
      else {
        if (Math.sqrt(o[0]) > 0) q = [v[2 * e] + o[2] * (v[2 * f] - v[2 * e]), v[2 * e + 1] + o[2] * (v[2 * f + 1] - v[2 * e + 1])];
        inserts.push({ e, t: o[2], x: q[0], y: q[1] });
      }
    } else if (!grid0.contains(p[0], p[1])) {
      throw new InputError(`point (${p[0]}, ${p[1]}) mm lies outside the specimen; expected a point on or inside the outline.`);
    }
    // strips and tips follow their snapped point
    for (const s of strips) for (const k of [0, 1]) if (s[k][0] === p[0] && s[k][1] === p[1]) s[k] = q;
    if (!seen(q)) keep(q);
  }
  const outRings = rings.map((r, ri) => {
    const base = grid0.ringStart[ri], m = r.length >> 1;
    const mine = inserts.filter(s => grid0.ringOf[s.e] === ri).sort((a, b) => a.e - b.e || a.t - b.t);
    if (!mine.length) return r;
    const out: number[] = [];
    let k = 0;
    for (let i = 0; i < m; i++) {
      out.push(r[2 * i], r[2 * i + 1]);
      while (k < mine.length && mine[k].e === base + i) {
        const s = mine[k++];
        const lx = out[out.length - 2], ly = out[out.length - 1];
        if (Math.abs(lx - s.x) > tolOn || Math.abs(ly - s.y) > tolOn) out.push(s.x, s.y);
      }
    }
    return Float64Array.from(out);
  });
  const outline = outRings[0], holes = outRings.slice(1);
  const area = ringArea(outline) + holes.reduce((s, r) => s + ringArea(r), 0);
  return { outline, holes, area, slits, tips, points, strips };
}

/** Nearest boundary point to (x, y). */
export function nearestBoundaryPoint(d: Domain, x: number, y: number): Vec2 {
  const g = domainGrid(d), o = [0, 0, 0];
  g.nearest(x, y, o);
  const e = o[1], f = g.next[e], v = g.vx;
  return [v[2 * e] + o[2] * (v[2 * f] - v[2 * e]), v[2 * e + 1] + o[2] * (v[2 * f + 1] - v[2 * e + 1])];
}

