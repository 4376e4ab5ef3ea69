// A square plate, 160 mm wide, with a sharp central slit of half-length 10 mm at β to the
// load (y), pulled apart by its top edge: the slanted-slit case of the mixed-mode tests.
import { parseCase } from '../../src/case/index.js';
import type { CaseModel } from '../../src/case/model.js';

export const SLIT_W = 160, SLIT_HALF = 10;

/** The slit plate with the given control, crack and mesh lines (YAML flow maps); material and thickness optional. */
export function slitPlate(betaDeg: number, lines: { control: string; crack: string; mesh: string; material?: string; thickness?: number }): CaseModel {
  const b = betaDeg * Math.PI / 180, ux = Math.sin(b), uy = Math.cos(b), W = SLIT_W, H = SLIT_HALF, cx = W / 2, cy = W / 2;
  return parseCase(`
format: 1
title: slanted slit
units: mm-N-MPa
thickness: ${lines.thickness ?? 10}
geometry:
  outline: [[0,0],[${W},0],[${W},${W}],[0,${W}]]
  notches: [{from: [${cx - H * ux}, ${cy - H * uy}], to: [${cx + H * ux}, ${cy + H * uy}], width: 0}]
material: ${lines.material ?? '{E: 30000, nu: 0.2, ft: 3, GF: 0.03, softening: linear}'}
supports: [{along: [[0,0],[${W},0]], fix: y}, {at: [0,0], fix: x}]
loads: [{along: [[0,${W}],[${W},${W}]], direction: [0, 1]}]
control: ${lines.control}
crack: ${lines.crack}
mesh: ${lines.mesh}
output: {frames: []}
`, 'slit.yaml');
}

/**
 * Kink (deg, −180…180) from the slit of the chord from a crack's first vertex (a slit tip) to the
 * point s mm along it, relative to the direction the slit runs at that tip.
 */
export function chordKink(x: ArrayLike<number>, y: ArrayLike<number>, path: readonly number[], betaDeg: number, s: number): number {
  const b = betaDeg * Math.PI / 180, slit = Math.atan2(Math.cos(b), Math.sin(b));
  const x0 = x[path[0]], y0 = y[path[0]], p = pointAlong(x, y, path, s);
  const k = Math.atan2(p.y - y0, p.x - x0) - (y0 > SLIT_W / 2 ? slit : slit + Math.PI);
  return Math.atan2(Math.sin(k), Math.cos(k)) * 180 / Math.PI;
}

/** Length (mm) of a crack path. */
export function pathLength(x: ArrayLike<number>, y: ArrayLike<number>, path: readonly number[]): number {
  let L = 0;
  for (let i = 1; i < path.length; i++) L += Math.hypot(x[path[i]] - x[path[i - 1]], y[path[i]] - y[path[i - 1]]);
  return L;
}

/** The point s mm along a crack path from its first vertex (its end if it is shorter). */
export function pointAlong(x: ArrayLike<number>, y: ArrayLike<number>, path: readonly number[], s: number): { x: number; y: number } {
  let L = 0, px = x[path[0]], py = y[path[0]];
  for (let i = 1; i < path.length; i++) {
    const u = path[i - 1], v = path[i], d = Math.hypot(x[v] - x[u], y[v] - y[u]);
    px = x[v]; py = y[v];
    if (L + d >= s) { const f = (s - L) / d; return { x: x[u] + f * (x[v] - x[u]), y: y[u] + f * (y[v] - y[u]) }; }
    L += d;
  }
  return { x: px, y: py };
}
