import { parseCase } from '../../src/case/index.js';
import { Analysis } from '../../src/fracture/analysis.js';
import { gridMesh } from './grid.js';
const law = process.argv[2] ?? 'bilinear', GF = Number(process.argv[3] ?? 0.1);
const cm = parseCase(`
format: 1
title: bar
units: mm-N-MPa
thickness: 10
geometry: {outline: [[0,0],[100,0],[100,10],[0,10]]}
material: {E: 30000, nu: 0.2, ft: 3, GF: ${GF}, softening: ${law}}
supports: [{along: [[0,0],[0,10]], fix: x}, {at: [0,0], fix: y}]
loads: [{along: [[100,0],[100,10]], direction: [1, 0]}]
control: {by: cmod, gauge: {from: [49, 0], to: [51, 0]}, target: ${3.6*GF/3}, increments: 80, stopAtLoadFraction: 0}
crack: {start: [[0, 0]], growthStep: 1, averagingRadius: 2}
mesh: {size: 1, tipSize: 1, refineRadius: 1, coarsen: false}
`, 'bar.yaml');
const a = new Analysis(cm, gridMesh(0, 0, 100, 10, 100, 10));
a.tips.splice(0);
a.addCohesiveCut([50, 0], [50, 10]);
const t0 = performance.now();
const res = await a.run(() => {});
console.log(res.status, res.reason, 'peak', res.peak.load_N.toFixed(2), 'steps', res.rows.length, 'ms', (performance.now()-t0).toFixed(0), 'solve s', res.timings_s.solve.toFixed(2));
for (const r of res.rows.filter((_, i) => i < 30)) console.log(r.step, r.load_N.toFixed(2), r.displacement_mm.toExponential(3), r.cmod_mm?.toExponential(3), r.iterations, (r.external_work_Nmm - r.elastic_energy_Nmm - r.dissipated_Nmm).toExponential(2), r.external_work_Nmm.toExponential(3));
