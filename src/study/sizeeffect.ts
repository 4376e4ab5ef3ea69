// Bažant's size effect law σN = B·ft / √(1 + D/D0) fitted to a size series (Bažant 1984),
// by the linear regression of (ft/σN)² on D (Bažant & Pfeiffer 1987): Y = A + C·D with
// A = 1/B² and C = 1/(B²·D0). Nominal strength σN = P/(b·D) (b the thickness).

export interface SizeEffectFit {
  B: number;
  /** mm: the transitional size. */
  D0: number;
  ft: number;
  /** Coefficient of determination of the regression. */
  r2: number;
  /** Brittleness numbers β = D/D0 of the points. */
  beta: number[];
}

export const sizeEffectLaw = (f: { B: number; D0: number; ft: number }, D: number): number => (f.B * f.ft) / Math.sqrt(1 + D / f.D0);

/** Nominal strength (MPa) of peak load P (N) on a specimen of size D (mm) and thickness b (mm). */
export const nominalStrength = (P: number, b: number, D: number): number => P / (b * D);

/** The fit through points (D, σN); null when the points do not give a positive B and D0. */
export function fitSizeEffect(D: number[], sigmaN: number[], ft: number): SizeEffectFit | null {
  const n = D.length;
  if (n < 2 || new Set(D).size < 2) return null;
  const Y = sigmaN.map((s) => (ft / s) ** 2);
  const mx = D.reduce((a, b) => a + b, 0) / n, my = Y.reduce((a, b) => a + b, 0) / n;
  let sxy = 0, sxx = 0, syy = 0;
  for (let i = 0; i < n; i++) { sxy += (D[i]! - mx) * (Y[i]! - my); sxx += (D[i]! - mx) ** 2; syy += (Y[i]! - my) ** 2; }
  const C = sxy / sxx, A = my - C * mx;
  if (!(A > 0) || !(C > 0)) return null;
  const B = 1 / Math.sqrt(A), D0 = A / C;
  return { B, D0, ft, r2: syy > 0 ? (sxy * sxy) / (sxx * syy) : 1, beta: D.map((d) => d / D0) };
}
