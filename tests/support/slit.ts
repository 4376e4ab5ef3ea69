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
