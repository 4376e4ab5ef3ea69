// Round tick values (1, 2, 2.5, 5 × 10^k) and their labels.

const STEPS = [1, 2, 2.5, 5];

/** Round away representation noise such as 0.30000000000000004 at the step's resolution. */
function clean(v: number, step: number): number {
  const dec = Math.max(0, 2 - Math.floor(Math.log10(step)));
  const r = Number(v.toFixed(Math.min(dec, 20)));
  return r === 0 ? 0 : r;
}

/** A span to work with when min == max: ±10 % of the value, or ±1 around zero. */
function widen(v: number): [number, number] {
  const h = v === 0 ? 1 : Math.abs(v) * 0.1;
  return [v - h, v + h];
}

/** The round step giving at most maxCount ticks inside [min, max]. */
export function niceStep(min: number, max: number, maxCount = 6): number {
  if (min > max) [min, max] = [max, min];
  if (min === max) [min, max] = widen(min);
  const span = max - min;
  const count = Math.max(2, Math.floor(maxCount));
  let k = Math.floor(Math.log10(span / count)) - 1;
  for (let guard = 0; guard < 8; guard++, k++) {
    const p = Math.pow(10, k);
    for (const m of STEPS) {
      const step = m * p;
      const first = Math.ceil(min / step - 1e-9), last = Math.floor(max / step + 1e-9);
      if (last - first + 1 <= count) return step;
    }
  }
  return Math.pow(10, Math.ceil(Math.log10(span)));
}

/** Round tick values inside [min, max], at most maxCount of them (default 6). */
export function niceTicks(min: number, max: number, maxCount = 6): number[] {
  if (!Number.isFinite(min) || !Number.isFinite(max)) return [];
  if (min > max) [min, max] = [max, min];
  if (min === max) [min, max] = widen(min);
  const step = niceStep(min, max, maxCount);
  const first = Math.ceil(min / step - 1e-9), last = Math.floor(max / step + 1e-9);
  const out: number[] = [];
  for (let i = first; i <= last; i++) out.push(clean(i * step, step));
  return out;
}

/** An axis: [lo, hi] widened to whole steps of a round step, and its ticks (lo and hi included). */
export function niceAxis(min: number, max: number, maxCount = 6): { lo: number; hi: number; step: number; ticks: number[] } {
  if (!Number.isFinite(min) || !Number.isFinite(max)) [min, max] = [0, 1];
  if (min > max) [min, max] = [max, min];
  if (min === max) [min, max] = widen(min);
  const count = Math.max(2, Math.floor(maxCount));
  let k = Math.floor(Math.log10((max - min) / count)) - 1;
  for (let guard = 0; guard < 8; guard++, k++) {
    const p = Math.pow(10, k);
    for (const m of STEPS) {
      const step = m * p;
      const first = Math.floor(min / step + 1e-9), last = Math.ceil(max / step - 1e-9);
      if (last - first + 1 > count) continue;
      const ticks: number[] = [];
      for (let i = first; i <= last; i++) ticks.push(clean(i * step, step));
      return { lo: ticks[0], hi: ticks[ticks.length - 1], step, ticks };
    }
  }
  return { lo: min, hi: max, step: max - min, ticks: [min, max] };
}

/** [min, max] widened to whole round steps, so that an axis ends on labelled ticks. */
export function niceDomain(min: number, max: number, maxCount = 6): [number, number] {
  const a = niceAxis(min, max, maxCount);
  return [a.lo, a.hi];
}

const SUP: Record<string, string> = { '-': '⁻', '0': '⁰', '1': '¹', '2': '²', '3': '³', '4': '⁴', '5': '⁵', '6': '⁶', '7': '⁷', '8': '⁸', '9': '⁹' };

/** Typographic minus for negative numbers. */
const minus = (s: string): string => (s.startsWith('-') ? '−' + s.slice(1) : s);

/** Labels for a set of ticks: the same number of decimals for all, a power of ten for extreme magnitudes. */
export function formatTicks(ticks: number[]): string[] {
  if (ticks.length === 0) return [];
  const step = ticks.length > 1 ? Math.abs(ticks[1] - ticks[0]) : Math.abs(ticks[0]) || 1;
  const big = Math.max(...ticks.map(Math.abs));
  if (big >= 1e6 || (big > 0 && big < 1e-3)) {
    // shared exponent: 1.5×10⁻⁵
    const e = Math.floor(Math.log10(big));
    const p = Math.pow(10, e);
    const dec = Math.max(0, Math.ceil(-Math.log10(step / p) - 1e-9));
    return ticks.map((t) => {
      if (t === 0) return '0';
      const mant = minus((t / p).toFixed(Math.min(dec, 10)));
      return `${mant}×10${String(e).split('').map((c) => SUP[c]).join('')}`;
    });
  }
  const dec = Math.max(0, Math.ceil(-Math.log10(step) - 1e-9) + (isHalfStep(step) ? 1 : 0));
  return ticks.map((t) => (t === 0 ? '0' : minus(t.toFixed(Math.min(dec, 10)))));
}

/** 2.5 × 10^k needs one more decimal than its power of ten. */
function isHalfStep(step: number): boolean {
  const m = step / Math.pow(10, Math.floor(Math.log10(step) + 1e-9));
  return Math.abs(m - 2.5) < 1e-6;
}

/** One label for a lone value (mark labels, captions). */
export function formatValue(v: number, digits = 3): string {
  if (!Number.isFinite(v)) return String(v);
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e6 || a < 1e-3) {
    const e = Math.floor(Math.log10(a));
    const mant = Number((v / Math.pow(10, e)).toPrecision(digits));
    return `${minus(String(mant))}×10${String(e).split('').map((c) => SUP[c]).join('')}`;
  }
  return minus(String(Number(v.toPrecision(digits))));
}
