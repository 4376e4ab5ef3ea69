// A case's analysis run to its end, and the checks that a specimen came apart: its load falls,
// the run gives no warning, the energy balance closes. Each test names the source of its bounds.
import { expect } from 'vitest';
import type { CaseModel } from '../../src/case/model.js';
import { Analysis, type AnalysisOptions, type AnalysisResult } from '../../src/fracture/analysis.js';
import { curvePeaks, runWarnings, worstEnergyGap, type CurvePeaks } from '../../src/output/warnings.js';
import { meshCase } from '../../src/run.js';

/** Mesh the case and run its analysis to the end. */
export async function runToEnd(c: CaseModel, opt?: AnalysisOptions): Promise<{ a: Analysis; res: AnalysisResult }> {
  const a = new Analysis(c, meshCase(c).mesh, opt);
  return { a, res: await a.run(() => {}) };
}

/**
 * The last load below `below` of the first peak; with `once`, no later maximum (the load does
 * not rise again); with `quiet`, the run of that case gives no warning. Returns the peaks.
 */
export function expectLoadFalls(res: AnalysisResult, o: { below: number; once?: boolean; quiet?: CaseModel }): CurvePeaks {
  const pk = curvePeaks(res.rows);
  expect(Math.abs(res.rows.at(-1)!.load_N)).toBeLessThan(o.below * Math.abs(pk.peak.load_N));
  if (o.once) expect(pk.later).toBeNull();
  if (o.quiet) expect(runWarnings(o.quiet, res, null)).toEqual([]);
  return pk;
}

/** The worst gap between the machine's work and stored plus dissipated energy, as a share of the work, below `bound`. */
export function expectBalance(res: AnalysisResult, bound: number): void {
  expect(worstEnergyGap(res.rows)?.share ?? 0).toBeLessThan(bound);
}
