// The checkpoint of a fit: its setup, then one line per finished simulation (the candidate's
// hash and its curve, every bit kept), each line with its own SHA-256. Lines are appended as
// simulations end, so a fit stopped at any moment keeps every simulation it finished, and
// `rupta fit --resume` retraces the optimiser's course from them without running them again.
import { InputError } from '../errors.js';
import { sha256 } from '../version.js';
import type { FitSetup, StoredSimulation } from './fit.js';
import type { SimCurve } from './fitworker.js';

export const FIT_CHECKPOINT_FILE = 'fit-checkpoint.jsonl';
const KIND = 'rupta fit checkpoint';

/** A number as JSON keeps it: finite ones as numbers (their shortest text reads back to the same bits), −0 and the rest as text. */
const num = (v: number): number | string => (Number.isFinite(v) && !Object.is(v, -0) ? v : String(Object.is(v, -0) ? '-0' : v));
const unnum = (v: unknown): number => (typeof v === 'number' ? v : v === '-0' ? -0 : Number(v));
const arr = (a: Float64Array): (number | string)[] => Array.from(a, num);
const unarr = (a: unknown): Float64Array => Float64Array.from(a as unknown[], unnum);

/** One line: the object and the SHA-256 of its own JSON text. */
function sealed(o: Record<string, unknown>): string {
  const text = JSON.stringify(o);
  return JSON.stringify({ ...o, sha256: sha256(text) });
}

export function fitCheckpointHeader(setup: FitSetup): string {
  return sealed({ format: 1, kind: KIND, ...setup });
}

export function fitCheckpointLine(s: StoredSimulation): string {
  const c = s.sim;
  return sealed({ n: s.n, key: s.key, status: c.status, reason: c.reason, seconds: num(c.seconds), load: arr(c.load), displacement: arr(c.displacement), cmod: c.cmod ? arr(c.cmod) : null });
}

export interface FitCheckpoint {
  setup: FitSetup;
  /** By simulation number; a later line for a number replaces an earlier one. */
  sims: Map<number, StoredSimulation>;
  /** The checkpoint's whole lines as they stand (a line cut off by a kill left out), for writing it back. */
  text: string;
}

/**
 * Read a fit checkpoint's text. A last line without its newline was cut off by a kill and is
 * dropped; any other line that does not match its checksum is damage, refused with one sentence.
 */
export function decodeFitCheckpoint(text: string, where: string): FitCheckpoint {
  const lines = text.split('\n');
  lines.pop(); // after the last newline: empty, or a line cut off mid-write
  const damaged = (i: number, why: string) => new InputError(`the fit checkpoint ${where} is damaged at line ${i + 1} (${why}); start the fit again with --force`);
  const open = (i: number): Record<string, unknown> => {
    let o: Record<string, unknown>;
    try { o = JSON.parse(lines[i]!) as Record<string, unknown>; } catch { throw damaged(i, 'not JSON'); }
    if (o === null || typeof o !== 'object' || Array.isArray(o)) throw damaged(i, 'not an object');
    const { sha256: sum, ...rest } = o;
    if (sum !== sha256(JSON.stringify(rest))) throw damaged(i, 'it does not match its checksum');
    return rest;
  };
  if (lines.length === 0) throw new InputError(`the fit checkpoint ${where} is empty; start the fit again with --force`);
  const head = open(0);
  if (head.kind !== KIND || head.format !== 1) throw damaged(0, `not a ${KIND} of format 1`);
  const setup: FitSetup = { caseHash: String(head.caseHash), labHash: String(head.labHash), options: (head.options ?? {}) as Record<string, unknown> };
  const sims = new Map<number, StoredSimulation>();
  for (let i = 1; i < lines.length; i++) {
    const o = open(i);
    const n = Number(o.n);
    if (!(Number.isInteger(n) && n >= 1) || typeof o.key !== 'string') throw damaged(i, 'no simulation number or key');
    const sim: SimCurve = {
      status: o.status as SimCurve['status'], reason: String(o.reason ?? ''), seconds: unnum(o.seconds),
      load: unarr(o.load), displacement: unarr(o.displacement), cmod: o.cmod === null ? null : unarr(o.cmod),
    };
    sims.set(n, { n, key: o.key, sim });
  }
  return { setup, sims, text: lines.map((l) => l + '\n').join('') };
}

/** What differs between the setup of a checkpoint and of the fit asked for, in words; null when nothing does. */
export function setupDifference(was: FitSetup, now: FitSetup): string | null {
  if (was.caseHash !== now.caseHash) return 'the case is not the one the fit was started with';
  if (was.labHash !== now.labHash) return 'the measured curves (or their corrections) are not the ones the fit was started with';
  const keys = [...new Set([...Object.keys(was.options), ...Object.keys(now.options)])];
  const changed = keys.filter((k) => JSON.stringify(was.options[k]) !== JSON.stringify(now.options[k]));
  if (changed.length === 0) return null;
  const say = (v: unknown) => (v === undefined ? 'none' : JSON.stringify(v));
  return `${changed.map((k) => `${k} was ${say(was.options[k])}, now ${say(now.options[k])}`).join('; ')}`;
}
