// Checkpoints: the whole state of the staggered loop between two converged steps, kept in
// the run folder, so that an interrupted run goes on exactly where it stood. Numbers keep
// every bit (typed arrays as raw bytes, −0 and non-finite values spelled out), so a resumed
// run repeats the same floating-point sequence as one that was never stopped.
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { CaseModel } from '../case/model.js';
import { InputError } from '../errors.js';
import { kindText, lstatOrNull, removeFile, writeFileAtomic } from '../output/files.js';
import { readTextFile } from '../io/read.js';
import type { AnalysisState } from './state.js';

export type { AnalysisState, LoopState, Peak } from './state.js';
export type { MeshState } from './workmesh.js';

export const CHECKPOINT_FILE = 'checkpoint.json';
const FORMAT = 2;
/** Largest checkpoint read back (a 2-million-polygon mesh stays well below it). */
const MAX_CHECKPOINT_BYTES = 500 * 1024 * 1024;

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

/**
 * Two lines: a header (format, case hash, step, SHA-256 and length of the second line), then
 * the case and the state. The checksum catches a damaged or hand-edited file that still parses.
 */
export function encodeCheckpoint(c: CaseModel, s: AnalysisState): string {
  const body = JSON.stringify({ case: c, state: s }, encodeValue);
  const sha256 = createHash('sha256').update(body).digest('hex');
  return JSON.stringify({ format: FORMAT, caseHash: caseHash(c), step: s.loop.step, sha256, length: body.length }) + '\n' + body + '\n';
}

const damaged = (where: string, why: string) =>
  new InputError(`the checkpoint in ${where} is damaged (${why}), so the run cannot go on from it; run the case again with --force`);

/** The case and state in a checkpoint text, checked for damage; an InputError naming the folder otherwise. */
export function decodeCheckpointData(text: string, where: string): { c: CaseModel; state: AnalysisState } {
  const nl = text.indexOf('\n');
  let head: { format?: unknown; sha256?: unknown; step?: unknown; length?: unknown };
  try { head = JSON.parse(nl >= 0 ? text.slice(0, nl) : text) as typeof head; } catch {
    throw damaged(where, `${CHECKPOINT_FILE} does not start with a valid header`);
  }
  if (head === null || typeof head !== 'object' || head.format !== FORMAT) {
    throw new InputError(`the checkpoint in ${where} is not one this version of rupta can continue (format ${String(head?.format)}, expected ${FORMAT}); run the case again with --force`);
  }
  const body = text.slice(nl + 1).replace(/\n$/, '');
  if (body.length !== head.length || createHash('sha256').update(body).digest('hex') !== head.sha256) {
    throw damaged(where, `${CHECKPOINT_FILE} does not match its checksum`);
  }
  let data: { case?: CaseModel; state?: AnalysisState };
  try { data = JSON.parse(body, decodeValue) as typeof data; } catch { throw damaged(where, `${CHECKPOINT_FILE} is not valid JSON`); }
  const s = data.state;
  if (!data.case || typeof data.case !== 'object' || !s || typeof s !== 'object') throw damaged(where, 'the case or the state is missing');
  const rows = s.rows;
  if (!Array.isArray(rows) || rows.length === 0 || !s.loop || rows[rows.length - 1]!.step !== s.loop.step || s.loop.step !== head.step
    || rows.some((r, i) => r === null || typeof r !== 'object' || r.step !== i) || !(s.uw instanceof Float64Array) || !s.mesh || !(s.mesh.x instanceof Float64Array)) {
    throw damaged(where, 'its rows or state are incomplete');
  }
  return { c: data.case, state: s };
}

/** The state in a checkpoint text, checked for damage and against the case. */
export function decodeCheckpoint(text: string, c: CaseModel, where: string): AnalysisState {
  const d = decodeCheckpointData(text, where);
  if (caseHash(d.c) !== caseHash(c)) {
    throw new InputError(`the case has changed since the run in ${where} was started, so it cannot be resumed; run it again with --force, or into another folder with --out`);
  }
  return d.state;
}

/** Written atomically: a reader (or a resume after a crash) sees the old checkpoint or the new one, never half of one. */
export function writeCheckpoint(dir: string, c: CaseModel, s: AnalysisState): void {
  writeFileAtomic(join(dir, CHECKPOINT_FILE), encodeCheckpoint(c, s));
}

/** The text of the checkpoint in dir, or an InputError saying why there is none. */
function checkpointText(dir: string): string {
  const path = join(dir, CHECKPOINT_FILE);
  const st = lstatOrNull(path);
  if (!st) {
    const sp = join(dir, 'summary.json');
    const done = lstatOrNull(sp)?.isFile() === true && /"status":\s*"complete"/.test(readFileSync(sp, 'utf8'));
    throw new InputError(done
      ? `the run in ${dir} is complete, so there is nothing to resume`
      : `there is no checkpoint to resume from in ${dir} (a run writes ${CHECKPOINT_FILE} every few steps and when it is interrupted)`);
  }
  if (!st.isFile()) throw damaged(dir, `${CHECKPOINT_FILE} is ${kindText(st)}, not a regular file`);
  return readTextFile(path, 'the checkpoint', MAX_CHECKPOINT_BYTES);
}

/** The checkpoint of the run in dir, checked against the case. */
export function readCheckpoint(dir: string, c: CaseModel): AnalysisState {
  return decodeCheckpoint(checkpointText(dir), c, dir);
}

/** The case and state of the run in dir, for finishing a run without its case file. */
export function readCheckpointWithCase(dir: string): { c: CaseModel; state: AnalysisState } {
  return decodeCheckpointData(checkpointText(dir), dir);
}

export function removeCheckpoint(dir: string): void {
  removeFile(join(dir, CHECKPOINT_FILE));
}
