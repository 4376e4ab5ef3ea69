// Points and discs in uniform grids: the nearest named point, or the guard disc holding a
// point, found by looking only nearby, so meshing stays linear in the number of named points.
// Answers are the ones a scan over all points gives (the caller's own distance formula decides).
import { BoxGrid } from '../case/boxgrid.js';

function cellSize(xs: ArrayLike<number>, ys: ArrayLike<number>): [number, number, number, number, number] {
  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
  for (let i = 0; i < xs.length; i++) {
    x0 = Math.min(x0, xs[i]); x1 = Math.max(x1, xs[i]); y0 = Math.min(y0, ys[i]); y1 = Math.max(y1, ys[i]);
  }
  if (xs.length === 0) { x0 = y0 = 0; x1 = y1 = 1; }
  const ext = Math.max(x1 - x0, y1 - y0, 1e-300);
  return [x0, y0, x1, y1, ext / Math.max(1, Math.ceil(Math.sqrt(xs.length)))];
}

export class PointGrid {
  private readonly x0: number; private readonly y0: number; private readonly cs: number;
  private readonly nx: number; private readonly ny: number;
  private readonly start: Int32Array; private readonly items: Int32Array;

  constructor(readonly xs: ArrayLike<number>, readonly ys: ArrayLike<number>) {
    const [x0, y0, x1, y1, cs] = cellSize(xs, ys);
    this.x0 = x0; this.y0 = y0; this.cs = cs;
    this.nx = Math.max(1, Math.floor((x1 - x0) / cs) + 1);
    this.ny = Math.max(1, Math.floor((y1 - y0) / cs) + 1);
    const n = xs.length, counts = new Int32Array(this.nx * this.ny + 1), at = new Int32Array(n);
    for (let i = 0; i < n; i++) { at[i] = this.iy(ys[i]) * this.nx + this.ix(xs[i]); counts[at[i] + 1]++; }
    for (let c = 0; c < this.nx * this.ny; c++) counts[c + 1] += counts[c];
    this.start = counts;
    this.items = new Int32Array(n);
    const pos = counts.slice(0, this.nx * this.ny);
    for (let i = 0; i < n; i++) this.items[pos[at[i]]++] = i;
  }

  private ix(x: number): number { return Math.min(this.nx - 1, Math.max(0, Math.floor((x - this.x0) / this.cs))); }
  private iy(y: number): number { return Math.min(this.ny - 1, Math.max(0, Math.floor((y - this.y0) / this.cs))); }

  /**
   * Smallest dist(i) over all points, where dist(i) is the caller's Euclidean distance from
   * (px, py) to point i (or Infinity to leave a point out). Rings of cells are searched outward
   * until no point outside them can come nearer.
   */
  nearest(px: number, py: number, dist: (i: number) => number): number {
    if (this.items.length === 0) return Infinity;
    const ci = this.ix(px), cj = this.iy(py), cs = this.cs;
    const inner = Math.max(0, Math.min(px - (this.x0 + ci * cs), this.x0 + (ci + 1) * cs - px, py - (this.y0 + cj * cs), this.y0 + (cj + 1) * cs - py));
    const maxR = Math.max(ci, this.nx - 1 - ci, cj, this.ny - 1 - cj);
    let best = Infinity;
    for (let r = 0; r <= maxR; r++) {
      for (let j = cj - r; j <= cj + r; j++) {
        if (j < 0 || j >= this.ny) continue;
        const edge = j === cj - r || j === cj + r;
        for (let i = ci - r; i <= ci + r; i += edge || r === 0 ? 1 : 2 * r) {
          if (i < 0 || i >= this.nx) continue;
          const c = j * this.nx + i;
          for (let q = this.start[c]; q < this.start[c + 1]; q++) { const d = dist(this.items[q]); if (d < best) best = d; }
        }
      }
      // points outside the searched square lie at least this far away (less a rounding margin)
      if (best < (inner + r * cs) * (1 - 1e-9)) break;
    }
    return best;
  }
}

/** Discs (centre, radius) in a grid of their boxes: which discs may hold a point is read from nearby cells. */
export class DiscGrid {
  private readonly grid: BoxGrid;

  constructor(xs: ArrayLike<number>, ys: ArrayLike<number>, r: ArrayLike<number>) {
    const boxes = new Float64Array(4 * xs.length);
    for (let i = 0; i < xs.length; i++) boxes.set([xs[i] - r[i], ys[i] - r[i], xs[i] + r[i], ys[i] + r[i]], 4 * i);
    this.grid = new BoxGrid(boxes);
  }

  /** Whether test(i) holds for some disc whose box holds (x, y). */
  some(x: number, y: number, test: (i: number) => boolean): boolean {
    return this.grid.some(x, y, x, y, (i) => test(i));
  }
}
