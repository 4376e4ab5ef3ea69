// A uniform grid over boxes (edges, holes): the checks of a case ask only for the boxes near a
// point or a segment, so they run in time linear in the size of the case, not in its square.
import type { Vec2 } from './model.js';
import { edgesClash, inPolygon, properCross, segDist, segSegDist, selfTouch } from './shapes.js';

export class BoxGrid {
  private readonly x0: number; private readonly y0: number; private readonly cs: number;
  private readonly nx: number; private readonly ny: number;
  private readonly start: Int32Array; private readonly items: Int32Array;
  private readonly stamp: Int32Array; private tick = 0;

  /** boxes: x0, y0, x1, y1 per item. */
  constructor(readonly boxes: Float64Array) {
    const n = boxes.length >> 2;
    let xmin = Infinity, ymin = Infinity, xmax = -Infinity, ymax = -Infinity, sum = 0;
    for (let i = 0; i < n; i++) {
      xmin = Math.min(xmin, boxes[4 * i]); ymin = Math.min(ymin, boxes[4 * i + 1]);
      xmax = Math.max(xmax, boxes[4 * i + 2]); ymax = Math.max(ymax, boxes[4 * i + 3]);
      sum += Math.max(boxes[4 * i + 2] - boxes[4 * i], boxes[4 * i + 3] - boxes[4 * i + 1]);
    }
    if (n === 0) { xmin = ymin = 0; xmax = ymax = 1; }
    const ext = Math.max(xmax - xmin, ymax - ymin, 1e-300);
    // cells about the size of a typical box, at most about 4 per item
    this.cs = Math.max(n > 0 ? sum / n : ext, ext / Math.max(1, Math.ceil(2 * Math.sqrt(n))), ext / 4096);
    this.x0 = xmin; this.y0 = ymin;
    this.nx = Math.max(1, Math.floor((xmax - xmin) / this.cs) + 1);
    this.ny = Math.max(1, Math.floor((ymax - ymin) / this.cs) + 1);
    const counts = new Int32Array(this.nx * this.ny + 1);
    const each = (f: (c: number, i: number) => void) => {
      for (let i = 0; i < n; i++) {
        const i0 = this.ix(boxes[4 * i]), i1 = this.ix(boxes[4 * i + 2]), j0 = this.iy(boxes[4 * i + 1]), j1 = this.iy(boxes[4 * i + 3]);
        for (let j = j0; j <= j1; j++) for (let k = i0; k <= i1; k++) f(j * this.nx + k, i);
      }
    };
    each((c) => { counts[c + 1]++; });
    for (let c = 0; c < this.nx * this.ny; c++) counts[c + 1] += counts[c];
    this.start = counts;
    this.items = new Int32Array(counts[this.nx * this.ny]);
    const pos = counts.slice(0, this.nx * this.ny);
    each((c, i) => { this.items[pos[c]++] = i; });
    this.stamp = new Int32Array(n);
  }

  private ix(x: number): number { return Math.min(this.nx - 1, Math.max(0, Math.floor((x - this.x0) / this.cs))); }
  private iy(y: number): number { return Math.min(this.ny - 1, Math.max(0, Math.floor((y - this.y0) / this.cs))); }

  /** Calls f once for each item whose box meets [x0, x1] × [y0, y1]; stops when f returns true (and returns true). */
  some(x0: number, y0: number, x1: number, y1: number, f: (i: number) => boolean | void): boolean {
    if (this.stamp.length === 0) return false;
    if (++this.tick === 0x7fffffff) { this.stamp.fill(0); this.tick = 1; }
    const t = this.tick, b = this.boxes;
    const i0 = this.ix(x0), i1 = this.ix(x1), j0 = this.iy(y0), j1 = this.iy(y1);
    for (let j = j0; j <= j1; j++) {
      for (let k = i0; k <= i1; k++) {
        const c = j * this.nx + k;
        for (let q = this.start[c]; q < this.start[c + 1]; q++) {
          const i = this.items[q];
          if (this.stamp[i] === t) continue;
          this.stamp[i] = t;
          if (b[4 * i] > x1 || b[4 * i + 2] < x0 || b[4 * i + 1] > y1 || b[4 * i + 3] < y0) continue;
          if (f(i) === true) return true;
        }
      }
    }
    return false;
  }
}

/** Boxes of the edges of a closed polygon (edge i from point i to i + 1), padded by pad. */
export function edgeBoxes(poly: readonly Vec2[], pad: number): Float64Array {
  const n = poly.length, b = new Float64Array(4 * n);
  for (let i = 0; i < n; i++) {
    const a = poly[i]!, c = poly[(i + 1) % n]!;
    b[4 * i] = Math.min(a[0], c[0]) - pad; b[4 * i + 1] = Math.min(a[1], c[1]) - pad;
    b[4 * i + 2] = Math.max(a[0], c[0]) + pad; b[4 * i + 3] = Math.max(a[1], c[1]) + pad;
  }
  return b;
}

/** A closed polygon with its edges in a grid: the same answers as the plain scans in shapes.ts, near-constant time each. */
export class RingIndex {
  readonly grid: BoxGrid;
  constructor(readonly poly: readonly Vec2[]) {
    this.grid = new BoxGrid(edgeBoxes(poly, 0));
  }

  private edge(i: number): [Vec2, Vec2] { return [this.poly[i]!, this.poly[(i + 1) % this.poly.length]!]; }

  /** inPolygon(p, poly): only the edges that can meet the ray from p toward +x count. */
  contains(p: Vec2): boolean {
    let inside = false;
    this.grid.some(p[0], p[1], Infinity, p[1], (i) => {
      const [b, a] = this.edge(i);
      if ((a[1] > p[1]) !== (b[1] > p[1]) && p[0] < ((b[0] - a[0]) * (p[1] - a[1])) / (b[1] - a[1]) + a[0]) inside = !inside;
    });
    return inside;
  }

  /** edgeDist(p, poly) <= d. */
  near(p: Vec2, d: number): boolean {
    return this.grid.some(p[0] - d, p[1] - d, p[0] + d, p[1] + d, (i) => { const [a, b] = this.edge(i); return segDist(p, a, b) <= d; });
  }

  /** Some edge within d of segment ab. */
  nearSegment(a: Vec2, b: Vec2, d: number): boolean {
    return this.grid.some(Math.min(a[0], b[0]) - d, Math.min(a[1], b[1]) - d, Math.max(a[0], b[0]) + d, Math.max(a[1], b[1]) + d,
      (i) => { const [c, e] = this.edge(i); return segSegDist(a, b, c, e) <= d; });
  }

  /** Some edge crossed properly by segment ab. */
  crossedBy(a: Vec2, b: Vec2): boolean {
    return this.grid.some(Math.min(a[0], b[0]), Math.min(a[1], b[1]), Math.max(a[0], b[0]), Math.max(a[1], b[1]),
      (i) => { const [c, e] = this.edge(i); return properCross(a, b, c, e); });
  }
}

/** Whether two closed polygons touch or overlap within tol (one inside the other, or edges within tol). */
export function ringsTouch(a: readonly Vec2[], b: readonly Vec2[], tol: number, ib?: RingIndex): boolean {
  if (inPolygon(a[0]!, b) || inPolygon(b[0]!, a)) return true;
  const index = ib ?? new RingIndex(b);
  for (let i = 0; i < a.length; i++) if (index.nearSegment(a[i]!, a[(i + 1) % a.length]!, tol)) return true;
  return false;
}

/** selfTouch(poly, tol) of shapes.ts (the same first pair), with each edge compared only with the edges near it. */
export function selfTouchFast(poly: readonly Vec2[], tol: number): [number, number, Vec2] | undefined {
  const n = poly.length;
  if (n < 64) return selfTouch(poly, tol);
  const grid = new BoxGrid(edgeBoxes(poly, tol));
  for (let i = 0; i < n; i++) {
    const a = poly[i]!, b = poly[(i + 1) % n]!;
    let first = -1;
    grid.some(Math.min(a[0], b[0]), Math.min(a[1], b[1]), Math.max(a[0], b[0]), Math.max(a[1], b[1]), (j) => {
      if (j > i && (first < 0 || j < first) && edgesClash(poly, i, j, tol)) first = j;
    });
    if (first >= 0) return selfTouch(poly, tol, i, first);
  }
  return undefined;
}
