// One run from a validated case: mesh, staggered analysis, files. The command line and
// scripts both come through here.
import { join } from 'node:path';
import type { CaseModel } from './case/model.js';
import type { PolyMesh } from './mesh/polymesh.js';
import { buildDomain } from './geometry/domain.js';
import { generateMesh } from './mesh/generate.js';
import { Analysis, type AnalysisResult, type Snapshot, type StepEvent } from './fracture/analysis.js';
import { RunFiles } from './output/runfiles.js';
import { writeMatrixMarket } from './linalg/mtx.js';

export interface RunOptions {
  out?: string;
  force?: boolean;
  exportMatrix?: string;
  maxDofs?: number;
  onStep?: (e: StepEvent, elapsed_s: number) => void;
  /** Polled between steps; true ends the run as interrupted (everything so far is kept). */
  stopRequested?: () => boolean;
}

export interface RunOutcome { dir: string; result: AnalysisResult; summary: Record<string, unknown> }

/** The mesh of a case, timed. */
export function meshCase(c: CaseModel): { mesh: PolyMesh; seconds: number } {
  const t0 = performance.now();
  const mesh = generateMesh(buildDomain(c), c.mesh);
  return { mesh, seconds: (performance.now() - t0) / 1000 };
}

export async function runCase(c: CaseModel, opt: RunOptions = {}): Promise<RunOutcome> {
  const t0 = performance.now();
  const dir = opt.out ?? join('out', c.name);
  const files = new RunFiles(dir, c, { force: opt.force });
  const { mesh, seconds } = meshCase(c);
  const a = new Analysis(c, mesh, { maxDofs: opt.maxDofs });
  if (opt.stopRequested) a.stopRequested = opt.stopRequested;
  if (opt.exportMatrix) writeMatrixMarket(a.stiffnessMatrix(), opt.exportMatrix, `rupta: constrained stiffness of ${c.title}`);
  let lastEvent: StepEvent | null = null;
  const result = await a.run((e) => {
    files.step(e);
    lastEvent = e;
    opt.onStep?.(e, (performance.now() - t0) / 1000);
  });
  const final: Snapshot | null = lastEvent ? (lastEvent as StepEvent).snapshot() : null;
  const summary = await files.finish(result, { meshSeconds: seconds, totalSeconds: (performance.now() - t0) / 1000, initialMesh: mesh, final });
  return { dir, result, summary };
}
