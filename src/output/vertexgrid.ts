// Vertices in a bucket grid of about one vertex a cell, for the nearest-vertex look-ups that move
// crack points, cohesive segments and symbols with the deformation. A look-up searches rings of
// cells outwards until the nearest vertex found is closer than any cell not yet searched, then
// gathers every vertex within a tolerance of that distance (the two faces of a crack share a place).

export class VertexGrid {
  private readonly x0: number; private readonly y0: number; private readonly h: number;
  private readonly gx: number; private readonly gy: number;
  /** Vertices of cell c: items[start[c] .. start[c + 1]), in increasing index. */
  private readonly start: Int32Array; private readonly items: Int32Array;
  /** The vertices of the latest look-up. */
  found = new Int32Array(8);

  constructor(readonly xy: ArrayLike<number>) {
    const nv = xy.length >> 1;
    let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
    for (let i = 0; i < nv; i++) {
      const x = xy[2 * i], y = xy[2 * i + 1];
      if (x < x0) x0 = x; if (x > x1) x1 = x; if (y < y0) y0 = y; if (y > y1) y1 = y;
    }
    if (!(x1 >= x0)) { x0 = 0; y0 = 0; x1 = 1; y1 = 1; }
    this.x0 = x0; this.y0 = y0;
    this.h = Math.max(Math.sqrt(((x1 - x0) * (y1 - y0) || 1) / Math.max(1, nv)), 1e-9);
    this.gx = Math.max(1, Math.floor((x1 - x0) / this.h) + 1); this.gy = Math.max(1, Math.floor((y1 - y0) / this.h) + 1);
    const n = this.gx * this.gy, start = new Int32Array(n + 1), items = new Int32Array(nv), at = new Int32Array(nv);
    for (let i = 0; i < nv; i++) { at[i] = this.cell(xy[2 * i], xy[2 * i + 1]); start[at[i] + 1]++; }
    for (let c = 0; c < n; c++) start[c + 1] += start[c];
    const fill = start.slice(0, n);
    for (let i = 0; i < nv; i++) items[fill[at[i]]++] = i;
    this.start = start; this.items = items;
  }

  private col(x: number): number { return Math.min(this.gx - 1, Math.max(0, Math.floor((x - this.x0) / this.h))); }
  private row(y: number): number { return Math.min(this.gy - 1, Math.max(0, Math.floor((y - this.y0) / this.h))); }
  private cell(x: number, y: number): number { return this.col(x) + this.gx * this.row(y); }

  /** Squared distance from (x, y) to the nearest vertex of cells [i0, i1] × row j. */
  private rowMin(x: number, y: number, j: number, i0: number, i1: number, best: number): number {
    const { xy, start, items, gx } = this;
    for (let q = start[i0 + gx * j], e = start[i1 + gx * j + 1]; q < e; q++) {
      const v = items[q], dx = xy[2 * v] - x, dy = xy[2 * v + 1] - y, d = dx * dx + dy * dy;
      if (d < best) best = d;
    }
    return best;
  }

  /**
   * The vertices nearest to (x, y): all within tol of the nearest distance, in increasing index,
   * into found; returns their count (0 for no vertices).
   */
  nearest(x: number, y: number, tol: number): number {
    const { gx, gy, h, xy, start, items } = this;
    if (items.length === 0) return 0;
    const cx = this.col(x), cy = this.row(y);
    let best = Infinity;
    for (let r = 0; ; r++) {
      const j0 = cy - r, j1 = cy + r, i0 = Math.max(0, cx - r), i1 = Math.min(gx - 1, cx + r);
      if (j0 < 0 && j1 >= gy && cx - r < 0 && cx + r >= gx) break; // the whole grid searched
      // the ring of cells at Chebyshev distance r: its top and bottom rows whole, its sides
      if (j0 >= 0) best = this.rowMin(x, y, j0, i0, i1, best);
      if (r > 0 && j1 < gy) best = this.rowMin(x, y, j1, i0, i1, best);
      for (let j = Math.max(0, j0 + 1); j <= Math.min(gy - 1, j1 - 1); j++) {
        if (cx - r >= 0) best = this.rowMin(x, y, j, cx - r, cx - r, best);
        if (r > 0 && cx + r < gx) best = this.rowMin(x, y, j, cx + r, cx + r, best);
      }
      // every cell beyond this ring lies at least r·h away (farther still from a point outside the grid)
      if (best <= (r * h) ** 2) break;
    }
    const reach = Math.sqrt(best) + tol, lim = reach * reach;
    const c0 = this.col(x - reach), c1 = this.col(x + reach), r0 = this.row(y - reach), r1 = this.row(y + reach);
    let n = 0;
    for (let j = r0; j <= r1; j++) {
      for (let q = start[c0 + gx * j], e = start[c1 + gx * j + 1]; q < e; q++) {
        const v = items[q], dx = xy[2 * v] - x, dy = xy[2 * v + 1] - y;
        if (dx * dx + dy * dy > lim) continue;
        if (n === this.found.length) { const f = new Int32Array(2 * n); f.set(this.found); this.found = f; }
        this.found[n++] = v;
      }
    }
    this.found.subarray(0, n).sort();
    return n;
  }
}
