// Flat xy rings (no repeated closing vertex): area, orientation, distances.

import type { Vec2 } from '../case/model.js';

/** Signed area of a flat ring (positive when counter-clockwise). */
export function ringArea(r: ArrayLike<number>): number {
  const n = r.length >> 1;
  if (n < 3) return 0;
  const x0 = r[0], y0 = r[1];
  let a = 0;
  for (let i = 1; i + 1 < n; i++) {
    a += (r[2 * i] - x0) * (r[2 * i + 3] - y0) - (r[2 * i + 2] - x0) * (r[2 * i + 1] - y0);
  }
  return a / 2;
}

/** The ring reversed in place when its orientation does not match ccw. */
export function orientRing(r: Float64Array, ccw: boolean): Float64Array {
  if ((ringArea(r) > 0) === ccw) return r;
  const n = r.length >> 1;
  for (let i = 0, j = n - 1; i < j; i++, j--) {
    const x = r[2 * i], y = r[2 * i + 1];
    r[2 * i] = r[2 * j]; r[2 * i + 1] = r[2 * j + 1];
    r[2 * j] = x; r[2 * j + 1] = y;
  }
  return r;
}

/** Flat ring from points, dropping a repeated closing point and consecutive duplicates. */
export function flatRing(pts: ArrayLike<number>[]): Float64Array {
  const out: number[] = [];
  for (const p of pts) {
    const k = out.length;
    if (k >= 2 && out[k - 2] === p[0] && out[k - 1] === p[1]) continue;
    out.push(p[0], p[1]);
  }
  while (out.length >= 4 && out[0] === out[out.length - 2] && out[1] === out[out.length - 1]) out.length -= 2;
  return Float64Array.from(out);
}

/** Squared distance from (px,py) to segment a-b, and the segment parameter of the closest point. */
export function segDist2(px: number, py: number, ax: number, ay: number, bx: number, by: number, out?: number[]): number {
  const dx = bx - ax, dy = by - ay, l2 = dx * dx + dy * dy;
  let t = l2 > 0 ? ((px - ax) * dx + (py - ay) * dy) / l2 : 0;
  t = t < 0 ? 0 : t > 1 ? 1 : t;
  const qx = ax + t * dx - px, qy = ay + t * dy - py;
  if (out) out[0] = t;
  return qx * qx + qy * qy;
}

export const dist = (a: Vec2, b: Vec2): number => Math.hypot(a[0] - b[0], a[1] - b[1]);
