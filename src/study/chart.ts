// A chart for many curves at once: thin lines without legend entries, a filled band,
// labelled lines and points, optional log axes (decades). Built from the project's SVG
// and tick helpers so it looks like the run pictures.
import { el, esc, layer, n1, svgDocument, text } from '../output/svg.js';
import { formatTicks, niceAxis } from '../output/ticks.js';

export interface ChartLine { x: ArrayLike<number>; y: ArrayLike<number>; label?: string; color: string; width?: number; dashed?: boolean; opacity?: number }
export interface ChartBand { x: ArrayLike<number>; lo: ArrayLike<number>; hi: ArrayLike<number>; label: string; color: string }
export interface ChartPoints { x: ArrayLike<number>; y: ArrayLike<number>; label: string; color: string }
export interface ChartBars { edges: number[]; counts: number[]; label: string; color: string }

export interface Chart {
  title?: string; xLabel: string; yLabel: string;
  lines?: ChartLine[]; bands?: ChartBand[]; points?: ChartPoints[]; bars?: ChartBars[];
  log?: boolean;
  widthPx?: number; heightPx?: number;
  note?: string;
}

const INK = '#1b1b1b';

function logTicks(lo: number, hi: number): number[] {
  const out: number[] = [];
  for (let e = Math.floor(lo); e <= Math.ceil(hi); e++) for (const m of [1, 2, 5]) {
    const v = Math.log10(m) + e;
    if (v >= lo - 1e-9 && v <= hi + 1e-9) out.push(v);
  }
  return out;
}

export function chartSvg(c: Chart): string {
  const W = c.widthPx ?? 1000, H = c.heightPx ?? Math.round(W * 0.62), u = W / 1000;
  const tx = (v: number) => (c.log ? Math.log10(v) : v);
  let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity;
  const take = (x: number, y: number) => {
    const a = tx(x), b = tx(y);
    if (!Number.isFinite(a) || !Number.isFinite(b)) return;
    x0 = Math.min(x0, a); x1 = Math.max(x1, a); y0 = Math.min(y0, b); y1 = Math.max(y1, b);
  };
  for (const l of c.lines ?? []) for (let i = 0; i < l.x.length; i++) take(l.x[i]!, l.y[i]!);
  for (const b of c.bands ?? []) for (let i = 0; i < b.x.length; i++) { take(b.x[i]!, b.lo[i]!); take(b.x[i]!, b.hi[i]!); }
  for (const p of c.points ?? []) for (let i = 0; i < p.x.length; i++) take(p.x[i]!, p.y[i]!);
  for (const b of c.bars ?? []) { take(b.edges[0]!, 0); take(b.edges[b.edges.length - 1]!, Math.max(...b.counts)); }
  if (!(x1 > x0)) { x0 -= 1; x1 += 1; }
  if (!(y1 > y0)) { y0 -= 1; y1 += 1; }
  let ax, ay;
  if (c.log) {
    const px = 0.04 * (x1 - x0), py = 0.06 * (y1 - y0);
    ax = { lo: x0 - px, hi: x1 + px, ticks: logTicks(x0 - px, x1 + px) };
    ay = { lo: y0 - py, hi: y1 + py, ticks: logTicks(y0 - py, y1 + py) };
  } else {
    if (y0 >= 0 && y0 < 0.3 * y1) y0 = 0;
    ax = niceAxis(x0 >= 0 && x0 < 0.3 * x1 ? 0 : x0, x1, 7); ay = niceAxis(y0, y1 + 0.04 * (y1 - y0), 7);
  }
  const fmt = (ts: number[]) => (c.log ? ts.map((t) => { const v = 10 ** t; return String(+v.toPrecision(2)); }) : formatTicks(ts));
  const xl = fmt(ax.ticks), yl = fmt(ay.ticks);
  const fs = 16 * u, labelW = Math.max(...yl.map((s) => s.length)) * 0.62 * 14 * u;
  const left = 30 * u + fs + labelW + 16 * u, right = 30 * u, top = c.title ? 58 * u : 24 * u, bottom = 74 * u + fs + (c.note ? 22 * u : 0);
  const pw = W - left - right, ph = H - top - bottom;
  const X = (x: number) => left + ((tx(x) - ax.lo) / (ax.hi - ax.lo)) * pw;
  const Y = (y: number) => top + ph - ((tx(y) - ay.lo) / (ay.hi - ay.lo)) * ph;
  const body: string[] = [el('defs', undefined, el('clipPath', { id: 'plot-area' }, el('rect', { x: left, y: top, width: pw, height: ph })))];
  if (c.title) body.push(layer('title', [text(left, 34 * u, c.title, { 'font-size': Math.min(22 * u, (W - left - 20 * u) / (0.62 * c.title.length)), 'font-weight': 'bold', fill: INK })]));
  const axes: string[] = [];
  let grid = '', tk = '';
  for (const t of ax.ticks) { const p = left + ((t - ax.lo) / (ax.hi - ax.lo)) * pw; grid += `M${n1(p)} ${n1(top)}v${n1(ph)}`; tk += `M${n1(p)} ${n1(top + ph)}v${n1(6 * u)}`; }
  for (const t of ay.ticks) { const p = top + ph - ((t - ay.lo) / (ay.hi - ay.lo)) * ph; grid += `M${n1(left)} ${n1(p)}h${n1(pw)}`; tk += `M${n1(left)} ${n1(p)}h${n1(-6 * u)}`; }
  axes.push(el('path', { d: grid, stroke: '#e3e6ea', 'stroke-width': u, fill: 'none', class: 'grid' }));
  axes.push(el('rect', { x: left, y: top, width: pw, height: ph, fill: 'none', stroke: INK, 'stroke-width': 1.1 * u }));
  axes.push(el('path', { d: tk, stroke: INK, 'stroke-width': 1.1 * u, fill: 'none' }));
  ax.ticks.forEach((t, i) => axes.push(text(left + ((t - ax.lo) / (ax.hi - ax.lo)) * pw, top + ph + 26 * u, xl[i]!, { 'font-size': 14 * u, 'text-anchor': 'middle', fill: INK })));
  ay.ticks.forEach((t, i) => axes.push(text(left - 11 * u, top + ph - ((t - ay.lo) / (ay.hi - ay.lo)) * ph + 5 * u, yl[i]!, { 'font-size': 14 * u, 'text-anchor': 'end', fill: INK })));
  axes.push(text(left + pw / 2, top + ph + 58 * u, c.xLabel, { 'font-size': fs, 'text-anchor': 'middle', fill: INK, class: 'x-label' }));
  axes.push(text(0, 0, c.yLabel, { 'font-size': fs, 'text-anchor': 'middle', fill: INK, class: 'y-label', transform: `translate(${n1(18 * u + fs / 2)} ${n1(top + ph / 2)}) rotate(-90)` }));
  if (c.note) axes.push(text(left, H - 14 * u, c.note, { 'font-size': 13 * u, fill: '#505a64', class: 'note' }));
  body.push(layer('axes', axes));

  const data: string[] = [];
  for (const b of c.bars ?? []) {
    const rects: string[] = [];
    b.counts.forEach((k, i) => { if (k > 0) rects.push(el('rect', { x: X(b.edges[i]!), y: Y(k), width: Math.max(0, X(b.edges[i + 1]!) - X(b.edges[i]!) - u), height: Y(0) - Y(k) })); });
    data.push(el('g', { class: 'bars', fill: b.color, 'fill-opacity': 0.55, 'data-label': b.label }, rects));
  }
  for (const b of c.bands ?? []) {
    let d = '';
    for (let i = 0; i < b.x.length; i++) d += `${i ? 'L' : 'M'}${n1(X(b.x[i]!))} ${n1(Y(b.hi[i]!))}`;
    for (let i = b.x.length - 1; i >= 0; i--) d += `L${n1(X(b.x[i]!))} ${n1(Y(b.lo[i]!))}`;
    data.push(el('path', { d: d + 'Z', fill: b.color, 'fill-opacity': 0.22, stroke: 'none', class: 'band', 'data-label': b.label }));
  }
  for (const l of c.lines ?? []) {
    let d = '', pen = false;
    for (let i = 0; i < l.x.length; i++) {
      const px = X(l.x[i]!), py = Y(l.y[i]!);
      if (!Number.isFinite(px) || !Number.isFinite(py)) { pen = false; continue; }
      d += `${pen ? 'L' : 'M'}${n1(px)} ${n1(py)}`; pen = true;
    }
    if (d) data.push(el('path', { d, fill: 'none', stroke: l.color, 'stroke-width': (l.width ?? 2.4) * u, 'stroke-opacity': l.opacity, 'stroke-linejoin': 'round', 'stroke-dasharray': l.dashed ? `${n1(8 * u)} ${n1(5 * u)}` : undefined, class: l.label ? 'series' : 'curve', 'data-label': l.label }));
  }
  for (const p of c.points ?? []) {
    const dots: string[] = [];
    for (let i = 0; i < p.x.length; i++) { const px = X(p.x[i]!), py = Y(p.y[i]!); if (Number.isFinite(px) && Number.isFinite(py)) dots.push(el('circle', { cx: px, cy: py, r: 4.5 * u })); }
    data.push(el('g', { class: 'points', fill: p.color, stroke: '#ffffff', 'stroke-width': u, 'data-label': p.label }, dots));
  }
  body.push(layer('data', data, { 'clip-path': 'url(#plot-area)' }));

  const entries: { label: string; color: string; kind: 'line' | 'dashed' | 'band' | 'point' }[] = [
    ...(c.bars ?? []).map((b) => ({ label: b.label, color: b.color, kind: 'band' as const })),
    ...(c.bands ?? []).map((b) => ({ label: b.label, color: b.color, kind: 'band' as const })),
    ...(c.lines ?? []).filter((l) => l.label).map((l) => ({ label: l.label!, color: l.color, kind: l.dashed ? 'dashed' as const : 'line' as const })),
    ...(c.points ?? []).map((p) => ({ label: p.label, color: p.color, kind: 'point' as const })),
  ];
  if (entries.length) {
    const rowH = 24 * u, lw = 52 * u + Math.max(...entries.map((e) => e.label.length)) * 0.6 * 14 * u, lh = entries.length * rowH + 12 * u;
    const lx = left + pw - lw - 12 * u, ly = top + 12 * u;
    const leg = [el('rect', { x: lx, y: ly, width: lw, height: lh, fill: '#ffffff', 'fill-opacity': 0.92, stroke: '#c5cad0', 'stroke-width': u, rx: 3 * u })];
    entries.forEach((e, k) => {
      const y = ly + 6 * u + (k + 0.5) * rowH;
      if (e.kind === 'point') leg.push(el('circle', { cx: lx + 24 * u, cy: y, r: 4.5 * u, fill: e.color }));
      else if (e.kind === 'band') leg.push(el('rect', { x: lx + 10 * u, y: y - 7 * u, width: 28 * u, height: 14 * u, fill: e.color, 'fill-opacity': 0.35 }));
      else leg.push(el('path', { d: `M${n1(lx + 10 * u)} ${n1(y)}h${n1(28 * u)}`, stroke: e.color, 'stroke-width': 2.6 * u, 'stroke-dasharray': e.kind === 'dashed' ? `${n1(7 * u)} ${n1(4 * u)}` : undefined }));
      leg.push(text(lx + 46 * u, y + 5 * u, e.label, { 'font-size': 14 * u, fill: INK }));
    });
    body.push(layer('legend', leg));
  }
  return svgDocument(W, H, body, { title: c.title });
}
