// A convex Voronoi cell intersected with the domain (outline minus holes), as simple CCW loops.
// Edge tests are evaluated with each cell edge oriented by its end ids, so two cells sharing an
// edge compute bit-identical crossing points.

import type { EdgeGrid } from '../geometry/edgegrid.js';

/** Loops written by a clip: coordinates, loop ends, and whether each point is a domain ring vertex. */
export class LoopSink {
  xy: number[] = [];
  ring: number[] = [];
  ends: number[] = [];
  clear(): void { this.xy.length = 0; this.ring.length = 0; this.ends.length = 0; }
  get loops(): number { return this.ends.length; }
  start(l: number): number { return l === 0 ? 0 : this.ends[l - 1]; }
}

interface Ev { e: number; t: number; k: number; x: number; y: number; key: number }
interface Chain { entry: Ev; exit: Ev; pts: number[]; ring: number[]; used: boolean }

export class CellClipper {
  private cand: number[] = [];
  private vstamp: Int32Array;
  private vin: Int8Array;
  private tick = 0;
  private fresh = -1;

  constructor(readonly g: EdgeGrid) {
    this.vstamp = new Int32Array(g.edgeCount);
    this.vin = new Int8Array(g.edgeCount);
  }

  /** Clip the convex CCW cell (xs, ys, ids; m vertices) to the domain; loops go to sink. */
  clip(xs: number[], ys: number[], ids: number[], sink: LoopSink, depth = 0): void {
    const m = xs.length;
    if (m < 3) return;
    const g = this.g;
    let xmin = Infinity, ymin = Infinity, xmax = -Infinity, ymax = -Infinity;
    for (let i = 0; i < m; i++) {
      if (xs[i] < xmin) xmin = xs[i]; if (xs[i] > xmax) xmax = xs[i];
      if (ys[i] < ymin) ymin = ys[i]; if (ys[i] > ymax) ymax = ys[i];
    }
    const cand = this.cand;
    if (g.edgesInBox(xmin, ymin, xmax, ymax, cand) === 0) {
      if (this.cellInside(xs, ys)) this.emitCell(xs, ys, sink);
      return;
    }
    if (++this.tick > 0x3fffffff) { this.vstamp.fill(0); this.tick = 1; }
    const vx = g.vx, nxt = g.next;
    // signed distance-like test of point (x,y) against cell edge k, canonical orientation
    const f = (k: number, x: number, y: number): number => {
      const k1 = k + 1 < m ? k + 1 : 0;
      const lo = ids[k] < ids[k1] ? k : k1, hi = lo === k ? k1 : k;
      const v = (xs[hi] - xs[lo]) * (y - ys[lo]) - (ys[hi] - ys[lo]) * (x - xs[lo]);
      return lo === k ? v : -v;
    };
    const inside = (p: number): boolean => {
      if (this.vstamp[p] === this.tick) return this.vin[p] === 1;
      const x = vx[2 * p], y = vx[2 * p + 1];
      let r = true;
      for (let k = 0; k < m; k++) if (f(k, x, y) < 0) { r = false; break; }
      this.vstamp[p] = this.tick; this.vin[p] = r ? 1 : 0;
      return r;
    };
    const keyOf = (k: number, x: number, y: number): number => {
      const k1 = k + 1 < m ? k + 1 : 0;
      const dx = xs[k1] - xs[k], dy = ys[k1] - ys[k], l2 = dx * dx + dy * dy;
      let s = l2 > 0 ? ((x - xs[k]) * dx + (y - ys[k]) * dy) / l2 : 0;
      s = s < 0 ? 0 : s > 1 ? 1 : s;
      return k + s;
    };
    const entries: Ev[] = [];
    const exits = new Map<number, Ev>();
    const ringsWithEvents = new Set<number>();
    const ringsInside = new Set<number>();
    for (const e of cand) {
      const q = nxt[e];
      const inP = inside(e), inQ = inside(q);
      if (inP && inQ) { ringsInside.add(g.ringOf[e]); continue; }
      const ax = vx[2 * e], ay = vx[2 * e + 1], bx = vx[2 * q], by = vx[2 * q + 1];
      let tE = 0, kE = -1, tX = 1, kX = -1, rej = false;
      for (let k = 0; k < m; k++) {
        const fp = f(k, ax, ay), fq = f(k, bx, by);
        if (fp < 0 && fq < 0) { rej = true; break; }
        if (fp < 0) { const t = fp / (fp - fq); if (t > tE) { tE = t; kE = k; } }
        else if (fq < 0) { const t = fp / (fp - fq); if (t < tX) { tX = t; kX = k; } }
      }
      if (rej) continue;
      if (!inP && !inQ && (kE < 0 || kX < 0 || !(tE < tX))) continue;
      if (inP) ringsInside.add(g.ringOf[e]);
      ringsWithEvents.add(g.ringOf[e]);
      if (!inP) {
        const x = ax + tE * (bx - ax), y = ay + tE * (by - ay);
        entries.push({ e, t: tE, k: kE, x, y, key: keyOf(kE, x, y) });
      }
      if (!inQ) {
        const x = ax + tX * (bx - ax), y = ay + tX * (by - ay);
        exits.set(e, { e, t: tX, k: kX, x, y, key: keyOf(kX, x, y) });
      }
    }
    // a hole lying wholly inside the cell: split the cell through it and clip both halves
    for (const r of ringsInside) {
      if (r === 0 || ringsWithEvents.has(r) || depth > 8) continue;
      let lo = Infinity, hi = -Infinity;
      for (let p = g.ringStart[r]; p < g.ringStart[r + 1]; p++) { lo = Math.min(lo, vx[2 * p + 1]); hi = Math.max(hi, vx[2 * p + 1]); }
      this.splitAndClip(xs, ys, ids, (lo + hi) / 2, sink, depth);
      return;
    }
    if (entries.length === 0) {
      if (ringsInside.has(0) && !ringsWithEvents.has(0)) this.emitRing(0, sink);
      else if (this.cellInside(xs, ys)) this.emitCell(xs, ys, sink);
      return;
    }
    const chains: Chain[] = [];
    for (const en of entries) {
      const pts = [en.x, en.y], ring = [0];
      let e = en.e, guard = 0, ex = exits.get(e);
      while (!ex && guard++ < 1e6) {
        const q = nxt[e];
        pts.push(vx[2 * q], vx[2 * q + 1]); ring.push(1);
        e = q;
        ex = exits.get(e);
      }
      if (!ex) return;
      pts.push(ex.x, ex.y); ring.push(0);
      chains.push({ entry: en, exit: ex, pts, ring, used: false });
    }
    chains.sort((a, b) => a.entry.key - b.entry.key);
    for (const c0 of chains) {
      if (c0.used) continue;
      let c = c0, guard = 0;
      const base = sink.xy.length;
      while (guard++ <= chains.length) {
        c.used = true;
        for (let i = 0; i < c.pts.length; i++) sink.xy.push(c.pts[i]);
        for (let i = 0; i < c.ring.length; i++) sink.ring.push(c.ring[i]);
        const xk = c.exit.key;
        let nx: Chain | null = null;
        for (const d of chains) if (d.entry.key >= xk) { nx = d; break; }
        if (!nx) nx = chains[0];
        // cell corners passed going counter-clockwise from the exit to the next entry
        const span = (nx.entry.key - xk + m) % m;
        for (let j = Math.floor(xk) + 1, n = 0; n < m; j++, n++) {
          const jj = j % m;
          if ((jj - xk + m) % m >= span || (nx === c && span === 0)) break;
          sink.xy.push(xs[jj], ys[jj]); sink.ring.push(0);
        }
        if (nx === c0) break;
        if (nx.used) break;
        c = nx;
      }
      if (sink.xy.length - base >= 6) sink.ends.push(sink.xy.length >> 1);
      else { sink.xy.length = base; sink.ring.length = base >> 1; }
    }
  }

  private cellInside(xs: number[], ys: number[]): boolean {
    let best = -1, bk = 0;
    const m = xs.length;
    for (let k = 0; k < m; k++) {
      const k1 = k + 1 < m ? k + 1 : 0, l = (xs[k1] - xs[k]) ** 2 + (ys[k1] - ys[k]) ** 2;
      if (l > best) { best = l; bk = k; }
    }
    const k1 = bk + 1 < m ? bk + 1 : 0;
    return this.g.contains((xs[bk] + xs[k1]) / 2, (ys[bk] + ys[k1]) / 2);
  }

  private emitCell(xs: number[], ys: number[], sink: LoopSink): void {
    for (let i = 0; i < xs.length; i++) { sink.xy.push(xs[i], ys[i]); sink.ring.push(0); }
    sink.ends.push(sink.xy.length >> 1);
  }

  private emitRing(r: number, sink: LoopSink): void {
    const g = this.g;
    for (let p = g.ringStart[r]; p < g.ringStart[r + 1]; p++) { sink.xy.push(g.vx[2 * p], g.vx[2 * p + 1]); sink.ring.push(1); }
    sink.ends.push(sink.xy.length >> 1);
  }

  /** Cut the convex cell by the line y = ym and clip the lower and upper parts. */
  private splitAndClip(xs: number[], ys: number[], ids: number[], ym: number, sink: LoopSink, depth: number): void {
    const m = xs.length;
    const lo: [number[], number[], number[]] = [[], [], []], up: [number[], number[], number[]] = [[], [], []];
    const push = (h: [number[], number[], number[]], x: number, y: number, id: number) => { h[0].push(x); h[1].push(y); h[2].push(id); };
    for (let k = 0; k < m; k++) {
      const k1 = k + 1 < m ? k + 1 : 0;
      const below = ys[k] <= ym;
      push(below ? lo : up, xs[k], ys[k], ids[k]);
      if (ys[k] === ym) push(up, xs[k], ys[k], ids[k]);
      const b1 = ys[k1] <= ym;
      if (below !== b1 && ys[k] !== ym && ys[k1] !== ym) {
        const a = ids[k] < ids[k1] ? k : k1, b = a === k ? k1 : k;
        const t = (ym - ys[a]) / (ys[b] - ys[a]);
        const x = xs[a] + t * (xs[b] - xs[a]), id = this.fresh--;
        push(lo, x, ym, id); push(up, x, ym, id);
      }
    }
    if (lo[0].length >= 3) this.clip(lo[0], lo[1], lo[2], sink, depth + 1);
    if (up[0].length >= 3) this.clip(up[0], up[1], up[2], sink, depth + 1);
  }

  /** Fresh ids for points made by this clipper (negative, never clash with Voronoi vertex ids). */
  freshId(): number { return this.fresh--; }
}
