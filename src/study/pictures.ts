// The study's pictures: the band of curves, the crack paths over the specimen, the
// distribution of the peak and, for a size series, the size effect with its fitted law.
import type { CaseModel } from '../case/model.js';
import { el, layer, n1, svgDocument, text } from '../output/svg.js';
import { PALETTE } from '../output/plot.js';
import { chartSvg } from './chart.js';
import type { VariantResult } from './collect.js';
import { curveBand, describe, type Band } from './stats.js';
import { nominalStrength, sizeEffectLaw, type SizeEffectFit } from './sizeeffect.js';

const GREY = '#8c939b', BLUE = PALETTE[0]!, RED = PALETTE[1]!, GREEN = PALETTE[2]!;

export function bandSvg(results: VariantResult[], title: string): { svg: string; band: Band | null } {
  const curves = results.map((r) => r.curve).filter((c): c is NonNullable<typeof c> => c !== null && c.load.length > 1);
  const band = curveBand(curves);
  const axis = band?.axis ?? (curves.every((c) => c.cmod) ? 'cmod' : 'displacement');
  const svg = chartSvg({
    title: `${title}: load against ${axis === 'cmod' ? 'CMOD' : 'displacement'}`,
    xLabel: axis === 'cmod' ? 'CMOD (mm)' : 'Load-point displacement (mm)', yLabel: 'Load (N)',
    bands: band ? [{ x: band.x, lo: band.lo, hi: band.hi, label: '5–95 % band', color: BLUE }] : [],
    lines: [
      ...curves.map((c, i) => ({ x: axis === 'cmod' ? c.cmod! : c.displacement, y: c.load, color: GREY, width: 1.1, opacity: 0.8, ...(i === 0 ? { label: `variants (${curves.length})` } : {}) })),
      ...(band ? [{ x: band.x, y: band.mean, color: RED, width: 3, label: 'mean' }] : []),
    ],
    note: band ? `band and mean over the variants that reach each opening (at least half of them)` : 'fewer than two finished variants: no band',
  });
  return { svg, band };
}

/** Title text sized to fit the width (px at font size 22 for up to the width available). */
export function titleSize(title: string, width: number): number {
  return Math.max(12, Math.min(22, width / (0.62 * Math.max(1, title.length))));
}

/**
 * All crack paths over the outline and notches of the base specimen (a size series drawn at
 * the base size); where the paths keep to a narrow part of the specimen, a second view
 * below shows that part enlarged at the same scale in x and y.
 */
export function pathsSvg(base: CaseModel, results: VariantResult[], factors: (number | null)[], title: string): string {
  const o = base.geometry.outline;
  let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity;
  for (const [x, y] of o) { x0 = Math.min(x0, x); x1 = Math.max(x1, x); y0 = Math.min(y0, y); y1 = Math.max(y1, y); }
  let px0 = Infinity, px1 = -Infinity, py0 = Infinity, py1 = -Infinity;
  results.forEach((r, i) => { const f = factors[i] ?? 1; for (const p of r.paths) for (const [x, y] of p) { px0 = Math.min(px0, x / f); px1 = Math.max(px1, x / f); py0 = Math.min(py0, y / f); py1 = Math.max(py1, y / f); } });
  const W = 1000, m = 40, top = 60;
  const views: { bx0: number; bx1: number; by0: number; by1: number }[] = [{ bx0: x0, bx1: x1, by0: y0, by1: y1 }];
  if (px1 >= px0 && Math.max(px1 - px0, py1 - py0) < 0.3 * (x1 - x0)) {
    // a window around the paths, 420 px tall, at the same scale in x and y
    const cx = (px0 + px1) / 2, cy = (py0 + py1) / 2, pw = Math.max(px1 - px0, 1e-3 * (x1 - x0)), ph = Math.max(py1 - py0, 1e-3 * (y1 - y0));
    const s = Math.min(420 / (1.15 * ph), (W - 2 * m) / (3 * pw)), hw = (W - 2 * m) / s / 2, hh = 210 / s;
    views.push({ bx0: cx - hw, bx1: cx + hw, by0: cy - hh, by1: cy + hh });
  }
  const body: string[] = [];
  const head = `${title}: crack paths of ${results.filter((r) => r.paths.length).length} variants`;
  body.push(layer('title', [text(m, 34, head, { 'font-size': titleSize(head, W - 2 * m), 'font-weight': 'bold', fill: '#1b1b1b' })]));
  let yAt = top;
  views.forEach((v, k) => {
    const s = (W - 2 * m) / (v.bx1 - v.bx0), h = (v.by1 - v.by0) * s;
    if (k > 0) {
      body.push(text(m, yAt + 4, `enlarged ${(s / ((W - 2 * m) / (x1 - x0))).toPrecision(2)}×: x ${+v.bx0.toPrecision(4)}–${+v.bx1.toPrecision(4)} mm, y ${+v.by0.toPrecision(4)}–${+v.by1.toPrecision(4)} mm`, { 'font-size': 13, fill: '#505a64' }));
      yAt += 14;
    }
    const X = (x: number) => m + (x - v.bx0) * s, Y = (y: number) => yAt + (v.by1 - y) * s;
    const id = k === 0 ? '' : 'zoom-';
    const g: string[] = [el('defs', undefined, el('clipPath', { id: `${id}view` }, el('rect', { x: m, y: yAt, width: W - 2 * m, height: h })))];
    const shape: string[] = [el('path', { d: o.map(([x, y], i) => `${i ? 'L' : 'M'}${n1(X(x))} ${n1(Y(y))}`).join('') + 'Z', fill: '#f3f1ec', stroke: '#1b1b1b', 'stroke-width': 1.5 })];
    for (const hl of base.geometry.holes) {
      if (hl.kind === 'circle') shape.push(el('circle', { cx: X(hl.center[0]), cy: Y(hl.center[1]), r: hl.radius * s, fill: '#ffffff', stroke: '#1b1b1b', 'stroke-width': 1.5 }));
      else shape.push(el('path', { d: hl.points.map(([x, y], i) => `${i ? 'L' : 'M'}${n1(X(x))} ${n1(Y(y))}`).join('') + 'Z', fill: '#ffffff', stroke: '#1b1b1b', 'stroke-width': 1.5 }));
    }
    for (const nt of base.geometry.notches) shape.push(el('path', { d: `M${n1(X(nt.from[0]))} ${n1(Y(nt.from[1]))}L${n1(X(nt.to[0]))} ${n1(Y(nt.to[1]))}`, stroke: '#1b1b1b', 'stroke-width': Math.max(2, nt.width * s) }));
    const cracks: string[] = [];
    results.forEach((r, i) => {
      const f = factors[i] ?? 1;
      for (const p of r.paths) if (p.length > 1) cracks.push(el('path', { d: p.map(([x, y], j) => `${j ? 'L' : 'M'}${n1(X(x / f))} ${n1(Y(y / f))}`).join(''), fill: 'none', stroke: RED, 'stroke-opacity': 0.55, 'stroke-width': k === 0 ? 1.6 : 1.4, class: 'crack', 'data-variant': r.row.id }));
    });
    g.push(layer(`${id}specimen`, shape), layer(`${id}cracks`, cracks));
    if (k > 0) g.push(el('rect', { x: m, y: yAt, width: W - 2 * m, height: h, fill: 'none', stroke: '#505a64', 'stroke-width': 1 }));
    body.push(el('g', { id: k === 0 ? 'view' : 'zoom', 'clip-path': `url(#${id}view)` }, g));
    yAt += h + 24;
  });
  const H = Math.round(yAt + 20);
  body.push(text(m, H - 12, factors.some((f) => f !== null && f !== 1) ? 'each specimen of the series drawn at the base size' : 'all variants over the base specimen', { 'font-size': 13, fill: '#505a64' }));
  return svgDocument(W, H, body, { title: `${title}: crack paths` });
}

/** Histogram of the peak loads with the mean and the 5 % and 95 % quantiles. */
export function peaksSvg(peaks: number[], title: string): string {
  if (peaks.length === 0) return chartSvg({ title: `${title}: peak load`, xLabel: 'Peak load (N)', yLabel: 'Variants', note: 'no finished variant' });
  const d = describe(peaks);
  const k = Math.max(3, Math.min(20, Math.ceil(Math.sqrt(peaks.length)) + 1));
  const lo = d.min === d.max ? d.min * 0.98 : d.min, hi = d.min === d.max ? d.max * 1.02 : d.max;
  const edges = Array.from({ length: k + 1 }, (_, i) => lo + ((hi - lo) * i) / k);
  const counts = new Array<number>(k).fill(0);
  for (const p of peaks) counts[Math.min(k - 1, Math.floor(((p - lo) / (hi - lo)) * k))]!++;
  const top = Math.max(...counts) * 1.08;
  const vline = (x: number, label: string, color: string, dashed = false) => ({ x: [x, x], y: [0, top], color, label, dashed });
  return chartSvg({
    title: `${title}: peak load of ${peaks.length} variants`, xLabel: 'Peak load (N)', yLabel: 'Variants',
    bars: [{ edges, counts, label: 'variants per bin', color: BLUE }],
    lines: [vline(d.mean, `mean ${d.mean.toPrecision(4)} N`, RED), vline(d.p05, `5 % ${d.p05.toPrecision(4)} N`, GREY, true), vline(d.p95, `95 % ${d.p95.toPrecision(4)} N`, GREY, true)],
    note: `CoV ${(100 * d.cov).toFixed(1)} %, median ${d.p50.toPrecision(4)} N, range ${d.min.toPrecision(4)}–${d.max.toPrecision(4)} N`,
  });
}

/** log σN against log D with the fitted law and its two asymptotes (strength and LEFM). */
export function sizeEffectSvg(D: number[], sigma: number[], fit: SizeEffectFit | null, title: string): string {
  const lines = [];
  if (fit) {
    const a = Math.min(...D) / 3, b = Math.max(...D) * 3, xs: number[] = [], ys: number[] = [];
    for (let i = 0; i <= 80; i++) { const x = a * (b / a) ** (i / 80); xs.push(x); ys.push(sizeEffectLaw(fit, x)); }
    lines.push({ x: xs, y: ys, color: RED, label: `σN = B·ft/√(1 + D/D0): B ${fit.B.toPrecision(3)}, D0 ${fit.D0.toPrecision(3)} mm` });
    lines.push({ x: [a, b], y: [fit.B * fit.ft, fit.B * fit.ft], color: GREY, dashed: true, label: 'strength limit B·ft' });
    lines.push({ x: [a, b], y: [a, b].map((x) => fit.B * fit.ft * Math.sqrt(fit.D0 / x)), color: GREEN, dashed: true, label: 'LEFM limit ∝ D^−1/2' });
  }
  return chartSvg({
    title: `${title}: size effect`, xLabel: 'Size D (mm, log scale)', yLabel: 'Nominal strength σN = P/(b·D) (MPa, log scale)', log: true,
    lines, points: [{ x: D, y: sigma, label: 'variants', color: BLUE }],
    note: fit ? `fit by regression of (ft/σN)² on D, r² ${fit.r2.toFixed(3)}; brittleness D/D0 ${Math.min(...fit.beta).toPrecision(2)}–${Math.max(...fit.beta).toPrecision(2)}` : 'no fit: the points give no positive B and D0',
  });
}

export { nominalStrength };
