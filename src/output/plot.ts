// x–y charts (load–opening curves and the like) as SVG text.

import { el, esc, layer, n, n1, svgDocument, text } from './svg.js';
import { formatTicks, niceAxis } from './ticks.js';

export interface Series {
  label: string;
  x: ArrayLike<number>;
  y: ArrayLike<number>;
  style?: 'line' | 'points' | 'dashed' | 'band';
  color?: string;
  /** Upper edge of a band (style 'band'; y is the lower edge). */
  y2?: ArrayLike<number>;
}

export interface PlotOptions {
  series: Series[];
  /** Axis titles with units, e.g. "CMOD (mm)". */
  xLabel: string;
  yLabel: string;
  title?: string;
  marks?: { x: number; y: number; label: string }[];
  widthPx?: number;
  heightPx?: number;
}

/** Our qualitative palette: distinct in hue and in lightness. */
export const PALETTE = ['#1d4e89', '#c4452d', '#2b8a6e', '#d19a1f', '#6b4c9a', '#505a64'];

const INK = '#1b1b1b';

/** Axis range from data: round ends, and zero included when the data start close to it. */
function axisFor(min: number, max: number, maxCount: number): { lo: number; hi: number; ticks: number[] } {
  if (!(max >= min)) return niceAxis(0, 1, maxCount);
  if (min >= 0 && min < 0.3 * max) min = 0;
  if (max <= 0 && max > 0.3 * min) max = 0;
  return niceAxis(min, max, maxCount);
}

/** A chart of one or more series as SVG text. */
export function plotSvg(opts: PlotOptions): string {
  const W = opts.widthPx ?? 1000, H = opts.heightPx ?? Math.round(W * 0.62);
  return svgDocument(W, H, plotLayers(opts, W, H, W / 1000, ''), { title: opts.title });
}

export interface PanelOptions {
  panels: PlotOptions[];
  /** Over all panels. */
  title?: string;
  /** Whole picture; panels share it evenly. */
  widthPx?: number;
  heightPx?: number;
}

/** Charts side by side in one picture (each keeps its own axes and legend; layer ids carry a panel prefix). */
export function plotPanelsSvg(opts: PanelOptions): string {
  const k = Math.max(1, opts.panels.length);
  // 600 px per panel at unit scale: two panels read well at a page's width
  const base = 600 * Math.min(k, 2), W = opts.widthPx ?? base, u = W / base;
  const pw = W / k, titleH = opts.title ? 44 * u : 0;
  const H = opts.heightPx ?? Math.round(titleH + pw * (k > 1 ? 0.78 : 0.62));
  const body: string[] = [];
  if (opts.title) body.push(layer('title', [text(30 * u, 32 * u, opts.title, { 'font-size': 22 * u, 'font-weight': 'bold', fill: INK })]));
  opts.panels.forEach((p, i) => {
    body.push(el('g', { id: `panel-${i + 1}`, class: 'panel', transform: `translate(${n(i * pw)} ${n(titleH)})` }, plotLayers(p, pw, H - titleH, u, `p${i + 1}-`)));
  });
  return svgDocument(W, H, body, { title: opts.title });
}

/** The layers of one chart in a W × H box; u scales lines and fonts, idp prefixes ids. */
function plotLayers(opts: PlotOptions, W: number, H: number, u: number, idp: string): string[] {
  const fs = 16 * u;

  let xmin = Infinity, xmax = -Infinity, ymin = Infinity, ymax = -Infinity;
  const take = (x: number, y: number): void => {
    if (!Number.isFinite(x) || !Number.isFinite(y)) return;
    if (x < xmin) xmin = x; if (x > xmax) xmax = x;
    if (y < ymin) ymin = y; if (y > ymax) ymax = y;
  };
  for (const s of opts.series) for (let i = 0; i < Math.min(s.x.length, s.y.length); i++) { take(s.x[i], s.y[i]); if (s.y2) take(s.x[i], s.y2[i]); }
  for (const m of opts.marks ?? []) take(m.x, m.y);
  // headroom above the highest point, so a peak never sits on the frame
  if (ymax > 0 && ymax > ymin) ymax += 0.04 * (ymax - Math.min(0, ymin));
  const ax = axisFor(xmin, xmax, Math.max(3, Math.min(8, Math.round(W / (100 * u))))), ay = axisFor(ymin, ymax, 7);
  const xl = formatTicks(ax.ticks), yl = formatTicks(ay.ticks);

  const labelW = Math.max(...yl.map((s) => s.length)) * 0.62 * 14 * u;
  const left = 30 * u + fs + labelW + 16 * u, right = 30 * u;
  const top = opts.title ? 58 * u : 24 * u, bottom = 36 * u + 14 * u + fs + 24 * u;
  const pw = W - left - right, ph = H - top - bottom;
  const X = (x: number): number => left + ((x - ax.lo) / (ax.hi - ax.lo)) * pw;
  const Y = (y: number): number => top + ph - ((y - ay.lo) / (ay.hi - ay.lo)) * ph;

  const body: string[] = [];
  body.push(el('defs', undefined, el('clipPath', { id: `${idp}plot-area` }, el('rect', { x: left, y: top, width: pw, height: ph }))));
  if (opts.title) body.push(layer(`${idp}title`, [text(left, 34 * u, opts.title, { 'font-size': (idp ? 18 : 22) * u, 'font-weight': 'bold', fill: INK })]));

  // grid, zero lines, frame, ticks and labels
  const axes: string[] = [];
  let grid = '';
  for (const t of ax.ticks) grid += `M${n1(X(t))} ${n1(top)}v${n1(ph)}`;
  for (const t of ay.ticks) grid += `M${n1(left)} ${n1(Y(t))}h${n1(pw)}`;
  axes.push(el('path', { d: grid, stroke: '#e3e6ea', 'stroke-width': 1 * u, fill: 'none', class: 'grid' }));
  let zero = '';
  if (ax.lo < 0 && ax.hi > 0) zero += `M${n1(X(0))} ${n1(top)}v${n1(ph)}`;
  if (ay.lo < 0 && ay.hi > 0) zero += `M${n1(left)} ${n1(Y(0))}h${n1(pw)}`;
  if (zero) axes.push(el('path', { d: zero, stroke: '#8c939b', 'stroke-width': 1.1 * u, fill: 'none', class: 'zero' }));
  axes.push(el('rect', { x: left, y: top, width: pw, height: ph, fill: 'none', stroke: INK, 'stroke-width': 1.1 * u }));
  let tk = '';
  for (const t of ax.ticks) tk += `M${n1(X(t))} ${n1(top + ph)}v${n1(6 * u)}`;
  for (const t of ay.ticks) tk += `M${n1(left)} ${n1(Y(t))}h${n1(-6 * u)}`;
  axes.push(el('path', { d: tk, stroke: INK, 'stroke-width': 1.1 * u, fill: 'none' }));
  ax.ticks.forEach((t, i) => axes.push(text(X(t), top + ph + 26 * u, xl[i], { 'font-size': 14 * u, 'text-anchor': 'middle', fill: INK })));
  ay.ticks.forEach((t, i) => axes.push(text(left - 11 * u, Y(t) + 5 * u, yl[i], { 'font-size': 14 * u, 'text-anchor': 'end', fill: INK })));
  axes.push(text(left + pw / 2, H - 20 * u, opts.xLabel, { 'font-size': fs, 'text-anchor': 'middle', fill: INK, class: 'x-label' }));
  const yx = 18 * u + fs * 0.5, yy = top + ph / 2;
  axes.push(text(0, 0, opts.yLabel, { 'font-size': fs, 'text-anchor': 'middle', fill: INK, class: 'y-label', transform: `translate(${n(yx)} ${n(yy)}) rotate(-90)` }));
  body.push(layer(`${idp}axes`, axes));

  // series
  const ser: string[] = [];
  opts.series.forEach((s, k) => {
    const color = s.color ?? PALETTE[k % PALETTE.length];
    const m = Math.min(s.x.length, s.y.length);
    if (s.style === 'band' && s.y2) {
      // a filled band between y and y2: along the upper edge, back along the lower one
      let d = '';
      const y2 = s.y2;
      for (let i = 0; i < m; i++) if (Number.isFinite(s.x[i]) && Number.isFinite(y2[i])) d += (d ? 'L' : 'M') + n1(X(s.x[i])) + ' ' + n1(Y(y2[i]));
      for (let i = m - 1; i >= 0; i--) if (Number.isFinite(s.x[i]) && Number.isFinite(s.y[i])) d += 'L' + n1(X(s.x[i])) + ' ' + n1(Y(s.y[i]));
      if (d) ser.push(el('path', { d: d + 'Z', fill: color, 'fill-opacity': 0.18, stroke: 'none', class: 'series band', 'data-label': s.label }));
    } else if (s.style === 'points') {
      const dots: string[] = [];
      for (let i = 0; i < m; i++) {
        if (!Number.isFinite(s.x[i]) || !Number.isFinite(s.y[i])) continue;
        dots.push(el('circle', { cx: X(s.x[i]), cy: Y(s.y[i]), r: 3.6 * u }));
      }
      ser.push(el('g', { class: 'series', fill: color, stroke: '#ffffff', 'stroke-width': 0.8 * u, 'data-label': s.label }, dots));
    } else {
      let d = '', pen = false;
      for (let i = 0; i < m; i++) {
        const x = s.x[i], y = s.y[i];
        if (!Number.isFinite(x) || !Number.isFinite(y)) { pen = false; continue; }
        d += (pen ? 'L' : 'M') + n1(X(x)) + ' ' + n1(Y(y));
        pen = true;
      }
      ser.push(el('path', {
        d: d || `M${n1(left)} ${n1(top)}`, fill: 'none', stroke: color, 'stroke-width': 2.4 * u, 'stroke-linejoin': 'round', 'stroke-linecap': 'round',
        'stroke-dasharray': s.style === 'dashed' ? `${n(8 * u)} ${n(5 * u)}` : undefined, class: 'series', 'data-label': s.label,
      }));
    }
  });
  body.push(layer(`${idp}series`, ser, { 'clip-path': `url(#${idp}plot-area)` }));

  // legend in the emptiest corner
  const leg: string[] = [];
  if (opts.series.length > 1) {
    const rowH = 24 * u, lw = 44 * u + Math.max(...opts.series.map((s) => s.label.length)) * 0.6 * 14 * u;
    const lh = opts.series.length * rowH + 12 * u, m = 12 * u;
    const corners: [number, number][] = [[left + pw - lw - m, top + m], [left + m, top + m], [left + pw - lw - m, top + ph - lh - m], [left + m, top + ph - lh - m]];
    let best = 0, bestCount = Infinity;
    corners.forEach(([cx, cy], c) => {
      let cnt = 0;
      for (const s of opts.series) for (let i = 0; i < Math.min(s.x.length, s.y.length); i++) {
        const px = X(s.x[i]), py = Y(s.y[i]);
        if (px >= cx - m && px <= cx + lw + m && py >= cy - m && py <= cy + lh + m) cnt++;
      }
      if (cnt < bestCount) { bestCount = cnt; best = c; }
    });
    const [lx, ly] = corners[best];
    leg.push(el('rect', { x: lx, y: ly, width: lw, height: lh, fill: '#ffffff', 'fill-opacity': 0.92, stroke: '#c5cad0', 'stroke-width': 1 * u, rx: 3 * u }));
    opts.series.forEach((s, k) => {
      const color = s.color ?? PALETTE[k % PALETTE.length];
      const y = ly + 6 * u + (k + 0.5) * rowH;
      if (s.style === 'points') leg.push(el('circle', { cx: lx + 24 * u, cy: y, r: 4 * u, fill: color }));
      else if (s.style === 'band') leg.push(el('rect', { x: lx + 10 * u, y: y - 7 * u, width: 28 * u, height: 14 * u, fill: color, 'fill-opacity': 0.18 }));
      else leg.push(el('path', { d: `M${n(lx + 10 * u)} ${n(y)}h${n(28 * u)}`, stroke: color, 'stroke-width': 2.6 * u, 'stroke-dasharray': s.style === 'dashed' ? `${n(7 * u)} ${n(4 * u)}` : undefined }));
      leg.push(text(lx + 46 * u, y + 5 * u, s.label, { 'font-size': 14 * u, fill: INK }));
    });
  }
  body.push(layer(`${idp}legend`, leg));

  // marked points with labels kept inside the plot area
  const marks: string[] = [];
  for (const mk of opts.marks ?? []) {
    if (!Number.isFinite(mk.x) || !Number.isFinite(mk.y)) continue;
    const px = X(mk.x), py = Y(mk.y);
    const tw = mk.label.length * 0.6 * 14 * u;
    const rightSide = px + 12 * u + tw < left + pw - 4 * u;
    const above = py - 30 * u > top;
    const tx = rightSide ? px + 12 * u : px - 12 * u, ty = above ? py - 12 * u : py + 24 * u;
    marks.push(el('g', { class: 'mark' }, [
      el('circle', { cx: px, cy: py, r: 5.5 * u, fill: '#ffffff', stroke: INK, 'stroke-width': 1.8 * u }),
      el('text', { x: tx, y: ty, 'font-size': 14 * u, fill: INK, 'text-anchor': rightSide ? 'start' : 'end', stroke: '#ffffff', 'stroke-width': 4 * u, 'paint-order': 'stroke', 'stroke-linejoin': 'round' }, esc(mk.label)),
    ]));
  }
  body.push(layer(`${idp}marks`, marks));
  return body;
}
