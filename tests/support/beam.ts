// A coarse notched three-point-bending beam for fracture tests (a reduced copy of the demo).
import { existsSync, readFileSync } from 'node:fs';
import { parseCase } from '../../src/case/index.js';
import type { CaseModel } from '../../src/case/model.js';

export function coarseBeam(opts: { seed?: number; size?: number; tip?: number; target?: number; increments?: number; stop?: number; radius?: number; hole?: [number, number, number]; slit?: [[number, number], [number, number]]; start?: string } = {}): CaseModel {
  const tip = opts.tip ?? 3;
  let text = readFileSync(demoFile(), 'utf8');
  text = text.replace(/^mesh:[\s\S]*?(?=^\S)/m, `mesh: {size: ${opts.size ?? 12}, tipSize: ${tip}, refineRadius: ${(opts.radius ?? 5) * tip}, seed: ${opts.seed ?? 1}, lloyd: 6}\n`)
    .replace(/^crack:[\s\S]*?(?=^\S)/m, `crack: {start: notch-tips, growthStep: ${2 * tip}, averagingRadius: ${3 * tip}}\n`)
    .replace(/^control:[\s\S]*?(?=^\S)/m, `control: {by: cmod, gauge: {from: [219, 0], to: [221, 0]}, target: ${opts.target ?? 0.3}, increments: ${opts.increments ?? 40}, stopAtLoadFraction: ${opts.stop ?? 0.05}}\n`)
    .replace(/^output:[\s\S]*?(?=^\S|$(?![\s\S]))/m, 'output: {frames: [], animation: none}\n');
  if (opts.hole) text = text.replace('at: [220, 65]', 'at: [220, 90]').replace(/^(  outline: .*)$/m, `$1\n  holes: [{circle: {center: [${opts.hole[0]}, ${opts.hole[1]}], radius: ${opts.hole[2]}}}]`);
  if (opts.slit) text = text.replace('at: [220, 65]', 'at: [220, 90]').replace(/^(    - \{from: \[220, 0\].*)$/m, `$1\n    - {from: [${opts.slit[0]}], to: [${opts.slit[1]}], width: 0}`);
  if (opts.start) text = text.replace('start: notch-tips', `start: ${opts.start}`);
  return parseCase(text, 'beam-test.yaml');
}

/** The demo case, from the sources (vitest) or from the compiled build (.build/tests/support, for the benchmark). */
function demoFile(): URL {
  const near = new URL('../../cases/beam-3pb-demo.yaml', import.meta.url);
  return existsSync(near) ? near : new URL('../../../cases/beam-3pb-demo.yaml', import.meta.url);
}
