// A small load–opening chart drawn inside a frame, marking the state the frame shows.

import { el, layer, n, n1, text } from './svg.js';
import { formatTicks, niceAxis } from './ticks.js';

export interface CurveInset {
  /** Opening (mm) and load (N) of every step of the run (the axes span them all). */
  x: ArrayLike<number>;
  y: ArrayLike<number>;
  /** Index of the state the frame shows (default: the last point). */
  current?: number;
  xLabel: string;
  yLabel: string;
  /** Axis ends known in advance (e.g. the control target), so the axes stay put from frame to frame. */
  xMax?: number;
  yMax?: number;
}

const INK = '#1b1b1b';
const LINE = '#1d4e89';
const NOW = '#c4452d';

/** Axis over [0, max] or the data's span, with few ticks. */
function insetAxis(v: ArrayLike<number>, known: number | undefined, maxTicks: number): { lo: number; hi: number; ticks: number[] } {
  let lo = 0, hi = 0;
  for (let i = 0; i < v.length; i++) if (Number.isFinite(v[i])) { if (v[i] < lo) lo = v[i]; if (v[i] > hi) hi = v[i]; }
  if (known !== undefined && known > hi) hi = known;
  if (!(hi > lo)) hi = lo + 1;
  return niceAxis(lo, hi, maxTicks);
}

/** Where the inset's axes go: data to screen, the plot box, and the state shown. */
export function insetGeometry(p: CurveInset, x0: number, y0: number, w: number, h: number, u: number) {
  const m = Math.min(p.x.length, p.y.length);
  const ax = insetAxis(p.x, p.xMax, 4), ay = insetAxis(p.y, p.yMax, 6);
  const xl = formatTicks(ax.ticks), yl = formatTicks(ay.ticks);
  const fs = 12 * u;
  const labelW = Math.max(...yl.map((s) => s.length)) * 0.6 * fs;
  const left = x0 + 10 * u + fs + labelW + 8 * u, right = x0 + w - 20 * u;
  const top = y0 + 10 * u, bottom = y0 + h - 10 * u - 2 * fs - 6 * u;
  const X = (x: number): number => left + ((x - ax.lo) / (ax.hi - ax.lo)) * (right - left);
  // the axis top sits a little below the frame, so a peak on it stays clear of the border
  const yTop = top + 9 * u;
  const Y = (y: number): number => bottom - ((y - ay.lo) / (ay.hi - ay.lo)) * (bottom - yTop);
  const k = Math.min(m - 1, p.current ?? m - 1);
  /** Screen polylines of the points from..to-1 (a gap where a value is not finite). */
  const lines = (from: number, to: number): number[][] => {
    const out: number[][] = [];
    let cur: number[] | null = null;
    for (let i = from; i < to; i++) {
      if (!Number.isFinite(p.x[i]) || !Number.isFinite(p.y[i])) { cur = null; continue; }
      if (!cur) { cur = []; out.push(cur); }
      cur.push(X(p.x[i]), Y(p.y[i]));
    }
    return out;
  };
  const now = k >= 0 && Number.isFinite(p.x[k]) && Number.isFinite(p.y[k]) ? { cx: X(p.x[k]), cy: Y(p.y[k]) } : null;
  return { m, k, ax, ay, xl, yl, fs, left, right, top, bottom, X, Y, lines, now };
}

export const INSET_STYLE = { line: LINE, now: NOW, curveWidth: 1.8, markWidth: 0.9, dash: [3, 2.5], dotR: 4.5, dotRing: 1.2 };

const polyD = (ls: number[][]): string => ls.map((l) => l.map((v, i) => (i % 2 ? ' ' : i ? 'L' : 'M') + n1(v)).join('')).join('');

/**
 * The inset as a group at (x0, y0) of w × h px; u scales lines and fonts like the rest of the frame.
 * part 'static': what every frame of a run shares (box, axes, the whole run faint); 'all' adds this state's curve and marker.
 */
export function curveInsetSvg(p: CurveInset, x0: number, y0: number, w: number, h: number, u: number, part: 'all' | 'static' = 'all'): string {
  const G = insetGeometry(p, x0, y0, w, h, u);
  const { m, k, ax, ay, xl, yl, fs, left, right, top, bottom, X, Y } = G;

  const g: string[] = [];
  g.push(el('rect', { x: x0, y: y0, width: w, height: h, fill: '#ffffff', stroke: '#c5cad0', 'stroke-width': 1 * u, rx: 3 * u }));
  let grid = '';
  for (const t of ax.ticks) grid += `M${n1(X(t))} ${n1(top)}V${n1(bottom)}`;
  for (const t of ay.ticks) grid += `M${n1(left)} ${n1(Y(t))}H${n1(right)}`;
  g.push(el('path', { d: grid, stroke: '#e3e6ea', 'stroke-width': 0.8 * u, fill: 'none' }));
  g.push(el('rect', { x: left, y: top, width: right - left, height: bottom - top, fill: 'none', stroke: INK, 'stroke-width': 0.9 * u }));
  ax.ticks.forEach((t, i) => g.push(text(X(t), bottom + fs + 3 * u, xl[i], { 'font-size': fs, 'text-anchor': 'middle', fill: INK })));
  ay.ticks.forEach((t, i) => g.push(text(left - 5 * u, Y(t) + 4 * u, yl[i], { 'font-size': fs, 'text-anchor': 'end', fill: INK })));
  g.push(text((left + right) / 2, y0 + h - 8 * u, p.xLabel, { 'font-size': fs, 'text-anchor': 'middle', fill: INK, class: 'x-label' }));
  g.push(text(0, 0, p.yLabel, { 'font-size': fs, 'text-anchor': 'middle', fill: INK, class: 'y-label', transform: `translate(${n(x0 + 8 * u + fs * 0.5)} ${n((top + bottom) / 2)}) rotate(-90)` }));

  // the whole run faint, the part up to this state strong: the axes and the curve stay put from frame to frame
  const rest = part === 'static' ? polyD(G.lines(0, m)) : k < m - 1 ? polyD(G.lines(Math.max(0, k), m)) : '';
  if (rest) g.push(el('path', { d: rest, fill: 'none', stroke: '#b9c3cf', 'stroke-width': 1.4 * u, 'stroke-linejoin': 'round', class: 'inset-rest' }));
  if (part === 'static') return layer('inset', g);
  const d = polyD(G.lines(0, k + 1));
  if (d) g.push(el('path', { d, fill: 'none', stroke: LINE, 'stroke-width': 1.8 * u, 'stroke-linejoin': 'round', class: 'inset-curve' }));

  if (G.now) {
    const { cx, cy } = G.now;
    g.push(el('path', { d: `M${n1(cx)} ${n1(bottom)}V${n1(cy)}M${n1(left)} ${n1(cy)}H${n1(cx)}`, stroke: NOW, 'stroke-width': 0.9 * u, 'stroke-dasharray': `${n(3 * u)} ${n(2.5 * u)}`, fill: 'none' }));
    g.push(el('circle', { cx, cy, r: 4.5 * u, fill: NOW, stroke: '#ffffff', 'stroke-width': 1.2 * u, class: 'current' }));
  }
  return layer('inset', g);
}
