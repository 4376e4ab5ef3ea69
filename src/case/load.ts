// Reads a case file (YAML or JSON), validates it and fills the defaults.
import { readFileSync } from 'node:fs';
import { basename, extname } from 'node:path';
import { parseDocument } from 'yaml';
import { InputError } from '../errors.js';
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

function parseJson(text: string, fileName: string): unknown {
  try {
    return JSON.parse(text);
  } catch (e) {
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
    return doc.toJS({ maxAliasCount: 100 });
  } catch (e) {
    throw new InputError(`${fileName} is not valid YAML: ${lowerFirst((e as Error).message.split('\n')[0]!)}`);
  }
}

const lowerFirst = (s: string): string => (s.length > 1 && /^[A-Z][a-z]/.test(s) ? s[0]!.toLowerCase() + s.slice(1) : s);

/** Validates the text of a case file (YAML or JSON); every problem is an InputError sentence. */
export function parseCase(text: string, fileName: string): CaseModel {
  if (text.trim() === '') throw new InputError(`${fileName} is empty; a case file needs at least format, units, thickness, geometry, material, supports, loads and control`);
  const raw = looksLikeJson(text, fileName) ? parseJson(text, fileName) : parseYaml(text, fileName);
  return caseFromData(raw, caseName(fileName));
}

/** Validates already-parsed case data (for scripts that build a case as an object). */
export function caseFromData(raw: unknown, name: string): CaseModel {
  const r = caseSchema.safeParse(raw, { reportInput: false });
  if (!r.success) throw new InputError(sentenceFor(r.error.issues, raw));
  const model = fillDefaults(r.data, name);
  checkCase(model);
  return model;
}

/** Reads, validates and fills a case file. */
export function loadCase(path: string): CaseModel {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    const why = code === 'ENOENT' ? 'does not exist' : code === 'EISDIR' ? 'is a folder, not a case file'
      : code === 'EACCES' || code === 'EPERM' ? 'cannot be read (permission denied)' : `cannot be read (${code ?? 'unknown error'})`;
    throw new InputError(`the case file ${path} ${why}`);
  }
  return parseCase(text, path);
}
