// Checkpoints: the whole state of the staggered loop between two converged steps, kept in
// the run folder, so that an interrupted run goes on exactly where it stood. Numbers keep
// every bit (typed arrays as raw bytes, −0 and non-finite values spelled out), so a resumed
// run repeats the same floating-point sequence as one that was never stopped.
import { createHash } from 'node:crypto';
import { existsSync, readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import type { CaseModel } from '../case/model.js';
import { InputError } from '../errors.js';
import { writeFileAtomic } from '../output/files.js';
import type { WorkMesh } from './workmesh.js';
import type { Crack, ProbeRow, StepRow, Tip } from './analysis.js';

export const CHECKPOINT_FILE = 'checkpoint.json';
const FORMAT = 1;

/** Every array of the work mesh, including the order of the cells around each vertex (the cuts depend on it). */
export interface MeshState {
  x: Float64Array; y: Float64Array;
  cells: (number[] | null)[]; family: number[]; families: WorkMesh['families'];
  pinned: Uint8Array; face: Uint8Array; cracked: boolean[];
  from: ({ v: number[]; w: number[] } | null)[];
  cellsAround: number[][] | null;
}

export interface Peak { load_N: number; displacement_mm: number; cmod_mm: number | null; step: number }

/** Where the loop stands between two steps: increment, fraction of it tried next, control level reached, steps done. */
export interface LoopState {
  inc: number; frac: number; done: number; step: number; peak: Peak;
  /** The last step was driven by the crack opening and the case's control value fell: drive the next one so too. */
  opening?: boolean;
}

export interface AnalysisState {
  mesh: MeshState;
  cracks: Crack[]; tips: Tip[];
  kappa: [number, number][];
  uw: Float64Array; lambda: number; W: number; lastF: number; lastLambda: number;
  loop: LoopState;
  rows: StepRow[]; lastProbes: ProbeRow[];
  dofs: { initial: number; final: number; max: number };
  growthLog: { tip: number; x: number; y: number; dx: number; dy: number; first: boolean; sxx: number; syy: number; sxy: number }[];
  solveTime: number;
}

type Adjacency = { v2c: number[][] | null };

/** A deep copy of the work mesh's state. */
export function meshState(wm: WorkMesh): MeshState {
  const around = (wm as unknown as Adjacency).v2c;
  return {
    x: Float64Array.from(wm.x), y: Float64Array.from(wm.y),
    cells: wm.cells.map((c) => (c ? c.slice() : null)), family: wm.family.slice(),
    families: wm.families.map((f) => ({ ...f, children: f.children.slice() })),
    pinned: wm.pinned.slice(), face: wm.face.slice(), cracked: wm.cracked.slice(),
    from: Array.from(wm.from, (f) => (f ? { v: f.v.slice(), w: f.w.slice() } : null)),
    cellsAround: around ? around.map((l) => l.slice()) : null,
  };
}

/** Put a saved state into a work mesh (which then owns the arrays). */
export function restoreMesh(wm: WorkMesh, s: MeshState): void {
  wm.x = Array.from(s.x); wm.y = Array.from(s.y);
  wm.cells = s.cells; wm.family = s.family; wm.families = s.families;
  wm.pinned = s.pinned; wm.face = s.face; wm.cracked = s.cracked; wm.from = s.from;
  (wm as unknown as Adjacency).v2c = s.cellsAround;
}

/** Fingerprint of a case: any change to the validated model (not to comments or layout) changes it. */
export function caseHash(c: CaseModel): string {
  return createHash('sha256').update(JSON.stringify({ ...c, name: undefined, output: undefined })).digest('hex');
}

const bytes = (a: ArrayBufferView) => Buffer.from(a.buffer, a.byteOffset, a.byteLength).toString('base64');

function encodeValue(this: unknown, _key: string, v: unknown): unknown {
  if (typeof v === 'number') return Number.isFinite(v) && !Object.is(v, -0) ? v : { $num: Object.is(v, -0) ? '-0' : String(v) };
  if (v instanceof Float64Array) return { $f64: bytes(v) };
  if (v instanceof Uint8Array) return { $u8: bytes(v) };
  return v;
}

function decodeValue(_key: string, v: unknown): unknown {
  if (v === null || typeof v !== 'object' || Array.isArray(v)) return v;
  const o = v as Record<string, unknown>;
  if (typeof o.$num === 'string') return Number(o.$num);
  if (typeof o.$f64 === 'string') { const b = Buffer.from(o.$f64, 'base64'); return new Float64Array(b.buffer.slice(b.byteOffset, b.byteOffset + b.byteLength)); }
  if (typeof o.$u8 === 'string') return new Uint8Array(Buffer.from(o.$u8, 'base64'));
  return v;
}

export function encodeCheckpoint(c: CaseModel, s: AnalysisState): string {
  return JSON.stringify({ format: FORMAT, caseHash: caseHash(c), step: s.loop.step, state: s }, encodeValue) + '\n';
}

/** The state in a checkpoint text; an InputError naming the folder when it is damaged or of another case. */
export function decodeCheckpoint(text: string, c: CaseModel, where: string): AnalysisState {
  let ck: { format?: unknown; caseHash?: unknown; state?: AnalysisState };
  try { ck = JSON.parse(text, decodeValue) as typeof ck; } catch {
    throw new InputError(`the checkpoint in ${where} is damaged (${CHECKPOINT_FILE} is not valid JSON); run the case again with --force`);
  }
  if (ck.format !== FORMAT || !ck.state || typeof ck.state !== 'object') {
    throw new InputError(`the checkpoint in ${where} is not one this version of rupta can continue (format ${String(ck.format)}, expected ${FORMAT}); run the case again with --force`);
  }
  if (ck.caseHash !== caseHash(c)) {
    throw new InputError(`the case has changed since the run in ${where} was started, so it cannot be resumed; run it again with --force, or into another folder with --out`);
  }
  return ck.state;
}

/** Written atomically: a reader (or a resume after a crash) sees the old checkpoint or the new one, never half of one. */
export function writeCheckpoint(dir: string, c: CaseModel, s: AnalysisState): void {
  writeFileAtomic(join(dir, CHECKPOINT_FILE), encodeCheckpoint(c, s));
}

/** The checkpoint of the run in dir, checked against the case. */
export function readCheckpoint(dir: string, c: CaseModel): AnalysisState {
  const path = join(dir, CHECKPOINT_FILE);
  if (!existsSync(path)) {
    const done = existsSync(join(dir, 'summary.json')) && /"status":\s*"complete"/.test(readFileSync(join(dir, 'summary.json'), 'utf8'));
    throw new InputError(done
      ? `the run in ${dir} is complete, so there is nothing to resume`
      : `there is no checkpoint to resume from in ${dir} (a run writes ${CHECKPOINT_FILE} every few steps and when it is interrupted)`);
  }
  return decodeCheckpoint(readFileSync(path, 'utf8'), c, dir);
}

export function removeCheckpoint(dir: string): void {
  rmSync(join(dir, CHECKPOINT_FILE), { force: true });
}
