// Seed points: drawn by the size field (density ∝ 1/h²), relaxed by density-weighted Lloyd iterations.

import type { MeshSettings, Vec2 } from '../case/model.js';
import type { Domain } from '../geometry/domain.js';
import { domainGrid, distanceToBoundary, domainExtent } from '../geometry/domain.js';
import { InputError } from '../errors.js';
import { CellClipper, LoopSink } from './clip.js';
import { DiscGrid, PointGrid } from './pointgrid.js';
import { prng } from './prng.js';
import { clipToBox, VoronoiCells } from './voronoi.js';

/** Area of a regular hexagon with edge h: the cell area the size field asks for. */
export const HEX_AREA = 1.5 * Math.sqrt(3);

export interface SeedSet {
  /** Seeds followed by 4 far frame points. */
  pts: Float64Array;
  count: number;
  /** Seeds that Lloyd must not move (triples around interior named points). */
  fixed: Uint8Array;
  /** Interior named points with the three seeds whose Voronoi vertex they are. */
  pins: { p: Vec2; seeds: [number, number, number] }[];
  box: [number, number, number, number];
  /** True inside the guard circles of the pinned points, where free seeds may not go. */
  excluded: (x: number, y: number) => boolean;
}

/** Box that holds the domain with a small margin; cells are cut to it before the domain clip. */
export function domainBox(d: Domain): [number, number, number, number] {
  const o = d.outline, ext = domainExtent(d), m = 0.01 * ext + 1e-12;
  let xmin = Infinity, ymin = Infinity, xmax = -Infinity, ymax = -Infinity;
  for (let i = 0; i < o.length; i += 2) {
    if (o[i] < xmin) xmin = o[i]; if (o[i] > xmax) xmax = o[i];
    if (o[i + 1] < ymin) ymin = o[i + 1]; if (o[i + 1] > ymax) ymax = o[i + 1];
  }
  return [xmin - m, ymin - m, xmax + m, ymax + m];
}

export function placeSeeds(d: Domain, s: MeshSettings, h: (x: number, y: number) => number, hmin: number): SeedSet {
  const rand = prng(s.seed);
  const grid = domainGrid(d), ext = domainExtent(d), box = domainBox(d);
  const tolOn = 1e-7 * ext;
  // interior named points become Voronoi vertices of three fixed seeds on a circle around them
  const inner = d.points.filter(p => grid.contains(p[0], p[1]) && distanceToBoundary(d, p[0], p[1]) > tolOn);
  const ix = Float64Array.from(inner, (p) => p[0]), iy = Float64Array.from(inner, (p) => p[1]);
  const others = new PointGrid(ix, iy);
  const rad = inner.map((p, i) => {
    const r = Math.min(0.8 * h(p[0], p[1]), 0.6 * distanceToBoundary(d, p[0], p[1]));
    // the nearest other named point (0.45·d grows with d, so its minimum is the scan's)
    return Math.min(r, 0.45 * others.nearest(p[0], p[1], (j) => (j === i ? Infinity : Math.hypot(p[0] - inner[j][0], p[1] - inner[j][1]))));
  });
  const guard = new DiscGrid(ix, iy, Float64Array.from(rad, (r) => 1.15 * r));
  const excluded = (x: number, y: number): boolean => guard.some(x, y, (i) => {
    const r = 1.15 * rad[i];
    return (x - inner[i][0]) ** 2 + (y - inner[i][1]) ** 2 < r * r;
  });
  const xs: number[] = [];
  const pins: SeedSet['pins'] = [];
  inner.forEach((p, i) => {
    const a0 = 0.3 + 2 * Math.PI * rand();
    const k = xs.length / 2;
    for (let j = 0; j < 3; j++) xs.push(p[0] + rad[i] * Math.cos(a0 + (2 * Math.PI * j) / 3), p[1] + rad[i] * Math.sin(a0 + (2 * Math.PI * j) / 3));
    pins.push({ p, seeds: [k, k + 1, k + 2] });
  });
  const nFixed = xs.length / 2;
  const [bx0, by0, bx1, by1] = box, bw = bx1 - bx0, bh = by1 - by0;
  const trials = Math.ceil((bw * bh) / (HEX_AREA * hmin * hmin));
  if (trials > 5e7) throw new InputError(`mesh.tipSize: ${hmin} mm asks for more than ${Math.round(5e7 * (d.area / (bw * bh)))} cells; expected a coarser size.`);
  for (let k = 0; k < trials; k++) {
    const x = bx0 + bw * rand(), y = by0 + bh * rand(), u = rand();
    const q = hmin / h(x, y);
    if (u >= q * q) continue;
    if (!grid.contains(x, y) || excluded(x, y)) continue;
    xs.push(x, y);
  }
  if (xs.length / 2 - nFixed < 1 && inner.length === 0) {
    // a domain smaller than one cell still gets one seed
    const o = d.outline;
    xs.push((o[0] + o[2] + o[4]) / 3, (o[1] + o[3] + o[5]) / 3);
  }
  const count = xs.length / 2;
  const cx = (bx0 + bx1) / 2, cy = (by0 + by1) / 2, R = 4 * Math.max(bw, bh);
  xs.push(cx - R, cy - R, cx + R, cy - R, cx + R, cy + R, cx - R, cy + R);
  const fixed = new Uint8Array(count);
  fixed.fill(1, 0, nFixed);
  return { pts: Float64Array.from(xs), count, fixed, pins, box, excluded };
}

/** One density-weighted Lloyd step: each free seed moves to the weighted centroid of its clipped cell. */
export function lloydStep(d: Domain, ss: SeedSet, h: (x: number, y: number) => number): void {
  const excluded = ss.excluded;
  const vor = new VoronoiCells(ss.pts);
  const clipper = new CellClipper(domainGrid(d));
  const grid = domainGrid(d);
  const sink = new LoopSink();
  const xs: number[] = [], ys: number[] = [], ids: number[] = [];
  const [x0, y0, x1, y1] = ss.box;
  const next = new Float64Array(2 * ss.count);
  const fresh = () => clipper.freshId();
  const cx = vor.xs, cy = vor.ys;
  for (let i = 0; i < ss.count; i++) {
    next[2 * i] = ss.pts[2 * i]; next[2 * i + 1] = ss.pts[2 * i + 1];
    if (ss.fixed[i]) continue;
    const m = vor.cell(i);
    if (!m) continue;
    let xmin = Infinity, ymin = Infinity, xmax = -Infinity, ymax = -Infinity;
    for (let k = 0; k < m; k++) {
      if (cx[k] < xmin) xmin = cx[k]; if (cx[k] > xmax) xmax = cx[k];
      if (cy[k] < ymin) ymin = cy[k]; if (cy[k] > ymax) ymax = cy[k];
    }
    if (grid.boxIsEmpty(xmin, ymin, xmax, ymax)) {
      // interior cell: weighted centroid over the fan from the seed
      const sx = ss.pts[2 * i], sy = ss.pts[2 * i + 1];
      let w = 0, wx = 0, wy = 0;
      for (let k = 0; k < m; k++) {
        const k1 = k + 1 < m ? k + 1 : 0;
        const a = 0.5 * ((cx[k] - sx) * (cy[k1] - sy) - (cx[k1] - sx) * (cy[k] - sy));
        const gx = (sx + cx[k] + cx[k1]) / 3, gy = (sy + cy[k] + cy[k1]) / 3;
        const hh = h(gx, gy), rho = a / (hh * hh);
        w += rho; wx += rho * gx; wy += rho * gy;
      }
      const nx = wx / w, ny = wy / w;
      if (w > 0 && !excluded(nx, ny)) { next[2 * i] = nx; next[2 * i + 1] = ny; }
      continue;
    }
    vor.cellArrays(m, xs, ys, ids);
    clipToBox(xs, ys, ids, x0, y0, x1, y1, fresh);
    sink.clear();
    clipper.clip(xs, ys, ids, sink);
    let w = 0, wx = 0, wy = 0;
    const p = sink.xy;
    for (let l = 0; l < sink.loops; l++) {
      const s = sink.start(l), e = sink.ends[l];
      const ax = p[2 * s], ay = p[2 * s + 1];
      for (let k = s + 1; k + 1 < e; k++) {
        const bx = p[2 * k], by = p[2 * k + 1], cx = p[2 * k + 2], cy = p[2 * k + 3];
        const a = 0.5 * ((bx - ax) * (cy - ay) - (cx - ax) * (by - ay));
        const gx = (ax + bx + cx) / 3, gy = (ay + by + cy) / 3;
        const hh = h(gx, gy), rho = a / (hh * hh);
        w += rho; wx += rho * gx; wy += rho * gy;
      }
    }
    if (!(w > 0)) continue;
    const nx = wx / w, ny = wy / w;
    // a centroid outside the domain (or too near a pinned point) keeps the old seed
    if (grid.contains(nx, ny) && !excluded(nx, ny)) { next[2 * i] = nx; next[2 * i + 1] = ny; }
  }
  ss.pts.set(next, 0);
}
