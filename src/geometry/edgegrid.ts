// Uniform grid over the edges of a set of rings: fast point location, distance and box queries.

import { segDist2 } from './rings.js';

export class EdgeGrid {
  /** Edge e runs from vertex e to vertex next[e] (global numbering over all rings). */
  readonly vx: Float64Array;
  readonly next: Int32Array;
  /** Ring of each vertex/edge. */
  readonly ringOf: Int32Array;
  readonly ringStart: Int32Array;
  readonly x0: number; readonly y0: number; readonly cs: number;
  readonly nx: number; readonly ny: number;
  readonly cellStart: Int32Array;
  readonly items: Int32Array;
  private stamp: Int32Array;
  private tick = 0;

  constructor(rings: Float64Array[], cellSize?: number) {
    let n = 0;
    for (const r of rings) n += r.length >> 1;
    const vx = this.vx = new Float64Array(2 * n);
    const next = this.next = new Int32Array(n);
    const ringOf = this.ringOf = new Int32Array(n);
    const rs = this.ringStart = new Int32Array(rings.length + 1);
    let k = 0, xmin = Infinity, ymin = Infinity, xmax = -Infinity, ymax = -Infinity;
    rings.forEach((r, ri) => {
      const m = r.length >> 1;
      rs[ri] = k;
      for (let i = 0; i < m; i++) {
        const x = r[2 * i], y = r[2 * i + 1];
        vx[2 * (k + i)] = x; vx[2 * (k + i) + 1] = y;
        next[k + i] = k + (i + 1 < m ? i + 1 : 0);
        ringOf[k + i] = ri;
        if (x < xmin) xmin = x; if (x > xmax) xmax = x;
        if (y < ymin) ymin = y; if (y > ymax) ymax = y;
      }
      k += m;
    });
    rs[rings.length] = k;
    const ext = Math.max(xmax - xmin, ymax - ymin, 1e-300);
    const cs = this.cs = cellSize && cellSize > ext / 1024 ? cellSize : ext / 256;
    this.x0 = xmin - 1e-6 * ext; this.y0 = ymin - 1e-6 * ext;
    const nx = this.nx = Math.max(1, Math.ceil((xmax - this.x0) / cs + 1e-9));
    const ny = this.ny = Math.max(1, Math.ceil((ymax - this.y0) / cs + 1e-9));
    // pass 1 counts, pass 2 fills: each edge goes into every cell its (padded) segment touches
    const counts = new Int32Array(nx * ny + 1);
    const visit = (fill: Int32Array | null, pos: Int32Array | null) => {
      for (let e = 0; e < n; e++) {
        const ax = vx[2 * e], ay = vx[2 * e + 1], bx = vx[2 * next[e]], by = vx[2 * next[e] + 1];
        const i0 = this.cx(Math.min(ax, bx)), i1 = this.cx(Math.max(ax, bx));
        const j0 = this.cy(Math.min(ay, by)), j1 = this.cy(Math.max(ay, by));
        const dx = bx - ax, dy = by - ay, pad = 1e-9 * ext + 1e-12 * cs;
        for (let j = j0; j <= j1; j++) for (let i = i0; i <= i1; i++) {
          if (i1 > i0 && j1 > j0) {
            // skip cells whose corners all lie strictly on one side of the edge line
            const cx0 = this.x0 + i * cs - pad, cy0 = this.y0 + j * cs - pad, c1 = cs + 2 * pad;
            const s0 = dx * (cy0 - ay) - dy * (cx0 - ax), s1 = dx * (cy0 - ay) - dy * (cx0 + c1 - ax);
            const s2 = dx * (cy0 + c1 - ay) - dy * (cx0 - ax), s3 = dx * (cy0 + c1 - ay) - dy * (cx0 + c1 - ax);
            if ((s0 > 0 && s1 > 0 && s2 > 0 && s3 > 0) || (s0 < 0 && s1 < 0 && s2 < 0 && s3 < 0)) continue;
          }
          const c = j * nx + i;
          if (fill && pos) fill[pos[c]++] = e; else counts[c + 1]++;
        }
      }
    };
    visit(null, null);
    for (let c = 0; c < nx * ny; c++) counts[c + 1] += counts[c];
    this.cellStart = counts;
    this.items = new Int32Array(counts[nx * ny]);
    visit(this.items, counts.slice(0, nx * ny));
    this.stamp = new Int32Array(n);
    this.state = new Int8Array(nx * ny);
    this.fillStates();
  }

  private rings: Int32Array | null = null;

  /** For each cell, how many rings of cells around it hold no edge (Chebyshev distance to the nearest cell with edges). */
  private emptyRings(): Int32Array {
    if (this.rings) return this.rings;
    const { nx, ny } = this, n = nx * ny, d = new Int32Array(n).fill(-1), queue = new Int32Array(n);
    let head = 0, tail = 0;
    for (let c = 0; c < n; c++) if (this.cellStart[c + 1] > this.cellStart[c]) { d[c] = 0; queue[tail++] = c; }
    if (tail === 0) d.fill(0);
    while (head < tail) {
      const c = queue[head++], i = c % nx, j = (c - i) / nx;
      for (let dj = -1; dj <= 1; dj++) for (let di = -1; di <= 1; di++) {
        const a = i + di, b = j + dj;
        if (a < 0 || a >= nx || b < 0 || b >= ny) continue;
        const q = b * nx + a;
        if (d[q] < 0) { d[q] = d[c] + 1; queue[tail++] = q; }
      }
    }
    return (this.rings = d);
  }

  /** Inside (1) or outside (0) for each grid cell with no edges; -1 where edges pass. */
  private state: Int8Array;

  private fillStates(): void {
    const { nx, ny, cs, x0, y0, vx, next } = this, st = this.state, cst = this.cellStart, it = this.items;
    const xc: number[] = [];
    for (let j = 0; j < ny; j++) {
      const py = y0 + (j + 0.5) * cs;
      xc.length = 0;
      for (let i = 0; i < nx; i++) {
        const c = j * nx + i;
        for (let k = cst[c]; k < cst[c + 1]; k++) {
          const e = it[k], f = next[e], ay = vx[2 * e + 1], by = vx[2 * f + 1];
          if ((ay > py) === (by > py)) continue;
          const x = vx[2 * e] + (py - ay) * (vx[2 * f] - vx[2 * e]) / (by - ay);
          if (this.cx(x) === i) xc.push(x);
        }
      }
      xc.sort((a, b) => a - b);
      let q = 0;
      for (let i = 0; i < nx; i++) {
        const c = j * nx + i, mid = x0 + (i + 0.5) * cs;
        while (q < xc.length && xc[q] < mid) q++;
        st[c] = cst[c + 1] > cst[c] ? -1 : (q & 1) as 0 | 1;
      }
    }
  }

  cx(x: number): number { const i = Math.floor((x - this.x0) / this.cs); return i < 0 ? 0 : i >= this.nx ? this.nx - 1 : i; }
  cy(y: number): number { const j = Math.floor((y - this.y0) / this.cs); return j < 0 ? 0 : j >= this.ny ? this.ny - 1 : j; }

  get edgeCount(): number { return this.next.length; }

  /** True when no edge is registered in the cells covering the box. */
  boxIsEmpty(xmin: number, ymin: number, xmax: number, ymax: number): boolean {
    const i0 = this.cx(xmin), i1 = this.cx(xmax), j0 = this.cy(ymin), j1 = this.cy(ymax);
    const cs = this.cellStart;
    for (let j = j0; j <= j1; j++) {
      const row = j * this.nx;
      if (cs[row + i1 + 1] > cs[row + i0]) return false;
    }
    return true;
  }

  /** Distinct edges registered in the cells covering the box, appended to out (returns count). */
  edgesInBox(xmin: number, ymin: number, xmax: number, ymax: number, out: number[]): number {
    out.length = 0;
    if (xmax < this.x0 || ymax < this.y0 || xmin > this.x0 + this.nx * this.cs || ymin > this.y0 + this.ny * this.cs) return 0;
    const i0 = this.cx(xmin), i1 = this.cx(xmax), j0 = this.cy(ymin), j1 = this.cy(ymax);
    const t = this.nextTick(), st = this.stamp, cs = this.cellStart, it = this.items;
    for (let j = j0; j <= j1; j++) for (let i = i0; i <= i1; i++) {
      const c = j * this.nx + i;
      for (let k = cs[c]; k < cs[c + 1]; k++) {
        const e = it[k];
        if (st[e] !== t) { st[e] = t; out.push(e); }
      }
    }
    return out.length;
  }

  private nextTick(): number {
    if (++this.tick > 0x3fffffff) { this.stamp.fill(0); this.tick = 1; }
    return this.tick;
  }

  /** Even-odd point location: inside the outline and outside every hole ring. */
  contains(px: number, py: number): boolean {
    const j = Math.floor((py - this.y0) / this.cs);
    if (j < 0 || j >= this.ny) return false;
    const vx = this.vx, nxt = this.next, cs = this.cellStart, it = this.items;
    let inside = false;
    for (let i = this.cx(px); i < this.nx; i++) {
      const c = j * this.nx + i;
      // an empty cell further along the ray already knows its side
      if (this.state[c] >= 0) return inside !== (this.state[c] === 1);
      for (let k = cs[c]; k < cs[c + 1]; k++) {
        const e = it[k], f = nxt[e];
        const ay = vx[2 * e + 1], by = vx[2 * f + 1];
        if ((ay > py) === (by > py)) continue;
        const ax = vx[2 * e], bx = vx[2 * f];
        const xc = ax + (py - ay) * (bx - ax) / (by - ay);
        if (xc <= px) continue;
        // count each crossing only in the cell that holds it
        if (this.cx(xc) !== i) continue;
        inside = !inside;
      }
    }
    return inside;
  }

  /** Nearest edge to a point: squared distance, edge id and parameter in out = [d2, e, t]. */
  nearest(px: number, py: number, out: number[]): void {
    const vx = this.vx, nxt = this.next, cs = this.cellStart, it = this.items;
    const ci = Math.floor((px - this.x0) / this.cs), cj = Math.floor((py - this.y0) / this.cs);
    let best = Infinity, be = -1, bt = 0;
    const tt = [0];
    const maxR = Math.max(this.nx, this.ny) + Math.max(Math.abs(ci), Math.abs(cj)) + 1;
    // rings nearer than the nearest cell with edges are empty: start at that one
    const r0 = ci >= 0 && ci < this.nx && cj >= 0 && cj < this.ny ? this.emptyRings()[cj * this.nx + ci] : 0;
    for (let r = r0; r <= maxR; r++) {
      // cells on ring r are at least (r-1)*cs away
      const lim = (r - 1) * this.cs;
      if (lim > 0 && lim * lim > best) break;
      for (let j = cj - r; j <= cj + r; j++) {
        if (j < 0 || j >= this.ny) continue;
        const edgeRow = j === cj - r || j === cj + r;
        for (let i = ci - r; i <= ci + r; i += edgeRow ? 1 : 2 * r) {
          if (i >= 0 && i < this.nx) {
            const c = j * this.nx + i;
            for (let k = cs[c]; k < cs[c + 1]; k++) {
              const e = it[k], f = nxt[e];
              const d2 = segDist2(px, py, vx[2 * e], vx[2 * e + 1], vx[2 * f], vx[2 * f + 1], tt);
              if (d2 < best) { best = d2; be = e; bt = tt[0]; }
            }
          }
          if (r === 0) break;
        }
      }
    }
    out[0] = best; out[1] = be; out[2] = bt;
  }
}
