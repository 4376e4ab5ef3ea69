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
  tx: number, ty: number, dx: number, dy: number, R: number,
): TipStress {
  const nc = m.cellStart.length - 1, R2 = R * R;
  let W = 0, sxx = 0, syy = 0, sxy = 0;
  const directed = dx !== 0 || dy !== 0;
  for (let c = 0; c < nc; c++) {
    const rx = centroids[2 * c] - tx, ry = centroids[2 * c + 1] - ty, r2 = rx * rx + ry * ry;
    if (r2 >= R2) continue;
    let w = areas[c] * (1 - r2 / R2);
    if (directed && r2 > 0) { const cs = (rx * dx + ry * dy) / Math.sqrt(r2); const h = (1 + cs) / 2; w *= h * h; }
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
