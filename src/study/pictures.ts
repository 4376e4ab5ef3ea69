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

/** All crack paths over the outline and notches of the base specimen (a size series drawn at the base size). */
export function pathsSvg(base: CaseModel, results: VariantResult[], factors: (number | null)[], title: string): string {
  const o = base.geometry.outline;
  let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity;
  for (const [x, y] of o) { x0 = Math.min(x0, x); x1 = Math.max(x1, x); y0 = Math.min(y0, y); y1 = Math.max(y1, y); }
  const W = 1000, m = 40, top = 60, s = (W - 2 * m) / (x1 - x0), H = Math.round(top + (y1 - y0) * s + m + 30);
  const X = (x: number) => m + (x - x0) * s, Y = (y: number) => top + (y1 - y) * s;
  const body: string[] = [layer('title', [text(m, 34, `${title}: crack paths of ${results.filter((r) => r.paths.length).length} variants`, { 'font-size': 22, 'font-weight': 'bold', fill: '#1b1b1b' })])];
  const spec = [el('path', { d: o.map(([x, y], i) => `${i ? 'L' : 'M'}${n1(X(x))} ${n1(Y(y))}`).join('') + 'Z', fill: '#f3f1ec', stroke: '#1b1b1b', 'stroke-width': 1.5 })];
  for (const h of base.geometry.holes) {
    if (h.kind === 'circle') spec.push(el('circle', { cx: X(h.center[0]), cy: Y(h.center[1]), r: h.radius * s, fill: '#ffffff', stroke: '#1b1b1b', 'stroke-width': 1.5 }));
    else spec.push(el('path', { d: h.points.map(([x, y], i) => `${i ? 'L' : 'M'}${n1(X(x))} ${n1(Y(y))}`).join('') + 'Z', fill: '#ffffff', stroke: '#1b1b1b', 'stroke-width': 1.5 }));
  }
  for (const nt of base.geometry.notches) spec.push(el('path', { d: `M${n1(X(nt.from[0]))} ${n1(Y(nt.from[1]))}L${n1(X(nt.to[0]))} ${n1(Y(nt.to[1]))}`, stroke: '#1b1b1b', 'stroke-width': Math.max(2, nt.width * s) }));
  body.push(layer('specimen', spec));
  const paths: string[] = [];
  results.forEach((r, i) => {
    const f = factors[i] ?? 1;
    for (const p of r.paths) if (p.length > 1) paths.push(el('path', { d: p.map(([x, y], k) => `${k ? 'L' : 'M'}${n1(X(x / f))} ${n1(Y(y / f))}`).join(''), fill: 'none', stroke: RED, 'stroke-opacity': 0.55, 'stroke-width': 1.6, class: 'crack', 'data-variant': r.row.id }));
  });
  body.push(layer('cracks', paths));
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
