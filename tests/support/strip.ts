// An invented tension strip, 100 mm wide, held along its foot and pulled by its top edge, with
// blunt edge notches (2 mm wide) and round holes; cracks may start anywhere.
import { parseCase } from '../../src/case/index.js';
import type { CaseModel } from '../../src/case/model.js';

type Pt = [number, number];

/** The strip `height` mm tall; holes as [x, y, radius]; CMOD control over the gauge. */
export function tensionStrip(o: { height: number; notches?: [Pt, Pt][]; holes?: [number, number, number][]; gauge: [Pt, Pt]; target: number; increments: number }, name = 'strip.yaml'): CaseModel {
  const H = o.height, pt = (p: Pt): string => `[${p[0]}, ${p[1]}]`;
  const holes = o.holes?.length ? `\n  holes:${o.holes.map(([x, y, r]) => `\n    - {circle: {center: [${x}, ${y}], radius: ${r}}}`).join('')}` : '';
  const notches = o.notches?.length ? `\n  notches:${o.notches.map(([p, q]) => `\n    - {from: ${pt(p)}, to: ${pt(q)}, width: 2}`).join('')}` : '';
  return parseCase(`format: 1
title: start test
units: mm-N-MPa
model: plane-stress
thickness: 20
geometry:
  outline: [[0, 0], [100, 0], [100, ${H}], [0, ${H}]]${holes}${notches}
loads:
  - {along: [[0, ${H}], [100, ${H}]], direction: [0, 1]}
control: {by: cmod, gauge: {from: ${pt(o.gauge[0])}, to: ${pt(o.gauge[1])}}, target: ${o.target}, increments: ${o.increments}, stopAtLoadFraction: 0.05}
material: {E: 32000, nu: 0.2, ft: 3, GF: 0.1, softening: bilinear}
supports:
  - {along: [[0, 0], [100, 0]], fix: y}
  - {at: [0, 0], fix: x}
crack: {start: anywhere, growthStep: 6, averagingRadius: 9}
mesh: {size: 10, tipSize: 3, refineRadius: 15, seed: 1, lloyd: 6}
output: {frames: [], animation: none}
`, name);
}
