// Hillerborg's bar: 100 × 10 mm, 10 mm thick, held at x = 0 and pulled at x = 100, with one
// cohesive crack at mid-length; the CMOD gauge straddles it by ±gaugeHalf mm.
import { parseCase } from '../../src/case/index.js';
import type { CaseModel } from '../../src/case/model.js';

export const BAR = { L: 100, H: 10, T: 10, E: 30000, FT: 3 } as const;

export function barCase(law: string, GF: number, o: { target: number; increments: number; gaugeHalf: number; by?: string; mesh: string }): CaseModel {
  const { L, H, T, E, FT } = BAR;
  return parseCase(`
format: 1
title: cohesive bar
units: mm-N-MPa
thickness: ${T}
geometry: {outline: [[0,0],[${L},0],[${L},${H}],[0,${H}]]}
material: {E: ${E}, nu: 0.2, ft: ${FT}, GF: ${GF}, softening: ${law}}
supports: [{along: [[0,0],[0,${H}]], fix: x}, {at: [0,0], fix: y}]
loads: [{along: [[${L},0],[${L},${H}]], direction: [1, 0]}]
control: {by: ${o.by ?? 'cmod'}, gauge: {from: [${L / 2 - o.gaugeHalf}, 0], to: [${L / 2 + o.gaugeHalf}, 0]}, target: ${o.target}, increments: ${o.increments}, stopAtLoadFraction: 0}
crack: {start: [[0, 0]], growthStep: 1, averagingRadius: 2}
mesh: ${o.mesh}
output: {frames: []}
`, 'bar.yaml');
}
