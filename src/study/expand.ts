// The variants of a study: sizes × the product of the `vary` lists × the sample draws,
// in that order (the last list varies fastest). Each variant is plain case data, valid
// on its own, and its random values depend only on the study seed and its index.
import { caseFromData } from '../case/load.js';
import type { CaseModel } from '../case/model.js';
import { InputError } from '../errors.js';
import { getPath, setPath } from './paths.js';
import { drawFor, mixSeed, textSeed } from './samples.js';
import { outlineHeight, scaleCase } from './scale.js';
import type { StudySpec } from './spec.js';

export type Value = number | string | boolean | null;

export interface Variant {
  index: number;
  /** v0001, v0002, … (folder and file names). */
  id: string;
  /** What sets this variant apart, by dotted key (size.factor and size.D_mm for a series, field.seed for a field). */
  values: Record<string, Value>;
  /** Characteristic size D (mm) of a size series; absent otherwise. */
  D?: number;
  /** The case as data (as a case file would hold it). */
  data: Record<string, unknown>;
}

const clone = <T>(v: T): T => structuredClone(v);

function asValue(v: unknown): Value {
  return typeof v === 'number' || typeof v === 'string' || typeof v === 'boolean' || v === null ? v : JSON.stringify(v);
}

/** Every combination of the lists, the last list varying fastest. */
function product(lists: [string, unknown[]][]): [string, unknown][][] {
  let out: [string, unknown][][] = [[]];
  for (const [k, vs] of lists) out = out.flatMap((row) => vs.map((v) => [...row, [k, v] as [string, unknown]]));
  return out;
}

export function variantCount(s: StudySpec): number {
  const grid = Object.values(s.vary ?? {}).reduce((n, l) => n * l.length, 1);
  return (s.sizes?.factors.length ?? 1) * grid * (s.samples?.count ?? 1);
}

export const MAX_VARIANTS = 10000;

/** The variants of a study as case data, each checked like a case file. */
export function expandStudy(s: StudySpec): Variant[] {
  const n = variantCount(s);
  if (n > MAX_VARIANTS) throw new InputError(`the study has ${n} variants; at most ${MAX_VARIANTS} were expected (shorten the vary lists, samples.count or sizes.factors)`);
  const base = clone(s.case);
  for (const [k, v] of Object.entries(s.set ?? {})) setPath(base, k, clone(v));
  const D0 = s.sizes ? (s.sizes.D ?? outlineHeight(base)) : NaN;
  if (s.sizes && !(D0 > 0)) throw new InputError('study field sizes.D must be a size above 0 in mm (the outline of the case gave none)');
  // a misspelt key is caught when each variant is checked like a case file
  for (const k of Object.keys(s.samples?.values ?? {})) if (getPath(base, k) !== undefined && typeof getPath(base, k) !== 'number') {
    throw new InputError(`study field samples.values.${k} must name a number of the case (such as material.ft in MPa or material.GF in N/mm); the case has ${JSON.stringify(getPath(base, k)) ?? 'no such key'}`);
  }
  const grid = product(Object.entries(s.vary ?? {}));
  const factors = s.sizes?.factors ?? [null];
  const count = s.samples?.count ?? 1;
  const width = Math.max(4, String(n).length);
  const out: Variant[] = [];
  let index = 0;
  for (const f of factors) for (const point of grid) for (let r = 0; r < count; r++, index++) {
    const data = clone(base);
    const values: Record<string, Value> = {};
    if (f !== null) { values['size.factor'] = f; values['size.D_mm'] = f * D0; }
    for (const [k, v] of point) { setPath(data, k, clone(v)); values[k] = asValue(v); }
    for (const [k, d] of Object.entries(s.samples?.values ?? {})) {
      const x = drawFor(d, s.seed, index, k);
      setPath(data, k, x); values[k] = x;
    }
    if (f !== null) scaleCase(data, f, s.sizes?.thickness ?? 'kept');
    if (s.field?.ft) {
      const seed = mixSeed(s.seed, index, textSeed('field.ft'));
      setPath(data, 'material.strengthField', { ...s.field.ft, seed });
      values['field.seed'] = seed;
    }
    const id = `v${String(index + 1).padStart(width, '0')}`;
    const label = Object.entries(values).map(([k, v]) => `${k} ${typeof v === 'number' ? +v.toPrecision(4) : v}`).join(', ');
    data.title = `${typeof data.title === 'string' ? data.title : s.name}, variant ${id}${label ? ` (${label})` : ''}`;
    out.push({ index, id, values, ...(f !== null ? { D: f * D0 } : {}), data });
  }
  return out;
}

/** The model of a variant, or the one sentence saying why its case is not valid. */
export function variantModel(v: Variant, studyName: string): CaseModel {
  try {
    return caseFromData(v.data, `${studyName}-${v.id}`);
  } catch (e) {
    if (e instanceof InputError) throw new InputError(`variant ${v.id} of the study: ${e.message}`);
    throw e;
  }
}
