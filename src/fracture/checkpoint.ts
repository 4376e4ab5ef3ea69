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
import type { AnalysisState } from './state.js';

export type { AnalysisState, LoopState, Peak } from './state.js';
export type { MeshState } from './workmesh.js';

export const CHECKPOINT_FILE = 'checkpoint.json';
const FORMAT = 1;

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
