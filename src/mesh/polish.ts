// From raw clipped loops to a conforming mesh: weld, merge slivers, collapse tiny edges,
// drop needless boundary vertices, insert hanging nodes, order cells and vertices.

import type { Vec2 } from '../case/model.js';
import type { Domain } from '../geometry/domain.js';
import { distanceToBoundary } from '../geometry/domain.js';
import type { PolyMesh } from './polymesh.js';

export interface WorkMesh {
  x: number[]; y: number[];
  pinned: Uint8Array;
  cells: number[][];
  /** Cells of each vertex, built on first use and kept up to date by the passes below. */
  vc?: number[][];
}

/** Merge points closer than tol (sweep over x-sorted order); ring vertices win as representatives. */
export function weld(xy: number[], ring: number[], ends: number[], tol: number): WorkMesh {
  const n = xy.length >> 1;
  const order = new Uint32Array(n);
  for (let i = 0; i < n; i++) order[i] = i;
  const X = new Float64Array(n);
  for (let i = 0; i < n; i++) X[i] = xy[2 * i];
  order.sort((a, b) => X[a] - X[b] || xy[2 * a + 1] - xy[2 * b + 1] || a - b);
  const parent = new Int32Array(n);
  for (let i = 0; i < n; i++) parent[i] = i;
  const find = (i: number): number => { while (parent[i] !== i) { parent[i] = parent[parent[i]]; i = parent[i]; } return i; };
  for (let a = 0; a < n; a++) {
    const i = order[a];
    for (let b = a + 1; b < n; b++) {
      const j = order[b];
      if (X[j] - X[i] > tol) break;
      if (Math.abs(xy[2 * j + 1] - xy[2 * i + 1]) <= tol) {
        const ri = find(i), rj = find(j);
        if (ri === rj) continue;
        // keep a ring vertex as the representative so the boundary stays exact
        if (ring[rj] && !ring[ri]) parent[ri] = rj; else parent[rj] = ri;
      }
    }
  }
  const id = new Int32Array(n).fill(-1);
  const x: number[] = [], y: number[] = [], pin: number[] = [];
  for (let a = 0; a < n; a++) {
    const i = order[a], r = find(i);
    if (id[r] < 0) { id[r] = x.length; x.push(xy[2 * r]); y.push(xy[2 * r + 1]); pin.push(ring[r] ? 1 : 0); }
    id[i] = id[r];
  }
  const cells: number[][] = [];
  let s = 0;
  for (const e of ends) {
    const c: number[] = [];
    for (let k = s; k < e; k++) {
      const v = id[k];
      if (c.length && c[c.length - 1] === v) continue;
      c.push(v);
    }
    while (c.length > 1 && c[0] === c[c.length - 1]) c.pop();
    s = e;
    if (c.length >= 3) cells.push(removeSpikes(c));
  }
  return { x, y, pinned: Uint8Array.from(pin), cells: cells.filter(c => c.length >= 3) };
}

/** Remove back-and-forth spikes a→b→a left by degenerate touches. */
function removeSpikes(c: number[]): number[] {
  let changed = true;
  while (changed && c.length >= 3) {
    changed = false;
    for (let i = 0; i < c.length; i++) {
      const a = c[(i + c.length - 1) % c.length], b = c[(i + 1) % c.length];
      if (a === b) {
        const j = (i + 1) % c.length;
        const keep = c.filter((_, k) => k !== i && k !== j);
        c = keep; changed = true; break;
      }
    }
  }
  return c;
}

export function polyArea(w: WorkMesh, c: number[]): number {
  const { x, y } = w, n = c.length;
  if (n < 3) return 0;
  const x0 = x[c[0]], y0 = y[c[0]];
  let a = 0;
  for (let k = 1; k + 1 < n; k++) a += (x[c[k]] - x0) * (y[c[k + 1]] - y0) - (x[c[k + 1]] - x0) * (y[c[k]] - y0);
  return a / 2;
}

function segsMeet(ax: number, ay: number, bx: number, by: number, px: number, py: number, qx: number, qy: number): boolean {
  const o = (x0: number, y0: number, x1: number, y1: number, x2: number, y2: number) => (x1 - x0) * (y2 - y0) - (y1 - y0) * (x2 - x0);
  const d1 = o(ax, ay, bx, by, px, py), d2 = o(ax, ay, bx, by, qx, qy), d3 = o(px, py, qx, qy, ax, ay), d4 = o(px, py, qx, qy, bx, by);
  if (d1 === 0 && d2 === 0) {
    return Math.max(ax, bx) >= Math.min(px, qx) && Math.max(px, qx) >= Math.min(ax, bx) && Math.max(ay, by) >= Math.min(py, qy) && Math.max(py, qy) >= Math.min(ay, by);
  }
  return d1 * d2 <= 0 && d3 * d4 <= 0;
}

/** True when the two sides of cell c at vertex v meet no other side of c. */
export function simpleAt(w: WorkMesh, c: number[], v: number): boolean {
  const n = c.length, k = c.indexOf(v), { x, y } = w;
  if (k < 0) return true;
  for (const s of [(k + n - 1) % n, k]) {
    const a = c[s], b = c[(s + 1) % n];
    for (let j = 0; j < n; j++) {
      if (j === s || j === (s + 1) % n || (j + 1) % n === s) continue;
      const p = c[j], q = c[(j + 1) % n];
      if (segsMeet(x[a], y[a], x[b], y[b], x[p], y[p], x[q], y[q])) return false;
    }
  }
  return true;
}

function centroidOf(w: WorkMesh, c: number[]): [number, number] {
  const { x, y } = w, n = c.length, x0 = x[c[0]], y0 = y[c[0]];
  let a = 0, cx = 0, cy = 0;
  for (let k = 0; k < n; k++) {
    const i = c[k], j = c[(k + 1) % n];
    const xi = x[i] - x0, yi = y[i] - y0, xj = x[j] - x0, yj = y[j] - y0, cr = xi * yj - xj * yi;
    a += cr; cx += (xi + xj) * cr; cy += (yi + yj) * cr;
  }
  return a !== 0 ? [x0 + cx / (3 * a), y0 + cy / (3 * a)] : [x0, y0];
}

function vertexCells(w: WorkMesh): number[][] {
  if (w.vc) return w.vc;
  const vc: number[][] = new Array(w.x.length);
  for (let v = 0; v < vc.length; v++) vc[v] = [];
  w.cells.forEach((c, ci) => { for (const v of c) vc[v].push(ci); });
  return (w.vc = vc);
}

/** The cell that holds the directed side u → v, or -1. */
function sideOwner(w: WorkMesh, vc: number[][], u: number, v: number): number {
  for (const ci of vc[u]) {
    const c = w.cells[ci], k = c.indexOf(u);
    if (k >= 0 && c[(k + 1) % c.length] === v) return ci;
  }
  return -1;
}

/** Snapshot of all directed sides grouped by start vertex: owner(u, v) is the cell with side u → v, or -1. */
function sideTable(w: WorkMesh): (u: number, v: number) => number {
  const nv = w.x.length, start = new Int32Array(nv + 1);
  for (const c of w.cells) for (const u of c) start[u + 1]++;
  for (let v = 0; v < nv; v++) start[v + 1] += start[v];
  const pos = start.slice(0, nv), to = new Int32Array(start[nv]), cell = new Int32Array(start[nv]);
  w.cells.forEach((c, ci) => {
    for (let k = 0; k < c.length; k++) { const u = c[k], i = pos[u]++; to[i] = c[(k + 1) % c.length]; cell[i] = ci; }
  });
  return (u: number, v: number): number => {
    for (let i = start[u]; i < start[u + 1]; i++) if (to[i] === v) return cell[i];
    return -1;
  };
}

/** Flags for vertices on a side that no other cell shares (the mesh boundary). */
function boundaryVertices(w: WorkMesh): Uint8Array {
  const b = new Uint8Array(w.x.length), owner = sideTable(w);
  for (const c of w.cells) for (let k = 0; k < c.length; k++) {
    const u = c[k], v = c[(k + 1) % c.length];
    if (owner(v, u) < 0) { b[u] = 1; b[v] = 1; }
  }
  return b;
}

/** Cells too small or too thin for their place are merged into the neighbour sharing most boundary. */
export function mergeSlivers(w: WorkMesh, h: (x: number, y: number) => number): number {
  const vc = vertexCells(w), { x, y } = w;
  const len = (a: number, b: number) => Math.hypot(x[a] - x[b], y[a] - y[b]);
  const cand: { c: number; a: number }[] = [];
  w.cells.forEach((c, ci) => {
    const a = polyArea(w, c);
    let per = 0;
    for (let k = 0; k < c.length; k++) per += len(c[k], c[(k + 1) % c.length]);
    const [gx, gy] = centroidOf(w, c), hh = h(gx, gy);
    if (a < 0.1 * hh * hh || (a < 0.6 * hh * hh && (4 * Math.PI * a) / (per * per) < 0.25)) cand.push({ c: ci, a });
  });
  cand.sort((p, q) => p.a - q.a || p.c - q.c);
  let merged = 0;
  for (const { c: A } of cand) {
    const a = w.cells[A];
    if (a.length < 3) continue;
    const share = new Map<number, number>();
    for (let k = 0; k < a.length; k++) {
      const u = a[k], v = a[(k + 1) % a.length], B = sideOwner(w, vc, v, u);
      if (B >= 0) share.set(B, (share.get(B) ?? 0) + len(u, v));
    }
    const order = [...share.entries()].sort((p, q) => q[1] - p[1] || p[0] - q[0]);
    for (const [B] of order) {
      if (mergeInto(w, vc, A, B)) { merged++; break; }
    }
  }
  return merged;
}

function mergeInto(w: WorkMesh, vc: number[][], A: number, B: number): boolean {
  const a = w.cells[A], b = w.cells[B], na = a.length;
  const sh = a.map((u, k) => sideOwner(w, vc, a[(k + 1) % na], u) === B);
  let runs = 0, s = -1, cnt = 0;
  for (let k = 0; k < na; k++) {
    if (sh[k]) cnt++;
    if (sh[k] && !sh[(k + na - 1) % na]) { runs++; s = k; }
  }
  if (runs !== 1 || cnt === na) return false;
  const e = (s + cnt) % na;
  // pinned vertices inside the shared chain would vanish with it
  for (let k = (s + 1) % na; k !== e; k = (k + 1) % na) if (w.pinned[a[k]] || vc[a[k]].length > 2) return false;
  const js = b.indexOf(a[s]);
  if (js < 0) return false;
  const out: number[] = [];
  for (let j = js, g = 0; g <= b.length; j = (j + 1) % b.length, g++) { out.push(b[j]); if (b[j] === a[e]) break; }
  if (out[out.length - 1] !== a[e]) return false;
  for (let k = (e + 1) % na; k !== s; k = (k + 1) % na) out.push(a[k]);
  if (new Set(out).size !== out.length || out.length < 3) return false;
  if (!(polyArea(w, out) > 0)) return false;
  for (const v of a) {
    const l = vc[v].filter(ci => ci !== A);
    if (out.includes(v) && !l.includes(B)) l.push(B);
    vc[v] = l;
  }
  for (const v of b) if (!out.includes(v)) vc[v] = vc[v].filter(ci => ci !== B);
  w.cells[B] = out;
  w.cells[A] = [];
  return true;
}

/** Edges much shorter than the local size are collapsed when every touched cell stays valid. */
export function collapseTinyEdges(w: WorkMesh, h: (x: number, y: number) => number, frac = 0.1): number {
  const nv = w.x.length, vc = vertexCells(w), { x, y, pinned } = w;
  const bnd = boundaryVertices(w), owner = sideTable(w);
  const list: [number, number, number][] = [];
  for (const c of w.cells) for (let k = 0; k < c.length; k++) {
    const a = c[k], b = c[(k + 1) % c.length];
    if (a > b && owner(b, a) >= 0) continue;
    const l = Math.hypot(x[a] - x[b], y[a] - y[b]);
    if (l < frac * h((x[a] + x[b]) / 2, (y[a] + y[b]) / 2)) list.push([a, b, l]);
  }
  list.sort((p, q) => p[2] - q[2] || p[0] - q[0] || p[1] - q[1]);
  const dead = new Uint8Array(nv);
  let n = 0;
  for (const [a0, b0] of list) {
    if (dead[a0] || dead[b0]) continue;
    if (pinned[a0] && pinned[b0]) continue;
    let keep = a0, gone = b0;
    const onB = sideOwner(w, vc, a0, b0) < 0 || sideOwner(w, vc, b0, a0) < 0;
    if (pinned[b0] || (bnd[b0] && !bnd[a0])) { keep = b0; gone = a0; }
    if (pinned[gone]) continue;
    if (bnd[gone] && (!onB || !bnd[keep])) continue;
    let nx = x[keep], ny = y[keep];
    if (!pinned[keep] && !bnd[keep] && !bnd[gone]) { nx = (x[a0] + x[b0]) / 2; ny = (y[a0] + y[b0]) / 2; }
    const touched = [...new Set([...vc[keep], ...vc[gone]])];
    const ox = x[keep], oy = y[keep];
    x[keep] = nx; y[keep] = ny;
    const fresh: number[][] = [];
    let ok = true;
    for (const ci of touched) {
      const c = w.cells[ci].map(v => (v === gone ? keep : v)).filter((v, i, arr) => v !== arr[(i + 1) % arr.length]);
      if (c.length < 3 || new Set(c).size !== c.length || !(polyArea(w, c) > 0) || !simpleAt(w, c, keep)) { ok = false; break; }
      fresh.push(c);
    }
    if (!ok) { x[keep] = ox; y[keep] = oy; continue; }
    touched.forEach((ci, i) => { w.cells[ci] = fresh[i]; });
    vc[keep] = touched; vc[gone] = [];
    dead[gone] = 1;
    if (bnd[gone]) bnd[keep] = 1;
    n++;
  }
  return n;
}

/** A boundary vertex of one cell only, collinear with its neighbours and next to a short edge, is dropped. */
export function dropNeedlessBoundaryVertices(w: WorkMesh, h: (x: number, y: number) => number): number {
  const vc = vertexCells(w), { x, y, pinned } = w;
  let n = 0;
  for (let ci = 0; ci < w.cells.length; ci++) {
    let c = w.cells[ci];
    for (let k = 0; k < c.length && c.length > 3; k++) {
      const v = c[k];
      if (pinned[v] || vc[v].length !== 1) continue;
      const u = c[(k + c.length - 1) % c.length], t = c[(k + 1) % c.length];
      const l1 = Math.hypot(x[v] - x[u], y[v] - y[u]), l2 = Math.hypot(x[t] - x[v], y[t] - y[v]);
      const cr = (x[v] - x[u]) * (y[t] - y[v]) - (y[v] - y[u]) * (x[t] - x[v]);
      if (Math.abs(cr) > 1e-10 * l1 * l2 + 1e-300) continue;
      if (Math.min(l1, l2) >= 0.25 * h(x[v], y[v])) continue;
      c = c.filter((_, i) => i !== k);
      w.cells[ci] = c;
      vc[v] = [];
      k--; n++;
    }
  }
  return n;
}

/** Vertices lying on a single-owner side inside the domain are inserted into that side. */
export function insertHangingNodes(w: WorkMesh, d: Domain, tol: number): number {
  const nv = w.x.length, vc = vertexCells(w), { x, y } = w, owner = sideTable(w);
  const open: [number, number, number][] = [];
  w.cells.forEach((c, ci) => {
    for (let k = 0; k < c.length; k++) {
      const a = c[k], b = c[(k + 1) % c.length];
      if (owner(b, a) >= 0) continue;
      if (distanceToBoundary(d, (x[a] + x[b]) / 2, (y[a] + y[b]) / 2) > 10 * tol) open.push([a, b, ci]);
    }
  });
  if (!open.length) return 0;
  let n = 0;
  for (const [a, b, ci] of open) {
    const dx = x[b] - x[a], dy = y[b] - y[a], l2 = dx * dx + dy * dy, l = Math.sqrt(l2);
    const on: [number, number][] = [];
    for (let v = 0; v < nv; v++) {
      if (!vc[v].length || v === a || v === b) continue;
      const t = ((x[v] - x[a]) * dx + (y[v] - y[a]) * dy) / l2;
      if (t <= 0 || t >= 1) continue;
      if (Math.abs((x[v] - x[a]) * dy - (y[v] - y[a]) * dx) / l <= tol) on.push([t, v]);
    }
    if (!on.length) continue;
    const c = w.cells[ci], i = c.indexOf(a);
    on.sort((p, q) => p[0] - q[0]);
    c.splice(i + 1, 0, ...on.map(p => p[1]));
    for (const p of on) if (!vc[p[1]].includes(ci)) vc[p[1]].push(ci);
    n += on.length;
  }
  return n;
}

/** Exact named points: snap the vertex within tol (pinned thereafter), else move the nearest free interior vertex within reach; returns the points missed. */
export function pinPoints(w: WorkMesh, pts: Vec2[], tol: number, reach: (x: number, y: number) => number): Vec2[] {
  const vc = vertexCells(w), { x, y } = w, missed: Vec2[] = [];
  const bnd = boundaryVertices(w);
  if (pts.length === 0) return missed;
  const grid = new VertexGrid(w, vc);
  const usable = (v: number, dd: number) => dd <= tol || (!w.pinned[v] && !bnd[v]);
  for (const p of pts) {
    const [best, bd] = grid.nearest(p[0], p[1], usable);
    if (best < 0 || bd > reach(p[0], p[1])) { missed.push(p); continue; }
    const ox = x[best], oy = y[best];
    x[best] = p[0]; y[best] = p[1];
    if (bd > tol && vc[best].some(ci => !(polyArea(w, w.cells[ci]) > 0) || !simpleAt(w, w.cells[ci], best))) { x[best] = ox; y[best] = oy; missed.push(p); continue; }
    grid.moved(best, ox, oy);
    w.pinned[best] = 1;
  }
  return missed;
}

/**
 * Live vertices in a uniform grid, for the nearest vertex that passes a test: rings of cells
 * are searched outward until no unsearched vertex can be nearer, so the answer (ties to the
 * lowest id) is the one a scan over all vertices gives, in time that does not grow with their number.
 */
class VertexGrid {
  private readonly x0: number; private readonly y0: number; private readonly cs: number;
  private readonly nx: number; private readonly ny: number;
  private readonly cells: number[][];

  constructor(private readonly w: WorkMesh, vc: number[][]) {
    const { x, y } = w;
    let xmin = Infinity, ymin = Infinity, xmax = -Infinity, ymax = -Infinity, n = 0;
    for (let v = 0; v < x.length; v++) {
      if (!vc[v].length) continue;
      n++;
      xmin = Math.min(xmin, x[v]); xmax = Math.max(xmax, x[v]); ymin = Math.min(ymin, y[v]); ymax = Math.max(ymax, y[v]);
    }
    const ext = Math.max(xmax - xmin, ymax - ymin, 1e-300);
    this.cs = ext / Math.max(1, Math.ceil(Math.sqrt(n / 2)));
    this.x0 = xmin; this.y0 = ymin;
    this.nx = Math.max(1, Math.ceil((xmax - xmin) / this.cs) + 1);
    this.ny = Math.max(1, Math.ceil((ymax - ymin) / this.cs) + 1);
    this.cells = Array.from({ length: this.nx * this.ny }, () => []);
    for (let v = 0; v < x.length; v++) if (vc[v].length) this.cells[this.at(x[v], y[v])].push(v);
  }

  private ix(x: number): number { return Math.min(this.nx - 1, Math.max(0, Math.floor((x - this.x0) / this.cs))); }
  private iy(y: number): number { return Math.min(this.ny - 1, Math.max(0, Math.floor((y - this.y0) / this.cs))); }
  private at(x: number, y: number): number { return this.iy(y) * this.nx + this.ix(x); }

  /** A vertex moved from (ox, oy) to its current place. */
  moved(v: number, ox: number, oy: number): void {
    const from = this.at(ox, oy), to = this.at(this.w.x[v], this.w.y[v]);
    if (from === to) return;
    const list = this.cells[from];
    list.splice(list.indexOf(v), 1);
    this.cells[to].push(v);
  }

  nearest(px: number, py: number, ok: (v: number, dd: number) => boolean): [number, number] {
    const { x, y } = this.w;
    const ci = this.ix(px), cj = this.iy(py);
    // distance from p to the edge of the searched square, below which nothing outside can lie
    const inner = Math.min(px - (this.x0 + ci * this.cs), this.x0 + (ci + 1) * this.cs - px, py - (this.y0 + cj * this.cs), this.y0 + (cj + 1) * this.cs - py);
    let best = -1, bd = Infinity;
    const maxR = Math.max(ci, this.nx - 1 - ci, cj, this.ny - 1 - cj);
    for (let r = 0; r <= maxR; r++) {
      for (let j = cj - r; j <= cj + r; j++) {
        if (j < 0 || j >= this.ny) continue;
        const edge = j === cj - r || j === cj + r;
        for (let i = ci - r; i <= ci + r; i += edge ? 1 : 2 * r) {
          if (i >= 0 && i < this.nx) {
            for (const v of this.cells[j * this.nx + i]) {
              const dd = Math.hypot(x[v] - px, y[v] - py);
              if ((dd < bd || (dd === bd && v < best)) && ok(v, dd)) { bd = dd; best = v; }
            }
          }
          if (r === 0) break;
        }
      }
      if (bd < Math.max(0, inner) + r * this.cs) break;
    }
    return [best, bd];
  }
}

function hilbert(xi: number, yi: number): number {
  let d = 0;
  for (let s = 1 << 15; s > 0; s >>= 1) {
    const rx = (xi & s) > 0 ? 1 : 0, ry = (yi & s) > 0 ? 1 : 0;
    d += s * s * ((3 * rx) ^ ry);
    if (ry === 0) {
      if (rx === 1) { xi = s - 1 - xi; yi = s - 1 - yi; }
      const t = xi; xi = yi; yi = t;
    }
  }
  return d;
}

/** Cells along a Hilbert curve of their centroids, vertices numbered by first use. */
export function pack(w: WorkMesh): PolyMesh {
  const cells = w.cells.filter(c => c.length >= 3);
  const cen = cells.map(c => centroidOf(w, c));
  let xmin = Infinity, ymin = Infinity, xmax = -Infinity, ymax = -Infinity;
  for (const [a, b] of cen) { xmin = Math.min(xmin, a); xmax = Math.max(xmax, a); ymin = Math.min(ymin, b); ymax = Math.max(ymax, b); }
  const sc = 65535 / Math.max(xmax - xmin, ymax - ymin, 1e-300);
  const keys = cen.map(([a, b]) => hilbert(Math.round((a - xmin) * sc), Math.round((b - ymin) * sc)));
  const order = cells.map((_, i) => i).sort((i, j) => keys[i] - keys[j] || cen[i][0] - cen[j][0] || cen[i][1] - cen[j][1]);
  const id = new Int32Array(w.x.length).fill(-1);
  let nv = 0, nk = 0;
  const cellStart = new Int32Array(cells.length + 1);
  for (const i of order) nk += cells[i].length;
  const cellVerts = new Int32Array(nk);
  let k = 0, ci = 0;
  for (const i of order) {
    // start each cell at its smallest new index so the output does not depend on clip start points
    const c = cells[i];
    for (const v of c) if (id[v] < 0) id[v] = nv++;
    let s = 0;
    for (let j = 1; j < c.length; j++) if (id[c[j]] < id[c[s]]) s = j;
    for (let j = 0; j < c.length; j++) cellVerts[k++] = id[c[(s + j) % c.length]];
    cellStart[++ci] = k;
  }
  const xy = new Float64Array(2 * nv);
  for (let v = 0; v < w.x.length; v++) if (id[v] >= 0) { xy[2 * id[v]] = w.x[v]; xy[2 * id[v] + 1] = w.y[v]; }
  return { xy, cellStart, cellVerts };
}
