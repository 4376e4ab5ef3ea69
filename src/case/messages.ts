// Turns schema issues into one sentence naming the field, what it must be, its unit and
// what was found; unknown keys get a did-you-mean hint from the field table.
import type { z } from 'zod';
import { FIELDS, dotted, fieldKey, mustBe, specOf } from './fields.js';

type Issue = z.core.$ZodIssue;

/** "found -0.1", "found "z"", "found 2 points", "missing". */
export function found(v: unknown, numeric = false): string {
  if (v === undefined) return 'missing';
  return `found ${describeValue(v, numeric)}`;
}

export function describeValue(v: unknown, numeric = false): string {
  if (v === null) return 'an empty value';
  if (typeof v === 'number') return fmtNum(v);
  if (typeof v === 'boolean') return String(v);
  if (typeof v === 'string') {
    const s = v.length > 60 ? `${v.slice(0, 57)}...` : v;
    // "3.1 MPa": the unit is fixed by `units`, so only the number belongs here.
    const hint = !numeric ? '' : Number.isFinite(Number(v)) && v.trim() !== '' ? '; write it without quotes'
      : /^\s*[-+]?\d+,\d+\s*$/.test(v) ? `, a decimal comma; write ${v.trim().replace(',', '.')} with a point`
      : /^\s*[-+]?(\d|\.\d)/.test(v) ? '; write the number alone' : '';
    return `${JSON.stringify(s)}${hint}`;
  }
  if (Array.isArray(v)) {
    if (v.length === 0) return 'an empty list';
    if (v.every((e) => Array.isArray(e))) return `${v.length} point${v.length === 1 ? '' : 's'}`;
    const inline = fmtList(v);
    return inline.length <= 40 ? inline : `a list of ${v.length} items`;
  }
  if (typeof v === 'object') {
    const keys = Object.keys(v as object);
    if (keys.length === 0) return 'an empty mapping';
    const shown = keys.slice(0, 6).join(', ');
    return `a mapping with key${keys.length === 1 ? '' : 's'} ${shown}${keys.length > 6 ? ', ...' : ''}`;
  }
  return typeof v;
}

function fmtList(v: unknown[]): string {
  return `[${v.map((e) => (typeof e === 'number' ? fmtNum(e) : JSON.stringify(e) ?? String(e))).join(', ')}]`;
}

/** Numbers as the user wrote them, computed ones to 6 significant digits. */
export function fmtNum(v: number): string {
  if (!Number.isFinite(v)) return String(v);
  const s = String(v);
  return s.length > 12 ? String(Number(v.toPrecision(6))) : s;
}

export function fmtPoint(p: readonly number[]): string {
  return `[${p.map(fmtNum).join(', ')}]`;
}

function valueAt(root: unknown, path: readonly PropertyKey[]): unknown {
  let v = root;
  for (const p of path) {
    if (v === null || typeof v !== 'object') return undefined;
    v = (v as Record<PropertyKey, unknown>)[p];
  }
  return v;
}

/** One sentence for the most useful of the issues (unknown keys first, then schema order). */
export function sentenceFor(issues: readonly Issue[], raw: unknown): string {
  const unknown = issues.find((i) => i.code === 'unrecognized_keys');
  return sentence(unknown ?? issues[0]!, raw, []);
}

function sentence(issue: Issue, raw: unknown, prefix: PropertyKey[]): string {
  const path = [...prefix, ...issue.path];
  if (issue.code === 'unrecognized_keys') return unknownKey(path, issue.keys[0]!);
  if (issue.code === 'invalid_union') {
    // Prefer the branch that got furthest into the value (a list of points with one bad point).
    let best: Issue | undefined;
    for (const branch of issue.errors) {
      const first = branch[0];
      if (first && first.path.length > 0 && (!best || first.path.length > best.path.length)) best = first;
    }
    if (best) return sentence(best, raw, path);
  }
  const key = fieldKey(path);
  const by = valueAt(raw, ['control', 'by']);
  const name = path.length === 0 ? 'the case file' : dotted(path);
  return `${name} ${mustBe(key, by)} (${found(valueAt(raw, path), specOf(key).range !== undefined)})`;
}

/** Keys of the mapping at a field key, from the field table. */
export function knownKeys(objKey: string): string[] {
  const pre = objKey === '' ? '' : `${objKey}.`;
  const out: string[] = [];
  for (const k of Object.keys(FIELDS)) {
    if (k === '' || !k.startsWith(pre)) continue;
    const rest = k.slice(pre.length);
    if (rest !== '' && !/[.[]/.test(rest)) out.push(rest);
  }
  return out;
}

function unknownKey(objPath: PropertyKey[], key: string): string {
  const full = dotted([...objPath, key]);
  const objKey = fieldKey(objPath);
  const near = closest(key, knownKeys(objKey));
  if (near !== undefined) return `${full} is not a known key; did you mean ${dotted([...objPath, near])}?`;
  // A key that belongs to another mapping (holes written at the top level).
  const norm = normalise(key);
  const elsewhere = Object.keys(FIELDS).find((k) => normalise(k.split(/[.[\]]+/).filter(Boolean).pop() ?? '') === norm);
  if (elsewhere !== undefined) return `${full} is not a known key here; did you mean ${elsewhere}?`;
  const where = objPath.length === 0 ? 'the known top-level keys are' : `the known keys of ${dotted(objPath)} are`;
  return `${full} is not a known key; ${where} ${knownKeys(objKey).join(', ')}`;
}

const normalise = (s: string): string => s.toLowerCase().replace(/[-_\s]/g, '');

/** Nearest known key by edit distance, if near enough to be a slip. */
function closest(key: string, candidates: string[]): string | undefined {
  const k = normalise(key);
  let best: string | undefined;
  let bestD = Infinity;
  for (const c of candidates) {
    const d = editDistance(k, normalise(c));
    if (d < bestD) { bestD = d; best = c; }
  }
  const limit = Math.max(1, Math.floor(Math.min(k.length, 12) / 3));
  return bestD <= limit ? best : undefined;
}

/** Optimal string alignment distance (Levenshtein with adjacent swaps). */
export function editDistance(a: string, b: string): number {
  const n = a.length, m = b.length;
  const w = m + 1;
  const d = new Int32Array((n + 1) * w);
  for (let i = 0; i <= n; i++) d[i * w] = i;
  for (let j = 0; j <= m; j++) d[j] = j;
  for (let i = 1; i <= n; i++) {
    for (let j = 1; j <= m; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      let v = Math.min(d[(i - 1) * w + j]! + 1, d[i * w + j - 1]! + 1, d[(i - 1) * w + j - 1]! + cost);
      if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1]) v = Math.min(v, d[(i - 2) * w + j - 2]! + 1);
      d[i * w + j] = v;
    }
  }
  return d[n * w + m]!;
}
