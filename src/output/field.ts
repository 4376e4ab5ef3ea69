// Pictures of a plate: cells coloured by a field, deformed shape, cracks, cohesive segments, supports and loads.

import type { PolyMesh } from '../mesh/polymesh.js';
import { cellCount, vertexCount } from '../mesh/polymesh.js';
import { colorAt, damageMap, diverging, sequential } from './colormap.js';
import { el, layer, n, n1, polyPath, svgDocument, text } from './svg.js';
import { formatTicks, formatValue, niceTicks } from './ticks.js';
import { curveInsetSvg, type CurveInset } from './inset.js';
import { VertexGrid } from './vertexgrid.js';

export interface FieldPicture {
  mesh: PolyMesh;
  /** One value per cell. */
  values?: Float64Array;
  /** e.g. "σ₁ / ft". */
  valueLabel?: string;
  range?: [number, number];
  /** Signed map, white at zero (two slopes when the range straddles zero). */
  diverging?: boolean;
  /** Two per vertex, mm. */
  displacement?: Float64Array;
  magnification?: number;
  /** Model box [x0, y0, x1, y1] (mm) the picture shows; fixed for a series so every frame has one size. Default: the undeformed and deformed shapes. */
  view?: [number, number, number, number];
  showMesh?: boolean;
  cracks?: { points: [number, number][]; kind: 'notch' | 'crack' }[];
  cohesive?: { x1: number; y1: number; x2: number; y2: number; damage: number }[];
  supports?: { x: number; y: number; fix: 'x' | 'y' | 'xy' }[];
  loads?: { x: number; y: number; dx: number; dy: number }[];
  /** A small load–opening chart in the foot of the picture, marking this state. */
  inset?: CurveInset;
  title?: string;
  caption?: string[];
  widthPx?: number;
}

const LEVELS = 64;
const INK = '#1b1b1b';
const MUTED = '#4a4f55';

/** Value → [0, 1]: linear, or two slopes meeting at zero for a signed map. */
function normaliser(lo: number, hi: number, twoSlope: boolean): (v: number) => number {
  if (twoSlope && lo < 0 && hi > 0) return (v) => (v < 0 ? 0.5 - 0.5 * (v / lo) : 0.5 + 0.5 * (v / hi));
  const span = hi - lo || 1;
  return (v) => (v - lo) / span;
}

/** Largest 1, 2 or 5 × 10^k not above x. */
function roundDown125(x: number): number {
  const p = Math.pow(10, Math.floor(Math.log10(x)));
  const m = x / p;
  return (m >= 5 ? 5 : m >= 2 ? 2 : 1) * p;
}

/** Magnification that makes the largest displacement about 6 % of the specimen size. */
export function autoMagnification(mesh: PolyMesh, displacement: Float64Array): number {
  const [x0, y0, x1, y1] = bbox(mesh.xy);
  let umax = 0;
  for (let i = 0; i + 1 < displacement.length; i += 2) umax = Math.max(umax, Math.hypot(displacement[i], displacement[i + 1]));
  if (!(umax > 0)) return 1;
  return Math.max(1, roundDown125((0.06 * Math.max(x1 - x0, y1 - y0)) / umax));
}

export function bbox(xy: ArrayLike<number>): [number, number, number, number] {
  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
  for (let i = 0; i + 1 < xy.length; i += 2) {
    const x = xy[i], y = xy[i + 1];
    if (x < x0) x0 = x; if (x > x1) x1 = x;
    if (y < y0) y0 = y; if (y > y1) y1 = y;
  }
  if (!(x1 >= x0)) return [0, 0, 1, 1];
  return [x0, y0, x1, y1];
}

/**
 * Edges of the mesh once each, ordered by their smaller vertex and then the larger, and which of
 * them are on the boundary (used by one cell only): the cells' sides bucketed by their smaller
 * vertex (a counting sort), each bucket's few sides sorted in place.
 */
function meshEdges(mesh: PolyMesh): { a: Int32Array; b: Int32Array; boundary: Uint8Array } {
  const nv = vertexCount(mesh), nc = cellCount(mesh);
  const { cellStart, cellVerts } = mesh;
  const start = new Int32Array(nv + 1);
  for (let c = 0; c < nc; c++) {
    const s = cellStart[c], e = cellStart[c + 1];
    for (let q = s; q < e; q++) { const i = cellVerts[q], j = cellVerts[q + 1 < e ? q + 1 : s]; start[(i < j ? i : j) + 1]++; }
  }
  for (let v = 0; v < nv; v++) start[v + 1] += start[v];
  const fill = start.slice(0, nv), other = new Int32Array(start[nv]);
  for (let c = 0; c < nc; c++) {
    const s = cellStart[c], e = cellStart[c + 1];
    for (let q = s; q < e; q++) { const i = cellVerts[q], j = cellVerts[q + 1 < e ? q + 1 : s]; if (i < j) other[fill[i]++] = j; else other[fill[j]++] = i; }
  }
  const a = new Int32Array(other.length), b = new Int32Array(other.length), bd = new Uint8Array(other.length);
  let n = 0;
  for (let v = 0; v < nv; v++) {
    const s = start[v], e = start[v + 1];
    for (let k = s + 1; k < e; k++) { const x = other[k]; let m = k - 1; while (m >= s && other[m] > x) { other[m + 1] = other[m]; m--; } other[m + 1] = x; }
    for (let k = s; k < e; ) {
      let m = k + 1;
      while (m < e && other[m] === other[k]) m++;
      a[n] = v; b[n] = other[k]; bd[n] = m - k === 1 ? 1 : 0; n++;
      k = m;
    }
  }
  return { a: a.slice(0, n), b: b.slice(0, n), boundary: bd.slice(0, n) };
}

/** The edges picked by mask joined into polylines (vertex lists), so dashes run on and files stay small. */
function chainEdges(a: Int32Array, b: Int32Array, mask: Uint8Array, nv: number): number[][] {
  const deg = new Int32Array(nv + 1);
  for (let e = 0; e < a.length; e++) if (mask[e]) { deg[a[e] + 1]++; deg[b[e] + 1]++; }
  for (let i = 0; i < nv; i++) deg[i + 1] += deg[i];
  const adj = new Int32Array(deg[nv]), fill = deg.slice(0, nv);
  for (let e = 0; e < a.length; e++) if (mask[e]) { adj[fill[a[e]]++] = e; adj[fill[b[e]]++] = e; }
  const used = new Uint8Array(a.length), lines: number[][] = [];
  const walk = (e0: number, from: number): number[] => {
    const line = [from];
    let e = e0, v = from;
    while (e >= 0 && !used[e]) {
      used[e] = 1;
      v = a[e] === v ? b[e] : a[e];
      line.push(v);
      e = -1;
      for (let q = deg[v]; q < deg[v + 1]; q++) if (!used[adj[q]]) { e = adj[q]; break; }
    }
    return line;
  };
  // open chains first (from vertices of odd degree), then the closed loops
  for (let v = 0; v < nv; v++) {
    if ((deg[v + 1] - deg[v]) % 2 === 0) continue;
    for (let q = deg[v]; q < deg[v + 1]; q++) if (!used[adj[q]]) lines.push(walk(adj[q], v));
  }
  for (let e = 0; e < a.length; e++) if (mask[e] && !used[e]) lines.push(walk(e, a[e]));
  return lines;
}

/** Displacement at a model point: the mean over the nearest vertices (both faces of a crack); the grid is built at the first look-up. */
function pointMover(mesh: PolyMesh, disp: Float64Array, mag: number): (x: number, y: number) => [number, number] {
  let grid: VertexGrid | null = null, tol = 0;
  return (x, y) => {
    if (!grid) {
      grid = new VertexGrid(mesh.xy);
      const [x0, y0, x1, y1] = bbox(mesh.xy);
      tol = 1e-7 * Math.max(x1 - x0, y1 - y0, 1);
    }
    const cnt = grid.nearest(x, y, tol), f = grid.found;
    let ux = 0, uy = 0;
    for (let k = 0; k < cnt; k++) { ux += disp[2 * f[k]]; uy += disp[2 * f[k] + 1]; }
    return cnt ? [x + (mag * ux) / cnt, y + (mag * uy) / cnt] : [x, y];
  };
}

/** A support symbol in its own frame (apex at the origin, pointing down from it): a triangle, two rollers when it is free along the ground, a hatched ground line. */
export function supportShape(fix: 'x' | 'y' | 'xy', u: number): { tri: number[]; rollers: { cx: number; cy: number; r: number }[]; ground: number[]; hatch: number[][] } {
  const w = 8 * u, h = 13 * u;
  const rollers: { cx: number; cy: number; r: number }[] = [];
  let ground = h;
  if (fix !== 'xy') {
    // a roller: free along the ground line
    const r = 2.6 * u;
    rollers.push({ cx: -w / 2, cy: h + r + 0.6 * u, r }, { cx: w / 2, cy: h + r + 0.6 * u, r });
    ground = h + 2 * r + 1.2 * u;
  }
  const gw = w + 4 * u, hatch: number[][] = [];
  for (let k = 0; k < 5; k++) {
    const x0 = -gw + ((k + 0.5) * 2 * gw) / 5;
    hatch.push([x0, ground, x0 - 3.5 * u, ground + 4.5 * u]);
  }
  return { tri: [0, 0, -w, h, w, h], rollers, ground: [-gw, ground, gw, ground], hatch };
}

/** A support symbol drawn pointing down from its apex, turned away from the body. */
function supportSymbol(x: number, y: number, fix: 'x' | 'y' | 'xy', angle: number, u: number): string {
  const g = supportShape(fix, u), t = g.tri, parts: string[] = [];
  parts.push(el('path', { d: `M${n(t[0])} ${n(t[1])}L${n(t[2])} ${n(t[3])}L${n(t[4])} ${n(t[5])}Z`, fill: '#ffffff', stroke: INK, 'stroke-width': 1.4 * u, 'stroke-linejoin': 'round' }));
  for (const r of g.rollers) parts.push(el('circle', { cx: r.cx, cy: r.cy, r: r.r, fill: '#ffffff', stroke: INK, 'stroke-width': 1.2 * u }));
  let hatch = `M${n(g.ground[0])} ${n(g.ground[1])}L${n(g.ground[2])} ${n(g.ground[3])}`;
  for (const h of g.hatch) hatch += `M${n(h[0])} ${n(h[1])}l${n(h[2] - h[0])} ${n(h[3] - h[1])}`;
  parts.push(el('path', { d: hatch, fill: 'none', stroke: INK, 'stroke-width': 1.2 * u, 'stroke-linecap': 'round' }));
  return el('g', { transform: `translate(${n(x)} ${n(y)}) rotate(${angle})`, class: `support fix-${fix}` }, parts);
}

/** An arrow from (x0, y0) to its tip (x1, y1): a white halo under the shaft, the shaft, the head. */
export function arrowShape(a: { x0: number; y0: number; x1: number; y1: number }, u: number): { halo: number[]; shaft: number[]; head: number[] } {
  const { x0, y0, x1, y1 } = a;
  const L = Math.hypot(x1 - x0, y1 - y0) || 1, ex = (x1 - x0) / L, ey = (y1 - y0) / L;
  const hl = 11 * u, hw = 5 * u;
  const bx = x1 - ex * hl, by = y1 - ey * hl;
  return { halo: [x0, y0, bx, by], shaft: [x0, y0, bx + ex * u, by + ey * u], head: [x1, y1, bx - ey * hw, by + ex * hw, bx + ey * hw, by - ex * hw] };
}

function arrow(a: { x0: number; y0: number; x1: number; y1: number }, u: number, color: string): string {
  const g = arrowShape(a, u), h = g.head;
  const seg = (q: number[]): string => `M${n(q[0])} ${n(q[1])}L${n(q[2])} ${n(q[3])}`;
  return el('g', { class: 'load' }, [
    el('path', { d: seg(g.halo), stroke: '#ffffff', 'stroke-width': 6 * u, 'stroke-linecap': 'round', opacity: 0.8 }),
    el('path', { d: seg(g.shaft), stroke: color, 'stroke-width': 2.8 * u, 'stroke-linecap': 'round' }),
    el('path', { d: `M${n(h[0])} ${n(h[1])}L${n(h[2])} ${n(h[3])}L${n(h[4])} ${n(h[5])}Z`, fill: color, stroke: color, 'stroke-width': 0.8 * u, 'stroke-linejoin': 'round' }),
  ]);
}

/** Screen places of the support symbols, each turned away from the body. */
export function supportPlaces(p: FieldPicture, L: FieldLayout): { x: number; y: number; fix: 'x' | 'y' | 'xy'; angle: number }[] {
  return (p.supports ?? []).map((q) => {
    const [mx, my] = L.move(q.x, q.y);
    return { x: L.X(mx), y: L.Y(my), fix: q.fix, angle: q.fix === 'x' ? (q.x <= L.midX ? 90 : -90) : q.y <= L.midY ? 0 : 180 };
  });
}

/** Screen ends of the load arrows: pushing loads end at the point, pulling loads start there. */
export function loadArrows(p: FieldPicture, L: FieldLayout): { x0: number; y0: number; x1: number; y1: number }[] {
  const out: { x0: number; y0: number; x1: number; y1: number }[] = [];
  const u = L.u;
  for (const l of p.loads ?? []) {
    const len0 = Math.hypot(l.dx, l.dy);
    if (!(len0 > 0)) continue;
    const [mx, my] = L.move(l.x, l.y);
    const px = L.X(mx), py = L.Y(my), ex = l.dx / len0, ey = -l.dy / len0, len = 46 * u, gap = 2 * u;
    const outward = ex * (px - L.X(L.midX)) + ey * (py - L.Y(L.midY)) > 0;
    out.push(outward ? { x0: px + ex * gap, y0: py + ey * gap, x1: px + ex * (len + gap), y1: py + ey * (len + gap) }
      : { x0: px - ex * (len + gap), y0: py - ey * (len + gap), x1: px - ex * gap, y1: py - ey * gap });
  }
  return out;
}

/** Cracks and notches as screen polylines. */
export function screenCracks(p: FieldPicture, L: FieldLayout): { kind: 'notch' | 'crack'; pts: number[] }[] {
  const out: { kind: 'notch' | 'crack'; pts: number[] }[] = [];
  for (const c of p.cracks ?? []) {
    if (c.points.length < 2) continue;
    const pts: number[] = [];
    for (const [x, y] of c.points) { const [mx, my] = L.move(x, y); pts.push(L.X(mx), L.Y(my)); }
    out.push({ kind: c.kind, pts });
  }
  return out;
}

/** Widths (in u) and colour of a crack or notch line; both have a white halo under them. */
export const crackStyle = (kind: 'notch' | 'crack'): { halo: number; width: number; color: string } =>
  (kind === 'notch' ? { halo: 6, width: 3.2, color: '#5a5f66' } : { halo: 6.5, width: 3, color: '#0d0d0d' });

/** Damage bucket (of 16) of a cohesive segment. */
export const damageLevel = (d: number): number => Math.min(15, Math.max(0, Math.floor((Number.isFinite(d) ? d : 0) * 16)));

export const INK_COLOR = INK;
export const CAPTION_COLOR = MUTED;
export const NO_VALUES = '#eef1f4';
export const UNDEFORMED = '#8a9099';
export const MESH_ON_VALUES = { opacity: 0.28, width: 0.5 };
export const MESH_PLAIN = { color: '#5b6470', width: 0.6 };

const sameInts = (x: Int32Array, y: Int32Array): boolean =>
  x.length === y.length && Buffer.from(x.buffer, x.byteOffset, x.byteLength).equals(Buffer.from(y.buffer, y.byteOffset, y.byteLength));

// the chains of the mesh drawn last: the frames of a run mostly share their mesh, and comparing
// it costs far less than chaining its edges again
let lastChains: { nv: number; start: Int32Array; verts: Int32Array; loops: number[][]; inner: number[][] } | null = null;

/** The boundary loops and the interior edges of a mesh joined into polylines (vertex lists). */
function meshChains(mesh: PolyMesh): { loops: number[][]; inner: number[][] } {
  const nv = vertexCount(mesh), m = lastChains;
  if (m && m.nv === nv && sameInts(m.start, mesh.cellStart) && sameInts(m.verts, mesh.cellVerts)) return m;
  const edges = meshEdges(mesh);
  const loops = chainEdges(edges.a, edges.b, edges.boundary, nv);
  const inner = chainEdges(edges.a, edges.b, edges.boundary.map((b) => 1 - b), nv);
  lastChains = { nv, start: Int32Array.from(mesh.cellStart), verts: Int32Array.from(mesh.cellVerts), loops, inner };
  return lastChains;
}

/** Screen polylines of the undeformed boundary, the interior edges (joined into long lines) and the deformed boundary; a closed loop repeats its first point. */
export function meshLines(p: FieldPicture, L: FieldLayout): { undeformed: Float64Array[]; inner: Float64Array[]; outline: Float64Array[] } {
  const mesh = p.mesh;
  const { loops, inner } = meshChains(mesh);
  const toScreen = (line: number[], px: (i: number) => number, py: (i: number) => number): Float64Array => {
    const out = new Float64Array(2 * line.length);
    for (let k = 0; k < line.length; k++) { out[2 * k] = px(line[k]); out[2 * k + 1] = py(line[k]); }
    return out;
  };
  const sx = (i: number): number => L.sx[i], sy = (i: number): number => L.sy[i];
  const showMesh = p.showMesh ?? !p.values;
  return {
    undeformed: p.displacement ? loops.map((l) => toScreen(l, (i) => L.X(mesh.xy[2 * i]), (i) => L.Y(mesh.xy[2 * i + 1]))) : [],
    inner: showMesh ? inner.map((l) => toScreen(l, sx, sy)) : [],
    outline: loops.map((l) => toScreen(l, sx, sy)),
  };
}

/** Ticks for a colour bar: round values on each side of zero for a two-slope map. */
function barTicks(lo: number, hi: number, twoSlope: boolean): number[] {
  if (twoSlope && lo < 0 && hi > 0) {
    const neg = niceTicks(lo, 0, 4), pos = niceTicks(0, hi, 4);
    return [...neg.filter((v) => v < 0), 0, ...pos.filter((v) => v > 0)];
  }
  return niceTicks(lo, hi, 6);
}

/** Where everything of a field picture goes: one computation for the SVG and the raster drawing. */
export interface FieldLayout {
  W: number; H: number; u: number; pad: number; mag: number;
  /** Deformed vertex positions (model mm) and their screen positions. */
  pos: Float64Array; sx: Float64Array; sy: Float64Array;
  move: (x: number, y: number) => [number, number];
  X: (x: number) => number; Y: (y: number) => number;
  /** Model scale (px per mm), width of the shown box (mm), middle of the undeformed body. */
  s: number; bw: number; midX: number; midY: number;
  oy: number; bodyH: number; footY: number; capY: number;
  hasBar: boolean; horizontalBar: boolean; vBarW: number;
  captionLines: string[];
  insetBox: [number, number, number, number];
}

/** The layout of a field picture (fieldSvg and the raster frames share it). */
export function fieldLayout(p: FieldPicture): FieldLayout {
  const mesh = p.mesh, nv = vertexCount(mesh), nc = cellCount(mesh);
  if (p.values && p.values.length !== nc) throw new Error(`fieldSvg: ${p.values.length} values for ${nc} cells`);
  if (p.displacement && p.displacement.length !== 2 * nv) throw new Error(`fieldSvg: displacement needs 2 × ${nv} entries, got ${p.displacement.length}`);
  const W = p.widthPx ?? 1000, u = W / 1000;

  // deformed positions
  const mag = p.displacement ? p.magnification ?? autoMagnification(mesh, p.displacement) : 1;
  const pos = new Float64Array(mesh.xy);
  if (p.displacement) for (let i = 0; i < pos.length; i++) pos[i] += mag * p.displacement[i];
  const move = p.displacement ? pointMover(mesh, p.displacement, mag) : (x: number, y: number): [number, number] => [x, y];

  const bU = bbox(mesh.xy), bD = bbox(pos);
  const [bx0, by0, bx1, by1] = p.view ?? [Math.min(bU[0], bD[0]), Math.min(bU[1], bD[1]), Math.max(bU[2], bD[2]), Math.max(bU[3], bD[3])];
  const bw = Math.max(bx1 - bx0, 1e-9), bh = Math.max(by1 - by0, 1e-9);
  const midX = (bU[0] + bU[2]) / 2, midY = (bU[1] + bU[3]) / 2;

  // layout: room for symbols only on the sides that carry them
  const pad = 22 * u;
  const titleH = p.title ? 36 * u : 0;
  const side = { l: 6 * u, r: 6 * u, t: 6 * u, b: 6 * u };
  const want = (k: keyof typeof side, m: number): void => { side[k] = Math.max(side[k], m); };
  for (const q of p.supports ?? []) {
    if (q.fix === 'x') want(q.x <= midX ? 'l' : 'r', 30 * u);
    else want(q.y <= midY ? 'b' : 't', 30 * u);
  }
  for (const l of p.loads ?? []) {
    const L = Math.hypot(l.dx, l.dy);
    if (!(L > 0)) continue;
    const ex = l.dx / L, ey = l.dy / L;
    const outward = ex * (l.x - midX) + ey * (l.y - midY) > 0;
    const ox = outward ? ex : -ex, oyy = outward ? ey : -ey; // where the arrow's far end goes
    const nearX = Math.min(l.x - bU[0], bU[2] - l.x) < 0.25 * bw, nearY = Math.min(l.y - bU[1], bU[3] - l.y) < 0.25 * bh;
    if (Math.abs(ox) >= Math.abs(oyy)) { if (nearX) want(ox < 0 ? 'l' : 'r', 58 * u); }
    else if (nearY) want(oyy > 0 ? 't' : 'b', 58 * u);
  }
  const hasBar = !!p.values;
  const horizontalBar = bw / bh >= 1.5;
  const labelW = (p.valueLabel ?? 'value').length * 0.62 * 16 * u;
  const vBarW = hasBar && !horizontalBar ? Math.max(110 * u, labelW + 30 * u) : 0;
  const availW = W - 2 * pad - side.l - side.r - vBarW;
  const s = Math.min(availW / bw, (1.25 * W) / bh);
  const bodyW = bw * s, bodyH = bh * s;
  const ox = pad + side.l + (availW - bodyW) / 2, oy = pad + titleH + side.t;
  const X = (x: number): number => ox + (x - bx0) * s;
  const Y = (y: number): number => oy + (by1 - y) * s;
  const footY = oy + bodyH + side.b + 10 * u;
  const insetW = 300 * u, insetH = 180 * u;
  const footH = p.inset ? insetH + 14 * u : 72 * u;
  const captionLines = [...(p.caption ?? [])];
  if (p.displacement && !captionLines.some((l) => /magnif/i.test(l))) captionLines.push(`Displacements magnified ×${formatValue(mag, 3)}; dashed line: undeformed outline.`);
  const capY = footY + footH;
  const H = capY + captionLines.length * 22 * u + pad;

  const sx = new Float64Array(nv), sy = new Float64Array(nv);
  for (let i = 0; i < nv; i++) { sx[i] = X(pos[2 * i]); sy[i] = Y(pos[2 * i + 1]); }
  return {
    W, H, u, pad, mag, pos, sx, sy, move, X, Y, s, bw, midX, midY, oy, bodyH, footY, capY, hasBar, horizontalBar, vBarW, captionLines,
    insetBox: [W - pad - insetW, footY + 4 * u, insetW, insetH],
  };
}

/** The value range and the map to [0, 1] of a field picture's colours. */
export function valueScale(p: FieldPicture): { lo: number; hi: number; twoSlope: boolean; norm: (v: number) => number; level: (v: number) => number } {
  let lo = 0, hi = 1, norm = (v: number): number => v;
  const twoSlope = p.diverging === true;
  if (p.values) {
    if (p.range) {
      lo = Math.min(p.range[0], p.range[1]); hi = Math.max(p.range[0], p.range[1]);
    } else {
      lo = Infinity; hi = -Infinity;
      for (let c = 0; c < p.values.length; c++) { const v = p.values[c]; if (Number.isFinite(v)) { if (v < lo) lo = v; if (v > hi) hi = v; } }
      if (!(hi >= lo)) { lo = 0; hi = 1; }
    }
    if (twoSlope && lo >= 0) lo = -hi; // zero stays white when all values share a sign
    if (twoSlope && hi <= 0) hi = -lo;
    if (lo === hi) { lo -= 0.5; hi += 0.5; }
    norm = normaliser(lo, hi, twoSlope);
  }
  // colour level of a value: LEVELS bands, and LEVELS itself for a value that is not a number
  const level = (v: number): number => (Number.isFinite(v) ? Math.min(LEVELS - 1, Math.max(0, Math.floor(norm(v) * LEVELS))) : LEVELS);
  return { lo, hi, twoSlope, norm, level };
}

/** Colour of a level of valueScale. */
export const levelColor = (twoSlope: boolean, k: number): string => colorAt(twoSlope ? diverging : sequential, k === LEVELS ? NaN : (k + 0.5) / LEVELS);
export { LEVELS };

/** The picture of a field on the mesh, as SVG text; layers: only these layers (by id), on a transparent page. */
export function fieldSvg(p: FieldPicture, layers?: Set<string>): string {
  const mesh = p.mesh, nv = vertexCount(mesh), nc = cellCount(mesh);
  const { cellStart, cellVerts } = mesh;
  const L = fieldLayout(p);
  const { W, H, u, pad, mag, sx, sy, move, X, Y, s, bw, midX, midY, oy, bodyH, footY, capY, horizontalBar, hasBar, vBarW, captionLines } = L;
  const fs = 16 * u; // label font size: readable when the picture spans an A4 text width
  const want = (id: string): boolean => !layers || layers.has(id);
  void mag;
  const cellPath = (c: number): string => {
    let d = '';
    for (let q = cellStart[c]; q < cellStart[c + 1]; q++) d += (q === cellStart[c] ? 'M' : 'L') + n1(sx[cellVerts[q]]) + ' ' + n1(sy[cellVerts[q]]);
    return d + 'Z';
  };

  const body: string[] = [];
  if (p.title && want('title')) body.push(layer('title', [text(pad, pad + 22 * u, p.title, { 'font-size': 22 * u, 'font-weight': 'bold', fill: INK })]));

  // cells: one path per colour level keeps 50k cells small and fast
  const cells: string[] = [];
  const { lo, hi, twoSlope, norm, level } = valueScale(p);
  const map = twoSlope ? diverging : sequential;
  if (want('cells')) {
    if (p.values) {
      const buckets: string[][] = Array.from({ length: LEVELS + 1 }, () => []);
      for (let c = 0; c < nc; c++) buckets[level(p.values[c])].push(cellPath(c));
      for (let k = 0; k <= LEVELS; k++) {
        if (!buckets[k].length) continue;
        const col = levelColor(twoSlope, k);
        // a hairline stroke in the fill colour closes anti-aliasing seams between neighbours
        cells.push(el('path', { d: buckets[k].join(''), fill: col, stroke: col, 'stroke-width': 0.6 * u, 'stroke-linejoin': 'round', class: `level-${k}` }));
      }
    } else {
      const all: string[] = [];
      for (let c = 0; c < nc; c++) all.push(cellPath(c));
      cells.push(el('path', { d: all.join(''), fill: NO_VALUES }));
    }
    body.push(layer('cells', cells));
  }

  // the mesh's lines only when a layer draws them (the shared layers of a frame do not)
  const lines = want('undeformed') || want('mesh') || want('outline') ? meshLines(p, L) : { undeformed: [], inner: [], outline: [] };
  const pathOf = (ls: Float64Array[]): string => ls.map((l) => polyPath(l, false)).join('');
  if (p.displacement && want('undeformed')) {
    body.push(layer('undeformed', [el('path', { d: pathOf(lines.undeformed), fill: 'none', stroke: UNDEFORMED, 'stroke-width': 1 * u, 'stroke-dasharray': `${n(5 * u)} ${n(3.5 * u)}` })]));
  }
  const meshStroke = p.values ? { stroke: '#000000', 'stroke-opacity': MESH_ON_VALUES.opacity, 'stroke-width': MESH_ON_VALUES.width * u } : { stroke: MESH_PLAIN.color, 'stroke-width': MESH_PLAIN.width * u };
  if (want('mesh')) body.push(layer('mesh', lines.inner.length ? [el('path', { d: pathOf(lines.inner), fill: 'none', 'stroke-linejoin': 'round', ...meshStroke })] : []));
  if (want('outline')) body.push(layer('outline', [el('path', { d: pathOf(lines.outline), fill: 'none', stroke: INK, 'stroke-width': 1.3 * u, 'stroke-linejoin': 'round' })]));

  // cohesive segments, bucketed by damage
  const coh: string[] = [];
  if (p.cohesive?.length && want('cohesive')) {
    const buckets: string[][] = Array.from({ length: 16 }, () => []);
    const halo: string[] = [];
    for (const c of p.cohesive) {
      const [ax, ay] = move(c.x1, c.y1), [bx, by] = move(c.x2, c.y2);
      const seg = `M${n1(X(ax))} ${n1(Y(ay))}L${n1(X(bx))} ${n1(Y(by))}`;
      halo.push(seg);
      buckets[damageLevel(c.damage)].push(seg);
    }
    coh.push(el('path', { d: halo.join(''), fill: 'none', stroke: '#ffffff', 'stroke-width': 6 * u, 'stroke-linecap': 'round', opacity: 0.85 }));
    buckets.forEach((b, k) => {
      if (b.length) coh.push(el('path', { d: b.join(''), fill: 'none', stroke: colorAt(damageMap, (k + 0.5) / 16), 'stroke-width': 3.4 * u, 'stroke-linecap': 'round', class: `damage-${k}` }));
    });
  }

  // cracks and notches: dark polylines with a white halo so they read on any colour
  const cracks: string[] = [];
  for (const c of want('cracks') ? screenCracks(p, L) : []) {
    const d = polyPath(c.pts);
    const st = crackStyle(c.kind);
    cracks.push(el('g', { class: c.kind }, [
      el('path', { d, fill: 'none', stroke: '#ffffff', 'stroke-width': st.halo * u, 'stroke-linecap': 'round', 'stroke-linejoin': 'round', opacity: 0.85 }),
      el('path', { d, fill: 'none', stroke: st.color, 'stroke-width': st.width * u, 'stroke-linecap': 'round', 'stroke-linejoin': 'round' }),
    ]));
  }
  if (want('cracks')) body.push(layer('cracks', cracks));
  if (want('cohesive')) body.push(layer('cohesive', coh));

  if (want('supports')) body.push(layer('supports', supportPlaces(p, L).map((q) => supportSymbol(q.x, q.y, q.fix, q.angle, u))));
  if (want('loads')) body.push(layer('loads', loadArrows(p, L).map((a) => arrow(a, u, INK))));

  // colour bar
  const bar: string[] = [];
  if (p.values && want('colorbar')) {
    const ticks = barTicks(lo, hi, twoSlope), labels = formatTicks(ticks);
    const label = p.valueLabel ?? 'value';
    const tickAt = (v: number): number => Math.min(1, Math.max(0, norm(v)));
    if (horizontalBar) {
      const x0 = pad + 16 * u, y0 = footY + 24 * u, len = Math.min(420 * u, W * 0.45), th = 14 * u;
      bar.push(text(pad, y0 - 8 * u, label, { 'font-size': fs, fill: INK }));
      for (let k = 0; k < LEVELS; k++) bar.push(el('rect', { x: x0 + (k * len) / LEVELS, y: y0, width: len / LEVELS + 0.5 * u, height: th, fill: colorAt(map, (k + 0.5) / LEVELS) }));
      bar.push(el('rect', { x: x0, y: y0, width: len, height: th, fill: 'none', stroke: INK, 'stroke-width': 0.8 * u }));
      ticks.forEach((v, i) => {
        const x = x0 + tickAt(v) * len;
        bar.push(el('path', { d: `M${n(x)} ${n(y0 + th)}v${n(4 * u)}`, stroke: INK, 'stroke-width': 0.9 * u }));
        bar.push(text(x, y0 + th + 18 * u, labels[i], { 'font-size': 14 * u, 'text-anchor': 'middle', fill: INK }));
      });
    } else {
      const x0 = W - pad - vBarW + 20 * u, y0 = oy + 26 * u, len = Math.max(140 * u, Math.min(bodyH * 0.85 - 26 * u, 520 * u)), tw = 16 * u;
      bar.push(text(x0, y0 - 10 * u, label, { 'font-size': fs, fill: INK }));
      for (let k = 0; k < LEVELS; k++) bar.push(el('rect', { x: x0, y: y0 + len - ((k + 1) * len) / LEVELS, width: tw, height: len / LEVELS + 0.5 * u, fill: colorAt(map, (k + 0.5) / LEVELS) }));
      bar.push(el('rect', { x: x0, y: y0, width: tw, height: len, fill: 'none', stroke: INK, 'stroke-width': 0.8 * u }));
      ticks.forEach((v, i) => {
        const y = y0 + len - tickAt(v) * len;
        bar.push(el('path', { d: `M${n(x0 + tw)} ${n(y)}h${n(4 * u)}`, stroke: INK, 'stroke-width': 0.9 * u }));
        bar.push(text(x0 + tw + 8 * u, y + 5 * u, labels[i], { 'font-size': 14 * u, fill: INK }));
      });
    }
  }
  if (want('colorbar')) body.push(layer('colorbar', bar));

  // damage key for the cohesive segments
  if (p.cohesive?.length && want('damagebar')) {
    const len = 120 * u, x0 = horizontalBar && hasBar ? pad + Math.min(420 * u, W * 0.45) + 70 * u : pad + 8 * u, y0 = footY + 24 * u;
    const key: string[] = [text(x0, y0 - 8 * u, 'cohesive damage', { 'font-size': 14 * u, fill: INK })];
    for (let k = 0; k < 16; k++) key.push(el('rect', { x: x0 + (k * len) / 16, y: y0, width: len / 16 + 0.5 * u, height: 8 * u, fill: colorAt(damageMap, (k + 0.5) / 16) }));
    key.push(text(x0, y0 + 26 * u, '0', { 'font-size': 13 * u, fill: INK, 'text-anchor': 'middle' }));
    key.push(text(x0 + len, y0 + 26 * u, '1', { 'font-size': 13 * u, fill: INK, 'text-anchor': 'middle' }));
    body.push(layer('damagebar', key));
  }

  // the inset takes the right of the foot; the scale bar then moves to a second row on the left
  const [ix, iy, iw, ih] = L.insetBox;
  if (p.inset && want('inset')) body.push(curveInsetSvg(p.inset, ix, iy, iw, ih, u, layers && !layers.has('inset-dynamic') ? 'static' : 'all'));

  // scale bar in model millimetres
  if (want('scalebar')) {
    const Lmm = roundDown125(bw * 0.22);
    const Lpx = Lmm * s, sbh = 7 * u;
    const sbx = p.inset ? pad + 16 * u : W - pad - Lpx, sby = p.inset ? footY + 110 * u : footY + 24 * u;
    body.push(layer('scalebar', [
      el('rect', { x: sbx, y: sby, width: Lpx / 2, height: sbh, fill: INK }),
      el('rect', { x: sbx + Lpx / 2, y: sby, width: Lpx / 2, height: sbh, fill: '#ffffff', stroke: INK, 'stroke-width': 0.9 * u }),
      el('rect', { x: sbx, y: sby, width: Lpx, height: sbh, fill: 'none', stroke: INK, 'stroke-width': 0.9 * u }),
      text(sbx + Lpx / 2, sby + sbh + 18 * u, `${formatValue(Lmm, 3).replace('−', '-')} mm`, { 'font-size': 14 * u, 'text-anchor': 'middle', fill: INK }),
    ]));
  }

  if (want('caption')) body.push(layer('caption', captionLines.map((line, i) => text(pad, capY + (i + 0.8) * 22 * u, line, { 'font-size': 15 * u, fill: MUTED }))));

  return svgDocument(W, H, body, { title: p.title, background: layers ? 'none' : undefined });
}

/** The mesh alone (for a mesh preview): white-grey cells with their edges, plus the same annotations as fieldSvg. */
export function meshSvg(mesh: PolyMesh, opts: Omit<FieldPicture, 'mesh' | 'values' | 'valueLabel' | 'range' | 'diverging' | 'showMesh'> = {}): string {
  const caption = opts.caption ?? [`${cellCount(mesh)} polygons, ${vertexCount(mesh)} vertices.`];
  return fieldSvg({ ...opts, mesh, showMesh: true, caption });
}
