// Our colour maps, built in OKLab so that lightness alone carries the value (they survive greyscale printing).

export interface ColorMap {
  name: string;
  kind: 'sequential' | 'diverging';
  /** 256 colours, #rrggbb. */
  lut: string[];
}

const toLinear = (c: number): number => (c <= 0.04045 ? c / 12.92 : Math.pow((c + 0.055) / 1.055, 2.4));
const toGamma = (c: number): number => (c <= 0.0031308 ? 12.92 * c : 1.055 * Math.pow(c, 1 / 2.4) - 0.055);

/** OKLab → linear sRGB (may leave [0, 1] when out of gamut). */
export function oklabToLinearRgb(L: number, a: number, b: number): [number, number, number] {
  const l = Math.pow(L + 0.3963377774 * a + 0.2158037573 * b, 3);
  const m = Math.pow(L - 0.1055613458 * a - 0.0638541728 * b, 3);
  const s = Math.pow(L - 0.0894841775 * a - 1.291485548 * b, 3);
  return [
    4.0767416621 * l - 3.3077115913 * m + 0.2309699292 * s,
    -1.2684380046 * l + 2.6097574011 * m - 0.3413193965 * s,
    -0.0041960863 * l - 0.7034186147 * m + 1.707614701 * s,
  ];
}

/** #rrggbb → OKLab [L, a, b]. */
export function hexToOklab(hex: string): [number, number, number] {
  const v = parseInt(hex.slice(1), 16);
  const r = toLinear(((v >> 16) & 255) / 255), g = toLinear(((v >> 8) & 255) / 255), b = toLinear((v & 255) / 255);
  const l = Math.cbrt(0.4122214708 * r + 0.5363325363 * g + 0.0514459929 * b);
  const m = Math.cbrt(0.2119034982 * r + 0.6806995451 * g + 0.1073969566 * b);
  const s = Math.cbrt(0.0883024619 * r + 0.2817188376 * g + 0.6299787005 * b);
  return [
    0.2104542553 * l + 0.793617785 * m - 0.0040720468 * s,
    1.9779984951 * l - 2.428592205 * m + 0.4505937099 * s,
    0.0259040371 * l + 0.7827717662 * m - 0.808675766 * s,
  ];
}

/** Relative luminance Y of #rrggbb (what a greyscale print keeps). */
export function luminance(hex: string): number {
  const v = parseInt(hex.slice(1), 16);
  return 0.2126 * toLinear(((v >> 16) & 255) / 255) + 0.7152 * toLinear(((v >> 8) & 255) / 255) + 0.0722 * toLinear((v & 255) / 255);
}

const hex2 = (v: number): string => v.toString(16).padStart(2, '0');

/** OKLCh → gamma-encoded sRGB in [0, 1], lowering chroma (never lightness) until the colour fits. */
function lchRgb(L: number, C: number, hDeg: number): [number, number, number] {
  const h = (hDeg * Math.PI) / 180, ca = Math.cos(h), sa = Math.sin(h);
  const fits = (c: number): boolean => oklabToLinearRgb(L, c * ca, c * sa).every((x) => x >= -1e-6 && x <= 1 + 1e-6);
  let lo = 0, hi = C;
  if (!fits(hi)) {
    for (let i = 0; i < 30; i++) { const mid = (lo + hi) / 2; if (fits(mid)) lo = mid; else hi = mid; }
    C = lo;
  }
  const rgb = oklabToLinearRgb(L, C * ca, C * sa);
  return [toGamma(Math.min(1, Math.max(0, rgb[0]))), toGamma(Math.min(1, Math.max(0, rgb[1]))), toGamma(Math.min(1, Math.max(0, rgb[2])))];
}

/** Piecewise-linear interpolation through knots [t, value]. */
function knots(k: [number, number][], t: number): number {
  if (t <= k[0][0]) return k[0][1];
  for (let i = 1; i < k.length; i++) {
    if (t <= k[i][0]) { const u = (t - k[i - 1][0]) / (k[i][0] - k[i - 1][0]); return k[i - 1][1] + u * (k[i][1] - k[i - 1][1]); }
  }
  return k[k.length - 1][1];
}

/**
 * 256 entries; 8-bit rounding is chosen per entry (floor or ceil of each channel) so that lightness
 * and luminance keep the intended direction: dir(i) = +1 rising, -1 falling, 0 free.
 */
function build(name: string, kind: ColorMap['kind'], f: (t: number) => [number, number, number], dir: (i: number) => number): ColorMap {
  const lut: string[] = [];
  let prevL = NaN, prevY = NaN;
  for (let i = 0; i < 256; i++) {
    const [L, C, h] = f(i / 255);
    const rgb = lchRgb(L, C, h).map((v) => v * 255);
    let best = '', bestErr = Infinity, bestL = 0, bestY = 0, fallback = '', fbErr = Infinity;
    for (let m = 0; m < 8; m++) {
      const c = rgb.map((v, k) => Math.min(255, Math.max(0, (m >> k) & 1 ? Math.ceil(v) : Math.floor(v))));
      const hex = '#' + c.map(hex2).join('');
      const cl = hexToOklab(hex)[0], cy = luminance(hex), err = Math.abs(cl - L);
      if (err < fbErr) { fbErr = err; fallback = hex; }
      const d = dir(i);
      const ok = i === 0 || d === 0 || (d > 0 ? cl > prevL && cy >= prevY : cl < prevL && cy <= prevY);
      if (ok && err < bestErr) { bestErr = err; best = hex; bestL = cl; bestY = cy; }
    }
    if (!best) { best = fallback; bestL = hexToOklab(best)[0]; bestY = luminance(best); }
    lut.push(best);
    prevL = bestL; prevY = bestY;
  }
  return { name, kind, lut };
}

/** Sequential "tide": deep ink blue through sea green to pale sand, lightness rising linearly. */
export const sequential: ColorMap = build('tide', 'sequential', (t) => [
  0.2 + 0.76 * t,
  knots([[0, 0.06], [0.3, 0.1], [0.6, 0.12], [0.85, 0.1], [1, 0.06]], t),
  knots([[0, 268], [0.3, 232], [0.6, 172], [0.85, 125], [1, 95]], t),
], () => 1);

/** Diverging "brine–brick": blue below zero, warm off-white at zero, brick red above; lightness falls away from the centre. */
export const diverging: ColorMap = build('brine-brick', 'diverging', (t) => {
  const s = Math.abs(2 * t - 1); // 0 at the centre, 1 at either end
  const neg = t < 0.5;
  const Le = neg ? 0.38 : 0.4, Ce = neg ? 0.13 : 0.15;
  return [0.965 + (Le - 0.965) * s, 0.008 + (Ce - 0.008) * Math.pow(s, 0.7), neg ? 252 : 32];
}, (i) => (i < 128 ? 1 : i === 128 ? 0 : -1));

/** Damage of cohesive segments: warm gold when intact, dark maroon when traction-free. */
export const damageMap: ColorMap = build('ember', 'sequential', (t) => [
  0.8 - 0.55 * t,
  knots([[0, 0.15], [0.5, 0.19], [1, 0.09]], t),
  knots([[0, 85], [0.5, 40], [1, 20]], t),
], () => -1);

/** Colour at t in [0, 1] (clamped); NaN gives a neutral grey. */
export function colorAt(map: ColorMap, t: number): string {
  if (Number.isNaN(t)) return '#b8b8b8';
  const i = Math.round(Math.min(1, Math.max(0, t)) * 255);
  return map.lut[i];
}
