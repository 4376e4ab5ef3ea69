// Option strings to values, range checks and the sentences that report a wrong one.
import { InputError } from '../errors.js';
import { editDistance } from '../case/messages.js';
import { MATERIAL_NAMES } from './materials.js';
import type { TemplateOption, Values } from './types.js';

export const fmt = (v: number): string => (Number.isFinite(v) ? String(Number(v.toPrecision(6))) : String(v));

const unitText = (unit: string): string => (unit === '' ? '' : unit === '-' ? ', dimensionless' : ` in ${unit}`);

/** Nearest candidate by edit distance when it is close enough to be a slip. */
export function nearest(word: string, candidates: readonly string[]): string | undefined {
  const w = word.toLowerCase();
  let best: string | undefined, bestD = Infinity;
  for (const c of candidates) {
    const d = editDistance(w, c.toLowerCase());
    if (d < bestD) { bestD = d; best = c; }
  }
  return bestD <= Math.max(1, Math.floor(Math.min(w.length, 12) / 3)) ? best : undefined;
}

/** '--notchDepth', 'notch_depth' and 'notch-depth' all name the option notch-depth. */
export const optionKey = (s: string): string =>
  s.trim().replace(/^-+/, '').replace(/([a-z0-9])([A-Z])/g, '$1-$2').replace(/_/g, '-').toLowerCase();

/** The range of a numeric option in words: "a number from 10 to 20000 in mm". */
function rangeText(o: TemplateOption): string {
  const auto = o.default === 'auto' ? 'auto or ' : '';
  const lo = o.min ?? -Infinity, hi = o.max ?? Infinity;
  const span = Number.isFinite(lo) && Number.isFinite(hi) ? ` from ${fmt(lo)} to ${fmt(hi)}`
    : Number.isFinite(lo) ? ` of at least ${fmt(lo)}` : Number.isFinite(hi) ? ` of at most ${fmt(hi)}` : '';
  return `${auto}a number${span}${unitText(o.unit)}`;
}

export const isNumeric = (o: TemplateOption): boolean => typeof o.default === 'number' || o.min !== undefined || o.max !== undefined;

/** One option string to its value; the sentence names the option, its range and unit, and what was found. */
export function parseOption(tpl: string, o: TemplateOption, raw: string): number | string {
  const s = raw.trim();
  if (o.choices) {
    const hit = o.choices.find((c) => c === s.toLowerCase());
    if (hit !== undefined) return hit;
    const near = nearest(s, o.choices);
    throw new InputError(`--${o.name} of template ${tpl} must be one of ${o.choices.join(', ')} (found ${JSON.stringify(raw)})`
      + (near ? `; did you mean ${near}?` : ''));
  }
  if (!isNumeric(o)) {
    // the text goes into the case, whose checks refuse control characters: say so here, at the option
    const m = /[\u0000-\u001f\u007f-\u009f\u2028\u2029]/.exec(s);
    if (m) throw new InputError(`--${o.name} of template ${tpl} must be one line of text without control characters such as line breaks or tabs (found U+${m[0].charCodeAt(0).toString(16).toUpperCase().padStart(4, '0')} at character ${m.index + 1})`);
    return s;
  }
  if (o.default === 'auto' && s.toLowerCase() === 'auto') return 'auto';
  const v = s === '' ? NaN : Number(s);
  const ok = Number.isFinite(v) && (o.min === undefined || v >= o.min) && (o.max === undefined || v <= o.max);
  if (!ok) {
    const found = Number.isFinite(v) ? fmt(v) : JSON.stringify(raw);
    throw new InputError(`--${o.name} of template ${tpl} must be ${rangeText(o)} (found ${found})`);
  }
  return v;
}

/** Defaults under the given values. */
export function withDefaults(options: readonly TemplateOption[], values: Values): Values {
  const out: Values = {};
  for (const o of options) out[o.name] = values[o.name] ?? o.default;
  return out;
}

/** A relation between options: v must lie in [lo, hi]; `because` says which other values set the bounds. */
export function need(tpl: string, name: string, v: number, lo: number, hi: number, unit: string, because: string): void {
  if (v >= lo && v <= hi) return;
  const range = lo <= hi ? `a number from ${fmt(lo)} to ${fmt(hi)}${unitText(unit)}` : `a number${unitText(unit)}, but no value fits`;
  throw new InputError(`--${name} of template ${tpl} must be ${range} ${because} (found ${fmt(v)})`);
}

// Option makers shared by the templates.
export const length = (name: string, def: number, help: string, min = 0.1, max = 100000): TemplateOption =>
  ({ name, unit: 'mm', default: def, min, max, help });

export const materialOption = (def: string): TemplateOption =>
  ({ name: 'material', unit: '', default: def, choices: MATERIAL_NAMES, help: 'material preset' });

export const softeningOption: TemplateOption = {
  name: 'softening', unit: '', default: 'bilinear', choices: ['linear', 'bilinear', 'exponential'], help: 'traction-separation law of the crack',
};

export const meshOptions: TemplateOption[] = [
  { name: 'mesh-size', unit: 'mm', default: 'auto', min: 0.001, max: 100000, help: 'cell size far from the crack' },
  { name: 'tip-size', unit: 'mm', default: 'auto', min: 0.0001, max: 100000, help: 'cell size near notch and crack tips' },
  { name: 'order', unit: '', default: '1', choices: ['1', '2'], help: 'virtual element order (2: quadratic; the brittle-mode templates then write an elastic case)' },
];

/** The element order chosen by --order (absent: 1). */
export const orderOf = (v: Values): 1 | 2 => (v.order === '2' ? 2 : 1);

export const titleOption = (def: string): TemplateOption => ({ name: 'title', unit: '', default: def, help: 'title of the case' });
