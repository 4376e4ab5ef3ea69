// Voronoi cells of seed points from the Delaunay triangulation, as convex CCW rings with vertex ids.

import { Delaunay } from 'd3-delaunay';

export class VoronoiCells {
  readonly delaunay: Delaunay<number>;
  /** Circumcentre of triangle t at 2t, 2t+1: the Voronoi vertices (id t). */
  readonly cc: Float64Array;

  /** pts holds the seeds followed by far frame points, so every seed has a bounded cell. */
  constructor(pts: Float64Array) {
    this.delaunay = new Delaunay(pts);
    const { triangles } = this.delaunay;
    const p = this.delaunay.points;
    const nt = triangles.length / 3;
    const cc = this.cc = new Float64Array(2 * nt);
    for (let t = 0; t < nt; t++) {
      const a = triangles[3 * t], b = triangles[3 * t + 1], c = triangles[3 * t + 2];
      const ax = p[2 * a], ay = p[2 * a + 1];
      const dx = p[2 * b] - ax, dy = p[2 * b + 1] - ay, ex = p[2 * c] - ax, ey = p[2 * c + 1] - ay;
      const bl = dx * dx + dy * dy, cl = ex * ex + ey * ey, dd = 0.5 / (dx * ey - dy * ex);
      cc[2 * t] = ax + (ey * bl - dy * cl) * dd;
      cc[2 * t + 1] = ay + (dx * cl - ex * bl) * dd;
    }
  }

  /** Cell ring buffers (CCW), filled by cell(). */
  xs = new Float64Array(256); ys = new Float64Array(256); ids = new Float64Array(256);

  /** Cell of seed i into this.xs/ys/ids; returns its vertex count (0 when the seed has no cell). */
  cell(i: number): number {
    const { inedges, halfedges, triangles } = this.delaunay;
    const e0 = inedges[i];
    if (e0 === -1) return 0;
    const cc = this.cc, xs = this.xs, ys = this.ys, ids = this.ids;
    let e = e0, m = 0;
    do {
      const t = (e / 3) | 0;
      if (m === xs.length) return 0;
      xs[m] = cc[2 * t]; ys[m] = cc[2 * t + 1]; ids[m] = t; m++;
      e = e % 3 === 2 ? e - 2 : e + 1;
      if (triangles[e] !== i) return 0;
      e = halfedges[e];
    } while (e !== e0 && e !== -1);
    if (e === -1 || m < 3) return 0;
    // the walk turns one way for every cell; make the ring counter-clockwise
    let a = 0;
    for (let k = 0; k < m; k++) {
      const k1 = k + 1 < m ? k + 1 : 0;
      a += (xs[k] - xs[0]) * (ys[k1] - ys[0]) - (xs[k1] - xs[0]) * (ys[k] - ys[0]);
    }
    if (a < 0) { xs.subarray(0, m).reverse(); ys.subarray(0, m).reverse(); ids.subarray(0, m).reverse(); }
    return m;
  }

  /** The current cell as plain arrays (for the clip of boundary cells). */
  cellArrays(m: number, xs: number[], ys: number[], ids: number[]): void {
    xs.length = m; ys.length = m; ids.length = m;
    for (let k = 0; k < m; k++) { xs[k] = this.xs[k]; ys[k] = this.ys[k]; ids[k] = this.ids[k]; }
  }
}

/** Clip a convex ring to the box in place (Sutherland–Hodgman); new points take ids from fresh(). */
export function clipToBox(xs: number[], ys: number[], ids: number[], x0: number, y0: number, x1: number, y1: number, fresh: () => number): void {
  let xmin = Infinity, ymin = Infinity, xmax = -Infinity, ymax = -Infinity;
  for (let i = 0; i < xs.length; i++) {
    if (xs[i] < xmin) xmin = xs[i]; if (xs[i] > xmax) xmax = xs[i];
    if (ys[i] < ymin) ymin = ys[i]; if (ys[i] > ymax) ymax = ys[i];
  }
  if (xmin >= x0 && xmax <= x1 && ymin >= y0 && ymax <= y1) return;
  for (let side = 0; side < 4; side++) {
    const ax = side < 2, c = side === 0 ? x0 : side === 1 ? x1 : side === 2 ? y0 : y1, sg = side % 2 === 0 ? 1 : -1;
    const n = xs.length;
    if (n === 0) return;
    const ox: number[] = [], oy: number[] = [], oi: number[] = [];
    for (let k = 0; k < n; k++) {
      const k1 = k + 1 < n ? k + 1 : 0;
      const vk = sg * ((ax ? xs[k] : ys[k]) - c), v1 = sg * ((ax ? xs[k1] : ys[k1]) - c);
      if (vk >= 0) { ox.push(xs[k]); oy.push(ys[k]); oi.push(ids[k]); }
      if ((vk >= 0) !== (v1 >= 0)) {
        const t = vk / (vk - v1);
        ox.push(xs[k] + t * (xs[k1] - xs[k])); oy.push(ys[k] + t * (ys[k1] - ys[k])); oi.push(fresh());
      }
    }
    xs.length = 0; ys.length = 0; ids.length = 0;
    xs.push(...ox); ys.push(...oy); ids.push(...oi);
  }
}
