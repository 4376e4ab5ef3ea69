// One run from a validated case: mesh, staggered analysis, files. The command line and
// scripts both come through here.
import { join } from 'node:path';
import type { CaseModel } from './case/model.js';
import type { PolyMesh } from './mesh/polymesh.js';
import { buildDomain } from './geometry/domain.js';
import { generateMesh } from './mesh/generate.js';
import { Analysis, type AnalysisResult, type Snapshot, type StepEvent } from './fracture/analysis.js';
import { LefmAnalysis } from './fracture/lefm.js';
import { RunFiles } from './output/runfiles.js';
import { writeMatrixMarket } from './linalg/mtx.js';
import { readCheckpoint, removeCheckpoint, writeCheckpoint } from './fracture/checkpoint.js';
import { InputError } from './errors.js';

export interface RunOptions {
  out?: string;
  force?: boolean;
  exportMatrix?: string;
  maxDofs?: number;
  onStep?: (e: StepEvent, elapsed_s: number) => void;
  /** Polled between steps; true ends the run as interrupted (everything so far is kept, and a checkpoint written). */
  stopRequested?: () => boolean;
  /** Go on from the checkpoint in the output folder (refused when the case has changed). */
  resume?: boolean;
  /** The case file the run was started from: its hash goes into case.json and the report. */
  caseFile?: string;
  /** Converged steps between checkpoints (default 5; 0: only when interrupted). */
  checkpointEvery?: number;
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
  if (opt.out !== undefined && opt.out.trim() === '') throw new InputError('--out needs the name of a folder (found an empty one)');
  const dir = opt.out ?? join('out', c.name);
  if (opt.resume && opt.force) throw new InputError('--resume goes on with the run in the output folder and --force starts it afresh: give one of them, not both');
  const lefm = c.crack?.model === 'lefm';
  if (opt.resume && lefm) throw new InputError('--resume goes on from a checkpoint, and crack.model lefm runs write none (they take seconds): run the case again with --force');
  const resumed = opt.resume ? readCheckpoint(dir, c) : null;
  const files = new RunFiles(dir, c, { force: opt.force, resume: resumed?.rows, caseFile: opt.caseFile });
  const { mesh, seconds } = meshCase(c);
  const a = lefm ? new LefmAnalysis(c, mesh, { maxDofs: opt.maxDofs }) : new Analysis(c, mesh, { maxDofs: opt.maxDofs, checkpointEvery: opt.checkpointEvery ?? 5 });
  if (resumed && a instanceof Analysis) a.restore(resumed);
  if (opt.stopRequested) a.stopRequested = opt.stopRequested;
  if (opt.exportMatrix) writeMatrixMarket(a.stiffnessMatrix(), opt.exportMatrix, `rupta: constrained stiffness of ${c.title}`);
  let lastEvent: StepEvent | null = null;
  const result = await a.run((e) => {
    files.step(e);
    lastEvent = e;
    opt.onStep?.(e, (performance.now() - t0) / 1000);
  }, (s) => writeCheckpoint(dir, c, s));
  // a finished run needs no checkpoint; a stopped or interrupted one keeps its last
  if (result.status === 'complete') removeCheckpoint(dir);
  const final: Snapshot | null = lastEvent ? (lastEvent as StepEvent).snapshot() : null;
  const summary = await files.finish(result, { meshSeconds: seconds, totalSeconds: (performance.now() - t0) / 1000, initialMesh: mesh, final });
  if (result.status === 'failed') {
    const why = result.error instanceof Error ? result.error.message : String(result.error);
    throw new Error(`${why}; the steps up to the fault and a summary marked failed are in ${dir}`, { cause: result.error });
  }
  return { dir, result, summary };
}
