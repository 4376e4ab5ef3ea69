// Writes cases/fit-demo-lab.csv: the synthetic "measured" curve of the fit demo, made by rupta
// itself from cases/fit-demo.yaml with known values and seeded noise, and labelled as such.
// Run after a change of the model: npm run build && node .build/cli/fit-demo-data.js
import { writeFileSync } from 'node:fs';
import { loadCase } from '../src/case/index.js';
import { buildDomain } from '../src/geometry/domain.js';
import { generateMesh } from '../src/mesh/generate.js';
import { simulateCurve } from '../src/lab/fitworker.js';
import { syntheticLabText } from '../src/lab/fit.js';

const TRUTH = { E: 26000, ft: 3.5, GF: 0.08 };
const c = loadCase('cases/fit-demo.yaml');
c.material = { ...c.material, ...TRUTH };
c.control.increments = 160;
const sim = await simulateCurve(c, generateMesh(buildDomain(c), c.mesh));
if (sim.status !== 'complete' || !sim.cmod) throw new Error(`the demo run did not complete: ${sim.reason}`);
const text = syntheticLabText({ x: sim.cmod, y: sim.load }, {
  seed: 7, loadNoise_N: 8.4, xNoise_mm: 0.0002, points: 2500,
  header: [
    'SYNTHETIC DATA: made by rupta, NOT a laboratory test',
    'Source;simulated with rupta from cases/fit-demo.yaml at its own mesh (160 increments), then seeded noise added',
    `Made with;E ${TRUTH.E} MPa, ft ${TRUTH.ft} MPa, GF ${TRUTH.GF} N/mm, ${c.material.softening} softening`,
    'Noise;load sd 0,0084 kN, CMOD sd 0,2 µm, seed 7',
    'Specimen;F-1 (synthetic), mortar M-7 (invented)',
    'Geometry;beam 200 x 50 x 40 mm, notch 15 mm, span 180 mm',
    'Control;CMOD',
    '',
  ],
});
writeFileSync('cases/fit-demo-lab.csv', text);
process.stdout.write(`wrote cases/fit-demo-lab.csv (${sim.load.length} steps, peak ${Math.max(...sim.load).toFixed(1)} N)\n`);
