// Crack-tip check: the major principal stress averaged over a disc around the tip,
// weighted toward the material ahead of it, against the tensile strength.
import type { PolyMesh } from '../mesh/polymesh.js';

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
