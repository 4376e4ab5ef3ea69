// The double-edge-notched panel example on a coarse mesh, for the tests of cracks that join.
import { readFileSync } from 'node:fs';
import { expect } from 'vitest';
import { parseCase } from '../../src/case/index.js';
import type { CaseModel } from '../../src/case/model.js';
import type { Analysis, AnalysisResult } from '../../src/fracture/analysis.js';
import { curvePeaks } from '../../src/output/warnings.js';

/** The panel with 20 mm cells and 7 mm tips; the notches moved by `offset` mm (the left one down, the right one up). */
export function coarseDen(offset = 0): CaseModel {
  const text = readFileSync(new URL('../../cases/den-tension-example.yaml', import.meta.url), 'utf8')
    .replace(/^mesh:.*$/m, 'mesh: {size: 20, tipSize: 7, refineRadius: 25, seed: 1, lloyd: 6}')
    .replace(/growthStep: \d+/, 'growthStep: 14').replace(/averagingRadius: \d+/, 'averagingRadius: 21')
    .replace(/increments: 100/, 'increments: 40').replace(/^output:.*$/m, 'output: {frames: [], animation: none}')
    .replace('from: [0, 100], to: [25, 100]', `from: [0, ${100 - offset}], to: [25, ${100 - offset}]`)
    .replace('from: [200, 100], to: [175, 100]', `from: [200, ${100 + offset}], to: [175, ${100 + offset}]`)
    .replace('gauge: {from: [0, 96], to: [0, 104]}', `gauge: {from: [0, ${96 - offset}], to: [0, ${104 - offset}]}`);
  return parseCase(text, 'den.yaml');
}

/** Both grown tips ended on the other crack's faces and the panel came apart: a panel cut through carries no load (common practice). */
export function expectJoinedApart(a: Analysis, res: AnalysisResult): void {
  expect(res.status, res.reason).toBe('complete');
  const grown = a.tips.filter((t) => t.crack >= 0);
  expect(grown.length).toBe(2);
  for (const t of grown) { expect(t.active).toBe(false); expect(t.end).toBe('crack'); }
  const pk = curvePeaks(res.rows);
  expect(Math.abs(res.rows.at(-1)!.load_N)).toBeLessThan(0.2 * Math.abs(pk.peak.load_N));
  expect(pk.later).toBeNull();
}
