// Numbers every template shares: rounding of coordinates, mesh sizes from the specimen and
// the material, and control targets that reach well into the softening branch.
import type { Vec2 } from '../case/model.js';
import { charLength, materialNamed, type MaterialPreset } from './materials.js';
import { fmt, need, orderOf } from './options.js';
import type { Values } from './types.js';

/** Coordinates rounded to 1e-6 mm, so the written text and the checks see the same numbers. */
export const q = (v: number): number => {
  const r = Math.round(v * 1e6) / 1e6;
  return r === 0 ? 0 : r;
};

export const pt = (x: number, y: number): Vec2 => [q(x), q(y)];

const NICE = [1, 1.2, 1.5, 2, 2.5, 3, 4, 5, 6, 8, 10];

/** Largest round number (1, 1.2, 1.5, 2, 2.5, 3, 4, 5, 6, 8 × 10^k) not above v. */
export function niceDown(v: number): number {
  const k = Math.floor(Math.log10(v));
  const s = v / 10 ** k;
  let best = 1;
  for (const n of NICE) if (n <= s * (1 + 1e-12)) best = n;
  return Number((best * 10 ** k).toPrecision(6));
}

/** v to two significant digits. */
export const sig2 = (v: number): number => Number(v.toPrecision(2));

export const num = (v: Values, name: string): number => v[name] as number;
export const str = (v: Values, name: string): string => String(v[name]);

export interface MaterialChoice { preset: MaterialPreset; softening: 'linear' | 'bilinear' | 'exponential' }

export function materialOf(v: Values): MaterialChoice {
  return { preset: materialNamed(str(v, 'material')), softening: str(v, 'softening') as MaterialChoice['softening'] };
}

/** Opening at which the law carries no more stress: 2, 3.6 or 5.14 × GF/ft (laws of the cohesive room). */
export function criticalOpening(m: MaterialChoice): number {
  const k = m.softening === 'linear' ? 2 : m.softening === 'bilinear' ? 3.6 : 5.14;
  return (k * m.preset.GF) / m.preset.ft;
}

/** Rough nominal strength at the peak: ft for specimens small against l_ch, falling as √(l_ch/D) for large ones. */
export function nominalStrength(m: MaterialChoice, size: number): number {
  return m.preset.ft * Math.min(1, Math.sqrt(charLength(m.preset) / size));
}

/** Mouth-opening target: three critical openings plus ten times an elastic mouth opening 5 σ_N a / E at the peak (rule of thumb of the templates). */
export function mouthTarget(m: MaterialChoice, size: number, notch: number): number {
  return sig2(3 * criticalOpening(m) + (50 * nominalStrength(m, size) * notch) / m.preset.E);
}

/** Load-point travel target: six critical openings plus ten times the elastic travel at the peak (rule of thumb of the templates). */
export function travelTarget(m: MaterialChoice, elastic: number): number {
  return sig2(6 * criticalOpening(m) + 10 * elastic);
}

export interface MeshChoice {
  size: number; tipSize: number; refineRadius: number; growthStep: number; averagingRadius: number;
  /** Element order (--order). */
  order?: 1 | 2;
}

/**
 * Cell sizes: `auto` takes autoSize far away and, near tips, autoTip or l_ch / 8 when the
 * material's process zone is smaller; growth step and averaging radius follow the tip cells.
 */
export function meshFor(tpl: string, v: Values, autoSize: number, autoTip: number, m: MaterialChoice, maxSize: number, because: string): MeshChoice {
  const size = v['mesh-size'] === 'auto' ? niceDown(autoSize) : num(v, 'mesh-size');
  need(tpl, 'mesh-size', size, 0, maxSize, 'mm', because);
  const tipAuto = niceDown(Math.min(autoTip, charLength(m.preset) / 8, size));
  const tipSize = v['tip-size'] === 'auto' ? tipAuto : num(v, 'tip-size');
  need(tpl, 'tip-size', tipSize, 0, size, 'mm', `for a mesh-size of ${fmt(size)} mm`);
  return { size, tipSize, refineRadius: q(10 * tipSize), growthStep: q(2 * tipSize), averagingRadius: q(3 * tipSize), order: orderOf(v) };
}

/** The option line written into the header of a case, for re-running the template. */
export function optionLine(v: Values): string {
  // order 1 is the default of the case too: the header names --order only when it is 2
  return Object.entries(v).filter(([k, x]) => !(k === 'order' && x === '1')).map(([k, x]) => `--${k} ${typeof x === 'string' && /\s/.test(x) ? JSON.stringify(x) : x}`).join(' ');
}
