// Reads a case file (YAML or JSON), validates it and fills the defaults.
import { basename, extname } from 'node:path';
import { parseDocument } from 'yaml';
import { InputError } from '../errors.js';
import { MAX_CASE_BYTES, readTextFile } from '../io/read.js';
import { checkCase } from './check.js';
import { fillDefaults } from './defaults.js';
import { sentenceFor } from './messages.js';
import type { CaseModel } from './model.js';
import { caseSchema } from './schema.js';

/** Case name from a file name: base name without its extension. */
export function caseName(fileName: string): string {
  const base = basename(fileName);
  const ext = extname(base);
  return ext.length > 0 && ext.length < base.length ? base.slice(0, -ext.length) : base;
}

/** JSON for .json files and for text that opens with a brace outside .yaml/.yml files. */
function looksLikeJson(text: string, fileName: string): boolean {
  const ext = extname(fileName).toLowerCase();
  if (ext === '.json') return true;
  if (ext === '.yaml' || ext === '.yml') return false;
  return /^\s*\{/.test(text);
}

function lineCol(text: string, pos: number): [number, number] {
  let line = 1, col = 1;
  for (let i = 0; i < pos && i < text.length; i++) {
    if (text[i] === '\n') { line++; col = 1; } else col++;
  }
  return [line, col];
}

/** Deepest nesting of lists and mappings a case may have (a real case needs 5). */
export const MAX_DEPTH = 32;

/**
 * One pass over JSON text that JSON.parse accepted: a key written twice in one object (which
 * JSON.parse would take silently, keeping the last) and nesting deeper than MAX_DEPTH are refused.
 */
function checkJsonKeys(text: string, fileName: string): void {
  const stack: (Set<string> | null)[] = [];
  let expectKey = false;
  for (let i = 0; i < text.length; i++) {
    const ch = text.charCodeAt(i);
    if (ch === 0x22) { // a string: find its end, and take it as a key when one is due
      let j = i + 1;
      while (text.charCodeAt(j) !== 0x22) j += text.charCodeAt(j) === 0x5c ? 2 : 1;
      const keys = stack[stack.length - 1];
      if (expectKey && keys) {
        const key = JSON.parse(text.slice(i, j + 1)) as string;
        if (keys.has(key)) {
          const [l, c] = lineCol(text, i);
          throw new InputError(`${fileName} has the key ${JSON.stringify(key)} twice in one mapping at line ${l}, column ${c}; each key may appear once`);
        }
        keys.add(key);
        expectKey = false;
      }
      i = j;
    } else if (ch === 0x7b || ch === 0x5b) { // { [
      stack.push(ch === 0x7b ? new Set() : null);
      expectKey = ch === 0x7b;
      if (stack.length > MAX_DEPTH) throw new InputError(`${fileName} nests lists and mappings more than ${MAX_DEPTH} deep; a case file needs far fewer levels`);
    } else if (ch === 0x7d || ch === 0x5d) { stack.pop(); expectKey = false; }
    else if (ch === 0x2c) expectKey = stack[stack.length - 1] instanceof Set; // ,
  }
}

/** Nesting depth of parsed data, without recursion (YAML aliases can build deep data from short text). */
function checkDepth(v: unknown, fileName: string): void {
  const todo: [unknown, number][] = [[v, 0]];
  const seen = new Set<object>();
  while (todo.length > 0) {
    const [x, d] = todo.pop()!;
    if (x === null || typeof x !== 'object' || seen.has(x)) continue;
    seen.add(x);
    if (d >= MAX_DEPTH) throw new InputError(`${fileName} nests lists and mappings more than ${MAX_DEPTH} deep; a case file needs far fewer levels`);
    for (const e of Object.values(x)) todo.push([e, d + 1]);
  }
}

function parseJson(text: string, fileName: string): unknown {
  try {
    const v: unknown = JSON.parse(text);
    checkJsonKeys(text, fileName);
    return v;
  } catch (e) {
    if (e instanceof InputError) throw e;
    const msg = (e as Error).message;
    const m = /position (\d+)/.exec(msg);
    const reason = msg.replace(/\s*in JSON at position \d+.*$/s, '').replace(/\s*\(line \d+ column \d+\)$/, '');
    const where = m ? (([l, c]) => ` at line ${l}, column ${c}`)(lineCol(text, Number(m[1]))) : '';
    throw new InputError(`${fileName} is not valid JSON${where}: ${lowerFirst(reason)}`);
  }
}

function parseYaml(text: string, fileName: string): unknown {
  const doc = parseDocument(text, { prettyErrors: true, uniqueKeys: true });
  const err = doc.errors[0];
  if (err) {
    const pos = err.linePos?.[0];
    const where = pos ? ` at line ${pos.line}, column ${pos.col}` : '';
    const reason = err.message.split('\n')[0]!.replace(/ at line \d+, column \d+:?\s*$/, '');
    throw new InputError(`${fileName} is not valid YAML${where}: ${lowerFirst(reason)}`);
  }
  try {
    const v: unknown = doc.toJS({ maxAliasCount: 100 });
    checkDepth(v, fileName);
    return v;
  } catch (e) {
    if (e instanceof InputError) throw e;
    if (e instanceof RangeError) throw new InputError(`${fileName} nests lists and mappings more than ${MAX_DEPTH} deep; a case file needs far fewer levels`);
    throw new InputError(`${fileName} is not valid YAML: ${lowerFirst((e as Error).message.split('\n')[0]!)}`);
  }
}

const lowerFirst = (s: string): string => (s.length > 1 && /^[A-Z][a-z]/.test(s) ? s[0]!.toLowerCase() + s.slice(1) : s);

/** Validates the text of a case file (YAML or JSON); every problem is an InputError sentence. */
export function parseCase(text: string, fileName: string): CaseModel {
  if (text.trim() === '') throw new InputError(`${fileName} is empty; a case file needs at least format, units, thickness, geometry, material, supports, loads and control`);
  let raw: unknown;
  try {
    raw = looksLikeJson(text, fileName) ? parseJson(text, fileName) : parseYaml(text, fileName);
  } catch (e) {
    // a parser that recursed too deep
    if (e instanceof RangeError) throw new InputError(`${fileName} nests lists and mappings more than ${MAX_DEPTH} deep; a case file needs far fewer levels`);
    throw e;
  }
  try {
    return caseFromData(raw, caseName(fileName));
  } catch (e) {
    throw decimalComma(text, fileName) ?? e;
  }
}

/**
 * `{ft: 3,1}` reads as ft: 3 and a key "1" (or, in a block, as the text "3,1"): when a case is
 * refused and its text holds a number written with a decimal comma, that is said instead.
 */
function decimalComma(text: string, fileName: string): InputError | undefined {
  const m = /(?:^|[{,\s])"?([A-Za-z][A-Za-z0-9_]*)"?\s*:\s*(-?\d+),(\d+)(?=\s*(?:[,}\]#]|$))/m.exec(text);
  if (!m) return undefined;
  const [line] = lineCol(text, m.index + m[0].indexOf(m[1]!));
  return new InputError(`${m[1]} at line ${line} of ${fileName} must be a number written with a decimal point (found ${m[2]},${m[3]}, a decimal comma; write ${m[2]}.${m[3]})`);
}

/** How many of each thing a case may hold: stated limits, checked before anything else, so a huge case is refused at once. */
export const LIMITS = {
  'geometry.outline': { max: 100_000, what: 'points' },
  'geometry.holes': { max: 5_000, what: 'holes' },
  'geometry.notches': { max: 1_000, what: 'notches' },
  supports: { max: 1_000, what: 'supports' },
  loads: { max: 1_000, what: 'loads' },
  probes: { max: 50_000, what: 'probes' },
  'crack.start': { max: 1_000, what: 'points' },
} as const;
/** Points in all polygon holes together. */
export const MAX_HOLE_POINTS = 200_000;

function checkCounts(raw: unknown): void {
  const at = (path: string): unknown => path.split('.').reduce<unknown>((v, k) => (v !== null && typeof v === 'object' ? (v as Record<string, unknown>)[k] : undefined), raw);
  for (const [path, { max, what }] of Object.entries(LIMITS)) {
    const v = at(path);
    if (Array.isArray(v) && v.length > max) throw new InputError(`${path} may hold at most ${max.toLocaleString('en-US')} ${what} (found ${v.length.toLocaleString('en-US')})`);
  }
  const holes = at('geometry.holes');
  if (Array.isArray(holes)) {
    let n = 0;
    for (const h of holes) { const p = (h as { polygon?: unknown } | null)?.polygon; if (Array.isArray(p)) n += p.length; }
    if (n > MAX_HOLE_POINTS) throw new InputError(`geometry.holes may hold at most ${MAX_HOLE_POINTS.toLocaleString('en-US')} polygon points in all (found ${n.toLocaleString('en-US')})`);
  }
}

/** Validates already-parsed case data (for scripts that build a case as an object). */
export function caseFromData(raw: unknown, name: string): CaseModel {
  checkCounts(raw);
  const r = caseSchema.safeParse(raw, { reportInput: false });
  if (!r.success) throw new InputError(sentenceFor(r.error.issues, raw));
  const model = fillDefaults(r.data, name);
  checkCase(model);
  return model;
}

/** Reads, validates and fills a case file (a regular file of at most MAX_CASE_BYTES). */
export function loadCase(path: string): CaseModel {
  return parseCase(readTextFile(path, 'the case file', MAX_CASE_BYTES), path);
}
