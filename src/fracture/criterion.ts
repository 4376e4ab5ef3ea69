// Crack-tip check: the major principal stress averaged over a disc around the tip,
// weighted toward the material ahead of it, against the tensile strength.
import type { PolyMesh } from '../mesh/polymesh.js';
import type { SofteningLaw } from '../cohesive/laws.js';

export interface TipStress { s1: number; sxx: number; syy: number; sxy: number; weight: number }

/**
 * Weighted mean stress around (tx, ty) within radius R. Weight per cell: its area times
 * (1 − r²/R²) times ((1 + cos φ)/2)², φ the angle between the cell direction and the current
 * crack direction (dx, dy): cells behind the tip count little, so the kink under mixed
 * mode is not flattened by the stress-free faces behind it. dx = dy = 0: a plain disc.
 */
export function tipStress(
  m: PolyMesh, cellStress: Float64Array, centroids: Float64Array, areas: Float64Array,
  tx: number, ty: number, dx: number, dy: number, R: number, power = 2,
): TipStress {
  const nc = m.cellStart.length - 1, R2 = R * R;
  let W = 0, sxx = 0, syy = 0, sxy = 0;
  const directed = (dx !== 0 || dy !== 0) && power > 0;
  for (let c = 0; c < nc; c++) {
    const rx = centroids[2 * c] - tx, ry = centroids[2 * c + 1] - ty, r2 = rx * rx + ry * ry;
    if (r2 >= R2) continue;
    let w = areas[c] * (1 - r2 / R2);
    if (directed && r2 > 0) { const cs = (rx * dx + ry * dy) / Math.sqrt(r2); const h = (1 + cs) / 2; w *= Math.pow(h, power); }
    W += w; sxx += w * cellStress[3 * c]; syy += w * cellStress[3 * c + 1]; sxy += w * cellStress[3 * c + 2];
  }
  if (W === 0) return { s1: 0, sxx: 0, syy: 0, sxy: 0, weight: 0 };
  sxx /= W; syy /= W; sxy /= W;
  const s1 = (sxx + syy) / 2 + Math.hypot((sxx - syy) / 2, sxy);
  return { s1, sxx, syy, sxy, weight: W };
}

/** Unit crack direction perpendicular to the major principal stress, turned to follow (dx, dy). */
export function growthDirection(t: TipStress, dx: number, dy: number): [number, number] {
  const a = 0.5 * Math.atan2(2 * t.sxy, t.sxx - t.syy); // major principal axis
  let gx = -Math.sin(a), gy = Math.cos(a);
  if (gx * dx + gy * dy < 0) { gx = -gx; gy = -gy; }
  return [gx, gy];
}

/**
 * Direction of the largest hoop stress around the tip (Erdogan & Sih, maximum tangential
 * stress): the stress is sampled on an arc of radius R/2 ahead of the tip (±85° about the
 * current direction), smoothed with a Gaussian of width R/3, and the crack goes where the
 * normal stress across the radial line, σθθ, is largest. Ahead of a mode-I tip the stress is
 * nearly isotropic, so its principal axes say little; the hoop stress still peaks straight ahead.
 */
export function hoopDirection(
  m: PolyMesh, cellStress: Float64Array, centroids: Float64Array, areas: Float64Array,
  tx: number, ty: number, dx: number, dy: number, R: number,
): [number, number] {
  const nc = m.cellStart.length - 1;
  const rs = R / 3, rho = R / 4, reach2 = (rs + 3 * rho) * (rs + 3 * rho), inv2 = 1 / (2 * rho * rho);
  // the cells near the tip, once
  const near: number[] = [];
  for (let c = 0; c < nc; c++) {
    const rx = centroids[2 * c] - tx, ry = centroids[2 * c + 1] - ty;
    if (rx * rx + ry * ry < reach2) near.push(c);
  }
  const a0 = Math.atan2(dy, dx);
  const hoop = (th: number): number => {
    const ux = Math.cos(a0 + th), uy = Math.sin(a0 + th);
    const px = tx + rs * ux, py = ty + rs * uy;
    let W = 0, sxx = 0, syy = 0, sxy = 0;
    for (const c of near) {
      const rx = centroids[2 * c] - px, ry = centroids[2 * c + 1] - py;
      const w = areas[c] * Math.exp(-(rx * rx + ry * ry) * inv2);
      W += w; sxx += w * cellStress[3 * c]; syy += w * cellStress[3 * c + 1]; sxy += w * cellStress[3 * c + 2];
    }
    if (W === 0) return -Infinity;
    // σθθ with the tangent (−uy, ux) of the arc
    return (sxx * uy * uy + syy * ux * ux - 2 * sxy * ux * uy) / W;
  };
  const step = (5 * Math.PI) / 180;
  let best = 0, bestV = -Infinity;
  for (let th = -17 * step; th <= 17 * step + 1e-12; th += step) { const v = hoop(th); if (v > bestV) { bestV = v; best = th; } }
  // parabola through the best sample and its neighbours
  const vm = hoop(best - step), vp = hoop(best + step), den = vm - 2 * bestV + vp;
  if (den < 0) best += Math.max(-0.5, Math.min(0.5, 0.5 * (vm - vp) / den)) * step;
  return [Math.cos(a0 + best), Math.sin(a0 + best)];
}

/** The laid faces of one tip's crack, seen from the tip. */
export interface TipFaces {
  path: readonly number[]; twins: readonly number[];
  /** The tip is the path's last vertex (else its first). */
  fromEnd: boolean;
}

/**
 * The cohesive state the checks read: trial history per pair and the pair of a plus-face vertex;
 * each pair's own ft where a strength field varies it (pairFt), else the one ft.
 */
export interface FaceLoad { pairOf: ReadonlyMap<number, number>; kap: Float64Array; penalty: number; ft: number; pairFt?: ArrayLike<number> }

const ftOfPair = (l: FaceLoad, p: number): number => (l.pairFt ? l.pairFt[p] : l.ft);

/** Traction of the face pair next to the tip over ft, in the trial state (past the peak: more than 1); 0 without pairs. */
export function endPairLoad(f: TipFaces, l: FaceLoad): number {
  const P = f.path, n = P.length;
  for (let j = 0; j < n; j++) {
    const i = f.fromEnd ? n - 1 - j : j;
    if (f.twins[i] < 0) continue;
    const p = l.pairOf.get(P[i]);
    return p === undefined ? 0 : l.kap[p] * l.penalty / ftOfPair(l, p);
  }
  return 0;
}

/** Length along the crack from the tip back to the nearest face pair whose traction has reached a·ft (Infinity if none). */
export function frontDistance(f: TipFaces, l: FaceLoad, x: ArrayLike<number>, y: ArrayLike<number>, a: number): number {
  const P = f.path, n = P.length, fromEnd = f.fromEnd;
  let d = 0;
  for (let j = 0; j < n; j++) {
    const i = fromEnd ? n - 1 - j : j;
    if (j > 0) { const q = fromEnd ? P[i + 1] : P[i - 1]; d += Math.hypot(x[P[i]] - x[q], y[P[i]] - y[q]); }
    if (f.twins[i] < 0) continue;
    const p = l.pairOf.get(P[i]);
    if (p !== undefined && l.kap[p] >= a * ftOfPair(l, p) / l.penalty) return d;
  }
  return Infinity;
}

export interface ReadinessInput {
  /** Averaged major principal stress ahead of the tip (MPa). */
  s1: number; ft: number;
  /** Fraction of ft at which the next segment is laid; growth step (mm). */
  insertAt: number; growthStep: number;
  /** The tip's laid faces: front distance (mm) and end-pair load (fraction of ft); null for a tip without faces. */
  faces: { frontDistance: number; endPairLoad: number } | null;
}

/**
 * How close a tip is to laying its next segment (≥ 1: lay it). The segment is laid intact
 * (the penalty branch of the law), so it changes the response very little until its
 * traction reaches ft; laying it before that keeps the faces from taking more than ft at
 * insertion, where the energy above the law would be lost. A tip without faces lays its
 * first segment as soon as the stress ahead of it is tensile (the bulk is linear, so the
 * direction does not depend on the load level). A grown tip lays the next one when either
 *  - the averaged stress ahead reaches insertAt·ft while the laid interface is short (the
 *    crack's front, the nearest face pair whose traction has reached insertAt·ft, lies
 *    within one growth step of the tip), or
 *  - the face pair next to the tip reaches insertAt·ft: the cohesive zone has caught up
 *    with the end of the interface (an average that takes in a compressed zone ahead, a
 *    beam near its top, would otherwise hold the tip back while its faces are overloaded).
 */
export function readiness(r: ReadinessInput): number {
  if (!r.faces) return r.s1 > 0 ? Infinity : 0;
  const a = r.insertAt;
  const byStress = r.faces.frontDistance <= r.growthStep * (1 + 1e-9) ? r.s1 / (a * r.ft) : 0;
  return Math.max(byStress, r.faces.endPairLoad / a);
}

/** Readiness beyond which a step was too long: the segment laid would start above ft. */
export function overshootLimit(insertAt: number): number { return Math.max(1.05, 1 / insertAt); }

/** Largest softening a step may bring to any cohesive point, as a fraction of ft: a longer step is cut. */
export const SOFTENING_LIMIT = 0.05;

/**
 * Largest softening of any cohesive point between the committed (kap) and trial (kapTrial)
 * histories, as a fraction of ft; the step that takes a point over its peak counts ten
 * times, so the peak load is caught. l0 = ft/penalty is the end of the intact branch. With
 * `laws` (each pair's own, where the strength varies) a pair's drop counts against its own ft.
 * `w` relaxes this as a cohesive zone settles (adaptive steps): a point passing its peak counts
 * w.pass times instead of ten, and a point already softening counts less the more of its
 * strength it has lost (D, a fraction of ft, before the step): its drop over 1 + w.settle·D.
 */
export function softeningJump(kap: Float64Array, kapTrial: Float64Array, ft: number, penalty: number, stress: (w: number) => number,
  laws: readonly { law: SofteningLaw }[] | null = null, w: SofteningWeights = FULL_WEIGHTS): number {
  let worst = 0;
  for (let p = 0; p < kap.length; p++) {
    const k0 = kap[p], k1 = kapTrial[p];
    if (k1 <= k0) continue;
    const law = laws ? laws[p].law : null;
    const d = law ? softeningDrop(k0, k1, law.ft, penalty, law.stress, w) / law.ft : softeningDrop(k0, k1, ft, penalty, stress, w);
    if (d > worst) worst = d;
  }
  return laws ? worst : worst / ft;
}

/** How the drops of `softeningJump` count: a point passing its peak `pass` times, one softening already over 1 + settle·D. */
export interface SofteningWeights { pass: number; settle: number }
/** The full weights: the peak load is caught, every softening point counts alike. */
export const FULL_WEIGHTS: SofteningWeights = { pass: 10, settle: 0 };

/**
 * Fall of the traction (MPa) of a point whose history grows from k0 to k1 (w.pass times the fall
 * below ft when it passes its peak; over 1 + w.settle·(ft − σ(k0))/ft when it was softening already).
 */
function softeningDrop(k0: number, k1: number, ft: number, penalty: number, stress: (w: number) => number, w: SofteningWeights): number {
  const l0 = ft / penalty;
  if (k1 <= l0) return 0;
  // k1 > l0: on the softening branch
  if (k0 <= l0) return w.pass * (ft - stress(k1 - l0));
  const s0 = stress(k0 - l0), drop = s0 - stress(k1 - l0);
  return w.settle > 0 ? drop / (1 + w.settle * (ft - s0) / ft) : drop;
}

/** Largest turn of a grown crack per growth step (rad). */
export const MAX_TURN = Math.PI / 12;

/** Direction (gx, gy) turned back toward (dx, dy) so that it deviates by at most maxTurn. */
export function limitTurn(dx: number, dy: number, gx: number, gy: number, maxTurn: number): [number, number] {
  const a = Math.atan2(dx * gy - dy * gx, dx * gx + dy * gy);
  if (Math.abs(a) <= maxTurn) return [gx, gy];
  const b = Math.atan2(dy, dx) + Math.sign(a) * maxTurn;
  return [Math.cos(b), Math.sin(b)];
}

/**
 * Kink by the maximum tangential stress criterion (Erdogan & Sih 1963) with the mode mixity
 * from the face displacements behind the tip: near a sharp tip the sliding and opening jumps
 * are both ∝ √r with the same factor (κ + 1)/G, so K_II/K_I is their ratio; on intact
 * cohesive faces the jumps are the tractions over the penalty, so the ratio is shear over
 * normal stress on the crack line. `beta` undoes the sliding weight of the law on cohesive
 * faces (1 on traction-free ones). Null when the faces are not open.
 */
export function faceKink(path: readonly number[], twins: readonly number[], beta: number,
  x: ArrayLike<number>, y: ArrayLike<number>, u: Float64Array,
  t: { v: number; dx: number; dy: number }, R: number): [number, number] | null {
  const tx = x[t.v], ty = y[t.v], nx = -t.dy, ny = t.dx;
  // the face on the left of the tip's direction
  const pathDir = (x[path[path.length - 1]] - x[path[0]]) * t.dx + (y[path[path.length - 1]] - y[path[0]]) * t.dy;
  let jn = 0, jt = 0;
  for (let i = 0; i < path.length; i++) {
    if (twins[i] < 0) continue;
    const r = Math.hypot(x[path[i]] - tx, y[path[i]] - ty);
    if (r <= 0 || r > 1.5 * R) continue;
    const [l, rr] = pathDir > 0 ? [path[i], twins[i]] : [twins[i], path[i]];
    const dux = u[2 * l] - u[2 * rr], duy = u[2 * l + 1] - u[2 * rr + 1];
    jn += dux * nx + duy * ny; jt += dux * t.dx + duy * t.dy;
  }
  if (!(jn > 0)) return null;
  const ratio = beta * jt / jn; // K_II / K_I
  const th = Math.abs(ratio) < 1e-12 ? 0 : 2 * Math.atan((1 - Math.sqrt(1 + 8 * ratio * ratio)) / (4 * ratio));
  const c = Math.cos(th), s = Math.sin(th);
  return [c * t.dx - s * t.dy, s * t.dx + c * t.dy];
}

/**
 * The growth direction steered toward weaker material: among directions within ±maxTurn of
 * the one the stress asks for (g), the one with the largest σθθ(δ)/ft ahead, where σθθ(δ) is
 * taken in the mode-I angular form cos³(δ/2) of the maximum tangential stress criterion
 * (Erdogan & Sih 1963) and ft is read half a growth step ahead.
 */
export function weakestDirection(ftAt: (x: number, y: number) => number, x: number, y: number, gx: number, gy: number, reach: number, maxTurn: number): [number, number] {
  const a0 = Math.atan2(gy, gx);
  let best = -Infinity, bx = gx, by = gy;
  for (let k = -6; k <= 6; k++) {
    const d = (k / 6) * maxTurn, a = a0 + d, cx = Math.cos(a), cy = Math.sin(a);
    const score = Math.cos(d / 2) ** 3 / ftAt(x + 0.5 * reach * cx, y + 0.5 * reach * cy);
    if (score > best) { best = score; bx = cx; by = cy; }
  }
  return [bx, by];
}
