// A study file: a base case and how its variants differ (lists over case keys, random
// draws of material values, a random tensile strength field, a series of sizes).
// Every mistake is one sentence naming the field, what was expected and the unit.
import { readFileSync } from 'node:fs';
import { dirname, isAbsolute, join } from 'node:path';
import { parse as parseYaml } from 'yaml';
import { z } from 'zod';
import { InputError } from '../errors.js';

const positive = z.number().positive();
const cov = z.number().min(0).max(2);
const fieldCov = z.number().min(0).max(1);

export const distributionSchema = z.strictObject({
  distribution: z.enum(['normal', 'lognormal', 'weibull']),
  mean: positive,
  cov,
});
export type Distribution = z.infer<typeof distributionSchema>;

export const fieldSchema = z.strictObject({
  distribution: z.enum(['normal', 'lognormal']).optional(),
  cov: fieldCov,
  correlationLength: positive,
  /** Grid points per correlation length where the field is drawn (then interpolated at the cells). */
  pointsPerLength: z.number().int().min(1).max(8).optional(),
});
export type FieldSpec = z.infer<typeof fieldSchema>;

export const studySchema = z.strictObject({
  study: z.literal(1),
  title: z.string().optional(),
  /** The base case: a path relative to the study file, or the case itself. */
  case: z.union([z.string().min(1), z.record(z.string(), z.unknown())]),
  seed: z.number().int().min(0).optional(),
  /** Values set on every variant (dotted case keys), e.g. lighter outputs. */
  set: z.record(z.string(), z.unknown()).optional(),
  /** Lists over dotted case keys; the variants are the product of the lists. */
  vary: z.record(z.string(), z.array(z.unknown()).min(1)).optional(),
  samples: z.strictObject({
    count: z.number().int().min(1).max(100000),
    values: z.record(z.string(), distributionSchema).optional(),
  }).optional(),
  field: z.strictObject({ ft: fieldSchema }).optional(),
  sizes: z.strictObject({
    factors: z.array(positive).min(1),
    /** mm: the characteristic size of the base specimen (default: the outline's height). */
    D: positive.optional(),
    thickness: z.enum(['kept', 'scaled']).optional(),
  }).optional(),
});
export type StudyInput = z.infer<typeof studySchema>;

/** A study with its base case as data. */
export interface StudySpec extends Omit<StudyInput, 'case'> {
  /** The base case as parsed data (validated per variant). */
  case: Record<string, unknown>;
  /** Name of the study (from the file name) for folders. */
  name: string;
  seed: number;
}

const EXPECT: Record<string, string> = {
  study: 'the format number 1',
  case: 'a case file name (relative to the study file) or a case written in place',
  seed: 'a whole number of at least 0',
  'samples.count': 'a whole number of draws from 1 to 100000',
  distribution: 'one of normal, lognormal, weibull (field: normal, lognormal)',
  mean: 'a number above 0, in the unit of the case key',
  cov: 'a coefficient of variation from 0 to 2 (no unit)',
  correlationLength: 'a length above 0 in mm',
  pointsPerLength: 'a whole number from 1 to 8',
  'sizes.factors': 'a list of scale factors above 0 (no unit)',
  'sizes.D': 'a size above 0 in mm',
  'sizes.thickness': 'kept or scaled',
  vary: 'a list of at least one value for each case key',
  title: 'a text',
};

function expectFor(path: (string | number | symbol)[]): string {
  const key = path.filter((p) => typeof p === 'string').join('.');
  const last = String(path.filter((p) => typeof p === 'string').pop() ?? '');
  return EXPECT[key] ?? EXPECT[last] ?? (path[0] === 'vary' ? EXPECT.vary! : 'a value of the form the README describes');
}

function show(v: unknown): string {
  if (v === undefined) return 'nothing';
  const s = JSON.stringify(v);
  return s && s.length > 40 ? s.slice(0, 37) + '...' : String(s);
}

function valueAt(raw: unknown, path: PropertyKey[]): unknown {
  let v: unknown = raw;
  for (const p of path) v = v !== null && typeof v === 'object' ? (v as Record<PropertyKey, unknown>)[p] : undefined;
  return v;
}

/** The first problem of a study file as one sentence. */
function sentence(issue: z.core.$ZodIssue, raw: unknown, file: string): string {
  const path = issue.path as (string | number)[];
  const where = path.length ? path.map((p) => (typeof p === 'number' ? `[${p}]` : p)).join('.').replace(/\.\[/g, '[') : '';
  if (issue.code === 'unrecognized_keys') {
    const at = where ? `${where} of ` : '';
    return `${file}: ${at}the study has no key ${issue.keys.join(', ')}; known keys are study, title, case, seed, set, vary, samples, field, sizes (see the README)`;
  }
  if (!where) return `${file}: a study file must be a map with at least study: 1 and case (found ${show(raw)})`;
  return `${file}: study field ${where} must be ${expectFor(path)} (found ${show(valueAt(raw, path))})`;
}

/** Validates study data; a case named by path is read relative to `baseDir`. */
export function studyFromData(raw: unknown, name: string, baseDir: string, file = `${name}.yaml`): StudySpec {
  const r = studySchema.safeParse(raw, { reportInput: false });
  if (!r.success) throw new InputError(sentence(r.error.issues[0]!, raw, file));
  const d = r.data;
  let caseData: Record<string, unknown>;
  if (typeof d.case === 'string') {
    const p = isAbsolute(d.case) ? d.case : join(baseDir, d.case);
    let text: string;
    try { text = readFileSync(p, 'utf8'); } catch { throw new InputError(`${file}: study field case names ${d.case}, which cannot be read (a case file relative to the study file was expected)`); }
    try { caseData = parseYaml(text) as Record<string, unknown>; } catch (e) { throw new InputError(`${file}: the case file ${d.case} is not valid YAML (${e instanceof Error ? e.message.split('\n')[0] : String(e)})`); }
    if (caseData === null || typeof caseData !== 'object') throw new InputError(`${file}: the case file ${d.case} must hold a map of case keys`);
  } else caseData = d.case;
  for (const [k, v] of Object.entries(d.field?.ft ? { 'field.ft': d.field.ft } : {})) {
    if (v.cov >= 1 && (v.distribution ?? 'lognormal') === 'normal') throw new InputError(`${file}: study field ${k}.cov must be below 1 for a normal field, or the strength turns negative in many cells (found ${v.cov})`);
  }
  for (const [k, v] of Object.entries(d.samples?.values ?? {})) {
    if (v.distribution === 'weibull' && (v.cov < 0.01 || v.cov > 1.5)) throw new InputError(`${file}: study field samples.values.${k}.cov must be from 0.01 to 1.5 for a Weibull distribution (found ${v.cov})`);
  }
  return { ...d, case: caseData, name, seed: d.seed ?? 1 };
}

/** Reads and validates a study file (YAML or JSON). */
export function loadStudy(path: string): StudySpec {
  let text: string;
  try { text = readFileSync(path, 'utf8'); } catch { throw new InputError(`the study file ${path} does not exist or cannot be read`); }
  let raw: unknown;
  try { raw = parseYaml(text); } catch (e) { throw new InputError(`${path} is not valid YAML: ${e instanceof Error ? e.message.split('\n')[0] : String(e)}`); }
  const base = path.split('/').pop()!.replace(/\.(ya?ml|json)$/i, '');
  return studyFromData(raw, base, dirname(path), path);
}
