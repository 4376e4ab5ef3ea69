// The spatially random tensile strength of a case (material.strengthField): a stationary
// Gaussian field with the exponential covariance C(r) = exp(−r/ℓ), drawn on a regular grid
// over the specimen by the Cholesky factor of its covariance matrix (the covariance matrix
// decomposition method; Davis, "Production of conditional simulations via the LU triangular
// decomposition of the covariance matrix", Mathematical Geology 19, 1987), then read anywhere
// by bilinear interpolation. ft = mean·(1 + CoV·Y) (normal) or exp(μ + s·Y) (lognormal, with
// the mean and CoV asked). Seeded: the same seed gives the same field. Growth reads it at the
// tips; each cohesive face pair softens with the ft read at its place (Equations.pairCoh).
import type { CaseModel } from '../case/model.js';
import { prng, normalStream } from '../mesh/prng.js';

export interface FieldParams {
  distribution?: 'normal' | 'lognormal';
  cov: number;
  /** mm */
  correlationLength: number;
  seed: number;
  pointsPerLength?: number;
}

/** Strength on a grid: value of node (i, j) at (x0 + i·h, y0 + j·h), i fastest. */
export interface GridField { x0: number; y0: number; h: number; nx: number; ny: number; values: Float64Array }

/** Most grid nodes: the dense factor costs N³/3 operations once per variant. */
export const MAX_NODES = 1000;

/** Lower Cholesky factor of the correlation matrix of an nx × ny grid of spacing h (row-major N × N). */
export function gridFactor(nx: number, ny: number, h: number, ell: number): Float64Array {
  const N = nx * ny, L = new Float64Array(N * N);
  for (let a = 0; a < N; a++) {
    const ia = a % nx, ja = (a - ia) / nx;
    for (let b = 0; b <= a; b++) {
      const ib = b % nx, jb = (b - ib) / nx;
      L[a * N + b] = Math.exp(-Math.hypot(ia - ib, ja - jb) * h / ell);
    }
  }
  for (let j = 0; j < N; j++) {
    const rj = j * N;
    let d = L[rj + j]!;
    for (let k = 0; k < j; k++) d -= L[rj + k]! * L[rj + k]!;
    // a tiny nugget keeps the factor real where near grid points are almost fully correlated
    const djj = Math.sqrt(Math.max(d, 1e-12));
    L[rj + j] = djj;
    for (let i = j + 1; i < N; i++) {
      const ri = i * N;
      let s = L[ri + j]!;
      for (let k = 0; k < j; k++) s -= L[ri + k]! * L[rj + k]!;
      L[ri + j] = s / djj;
    }
  }
  for (let i = 0; i < N; i++) for (let j = i + 1; j < N; j++) L[i * N + j] = 0;
  return L;
}

/** Standard Gaussian values Y = L·z on the grid, z drawn from the seed. */
export function gaussianOnGrid(L: Float64Array, N: number, seed: number): Float64Array {
  const z = new Float64Array(N), next = normalStream(prng(seed));
  for (let i = 0; i < N; i++) z[i] = next();
  const y = new Float64Array(N);
  for (let i = 0; i < N; i++) {
    let s = 0;
    const r = i * N;
    for (let k = 0; k <= i; k++) s += L[r + k]! * z[k]!;
    y[i] = s;
  }
  return y;
}

/** The strength field of mean `ft` over the box [x0, x1] × [y0, y1] (mm). */
export function strengthGrid(p: FieldParams, ft: number, box: { x0: number; y0: number; x1: number; y1: number }): GridField {
  const ell = p.correlationLength;
  let h = ell / (p.pointsPerLength ?? 2);
  const dims = (hh: number) => [Math.ceil((box.x1 - box.x0) / hh) + 1, Math.ceil((box.y1 - box.y0) / hh) + 1] as const;
  // a large specimen over a short correlation length: a coarser grid, not a slower run
  while (dims(h)[0] * dims(h)[1] > MAX_NODES) h *= 1.1;
  const [nx, ny] = dims(h);
  const y = gaussianOnGrid(gridFactor(nx, ny, h, ell), nx * ny, p.seed);
  const values = new Float64Array(nx * ny);
  if ((p.distribution ?? 'lognormal') === 'lognormal') {
    const s2 = Math.log(1 + p.cov * p.cov), mu = Math.log(ft) - s2 / 2, s = Math.sqrt(s2);
    for (let i = 0; i < values.length; i++) values[i] = Math.exp(mu + s * y[i]!);
  } else {
    // a normal strength is kept above 5 % of the mean: a negative strength has no meaning
    for (let i = 0; i < values.length; i++) values[i] = Math.max(0.05 * ft, ft * (1 + p.cov * y[i]!));
  }
  return { x0: box.x0, y0: box.y0, h, nx, ny, values };
}

/** The field at (x, y), bilinear between grid nodes (clamped to the grid). */
export function fieldAt(f: GridField, x: number, y: number): number {
  const u = Math.min(f.nx - 1, Math.max(0, (x - f.x0) / f.h)), v = Math.min(f.ny - 1, Math.max(0, (y - f.y0) / f.h));
  const i = Math.min(f.nx - 2, Math.floor(u)), j = Math.min(f.ny - 2, Math.floor(v));
  if (f.nx < 2 || f.ny < 2) return f.values[0]!;
  const a = u - i, b = v - j, k = j * f.nx + i, V = f.values;
  return (1 - a) * (1 - b) * V[k]! + a * (1 - b) * V[k + 1]! + (1 - a) * b * V[k + f.nx]! + a * b * V[k + f.nx + 1]!;
}

/** ft anywhere in a case's specimen, or null when the case asks for a uniform strength. */
export function strengthOf(c: CaseModel): ((x: number, y: number) => number) | null {
  const p = c.material.strengthField;
  if (!p) return null;
  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
  for (const [x, y] of c.geometry.outline) { x0 = Math.min(x0, x); y0 = Math.min(y0, y); x1 = Math.max(x1, x); y1 = Math.max(y1, y); }
  const f = strengthGrid(p, c.material.ft, { x0, y0, x1, y1 });
  return (x, y) => fieldAt(f, x, y);
}
