// One run from a validated case: mesh, staggered analysis, files. The command line and
// scripts both come through here.
import type { CaseModel } from './case/model.js';
import type { PolyMesh } from './mesh/polymesh.js';
import { buildDomain } from './geometry/domain.js';
import { generateMesh } from './mesh/generate.js';
import { Analysis, type AnalysisOptions, type AnalysisResult, type Snapshot, type StepEvent } from './fracture/analysis.js';
import type { LoopState } from './fracture/checkpoint.js';
import { checkHeldPieces } from './fracture/pieces.js';
import { OutputFolder, checkedFilePath, defaultOutDir } from './output/folder.js';
import { shellQuote } from './output/shell.js';
import { LefmAnalysis } from './fracture/lefm.js';
import { Elastic2Analysis } from './fracture/elastic2.js';
import { RunFiles } from './output/runfiles.js';
import { writeMatrixMarket } from './linalg/mtx.js';
import { readCheckpoint, removeCheckpoint, writeCheckpoint } from './fracture/checkpoint.js';
import { rmdirSync } from 'node:fs';
import { DiskFull, InputError } from './errors.js';
import { lstatOrNull } from './output/files.js';

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

/** The analysis that runs a case: the brittle mode, an order-2 elastic solve, or the staggered loop. */
export function analysisFor(c: CaseModel, mesh: PolyMesh, opt: AnalysisOptions = {}): Analysis | LefmAnalysis | Elastic2Analysis {
  if (c.crack?.model === 'lefm') return new LefmAnalysis(c, mesh, { maxDofs: opt.maxDofs });
  if (c.mesh.order === 2 && !c.crack) return new Elastic2Analysis(c, mesh, { maxDofs: opt.maxDofs });
  return new Analysis(c, mesh, opt);
}

/** Where a fresh run starts: the loop state before step 1 (a checkpoint of it lets a cut-off run be finished from the start). */
const START: LoopState = { inc: 1, frac: 1, done: 0, step: 0, peak: { load_N: 0, displacement_mm: 0, cmod_mm: null, step: 0 } };

export async function runCase(c: CaseModel, opt: RunOptions = {}): Promise<RunOutcome> {
  const t0 = performance.now();
  if (opt.out !== undefined && opt.out.trim() === '') throw new InputError('--out needs the name of a folder (found an empty one)');
  const dir = opt.out ?? defaultOutDir(c.name);
  if (opt.resume && opt.force) throw new InputError('--resume goes on with the run in the output folder and --force starts it afresh: give one of them, not both');
  const matrixFile = opt.exportMatrix !== undefined ? checkedFilePath(opt.exportMatrix, 'the --export-matrix file') : undefined;
  const lefm = c.crack?.model === 'lefm';
  if (opt.resume && lefm) throw new InputError('--resume goes on from a checkpoint, and crack.model lefm runs write none (they take seconds): run the case again with --force');
  if (opt.resume && c.mesh.order === 2 && !c.crack) throw new InputError('--resume goes on from a checkpoint, and elastic runs of mesh.order 2 write none (they are one solve): run the case again with --force');
  // nothing to go on with in a folder that is not there (and no empty folder made to say so)
  if (opt.resume && lstatOrNull(dir) === null) readCheckpoint(dir, c);
  const created = lstatOrNull(dir) === null;
  const folder = OutputFolder.open(dir);
  folder.lock();
  try {
    const resumed = opt.resume ? readCheckpoint(dir, c) : null;
    if (!opt.force && !resumed && folder.holdsFiles(['mesh.svg'])) {
      throw new InputError(`the output folder ${dir} already holds a run; pass --force to overwrite it, --resume to go on with it, or --out to choose another folder`);
    }
    const { mesh, seconds } = meshCase(c);
    const a = analysisFor(c, mesh, { maxDofs: opt.maxDofs, checkpointEvery: opt.checkpointEvery ?? 5 });
    // a specimen cut into pieces that are not each held would run to a meaningless curve
    if (!(a instanceof LefmAnalysis)) checkHeldPieces(c, mesh, a.wm);
    const files = new RunFiles(dir, c, { force: opt.force, resume: resumed?.rows, caseFile: opt.caseFile });
    if (resumed && a instanceof Analysis) a.restore(resumed);
    if (opt.stopRequested) a.stopRequested = opt.stopRequested;
    if (matrixFile) writeMatrixMarket(a.stiffnessMatrix(), matrixFile, `rupta: constrained stiffness of ${c.title}`);
    let lastEvent: StepEvent | null = null;
    const result = await a.run(async (e) => {
      files.step(e);
      lastEvent = e;
      // a checkpoint of the start, so that a run cut off before its first periodic one can still be finished
      if (e.row.step === 0 && !resumed && a instanceof Analysis) { await files.flush(); writeCheckpoint(dir, c, a.state(START)); }
      opt.onStep?.(e, (performance.now() - t0) / 1000);
    }, async (s) => {
      // every picture up to the checkpoint is on disk before it is written
      await files.flush();
      writeCheckpoint(dir, c, s);
    });
    const final: Snapshot | null = lastEvent ? (lastEvent as StepEvent).snapshot() : null;
    const err = result.status === 'failed' ? result.error : null;
    // a full disk or a folder that cannot be written is said as such, not as a fault of rupta
    const mine = err !== null && !(err instanceof DiskFull || err instanceof InputError);
    const fault = () => new Error(`${err instanceof Error ? err.message : String(err)}; the steps up to the fault and a summary marked failed are in ${dir}`, { cause: err });
    let summary: Record<string, unknown>;
    try {
      summary = await files.finish(result, { meshSeconds: seconds, totalSeconds: (performance.now() - t0) / 1000, initialMesh: mesh, final });
    } catch (e) {
      // the first thing that went wrong is the one to report
      throw mine ? fault() : unfinished(err ?? e, dir);
    }
    // the final writes are done: only now may a finished run lose its checkpoint
    if (result.status === 'complete') removeCheckpoint(dir);
    if (err !== null) throw mine ? fault() : unfinished(err, dir);
    return { dir, result, summary };
  } finally {
    folder.release();
    // a run refused before it wrote anything leaves no empty folder behind
    if (created) { try { rmdirSync(dir); } catch { /* not empty: keep it */ } }
  }
}

/** A failure of the final writes or of a step's files: the sentence says how to complete the folder later. */
function unfinished(e: unknown, dir: string): unknown {
  const hint = `; the steps written so far and the last checkpoint are kept: fix this and complete the folder with: rupta finish ${shellQuote(dir)}`;
  if (e instanceof DiskFull) return new DiskFull(e.path, e.message + hint);
  if (e instanceof InputError) return new InputError(e.message + hint);
  return e;
}
