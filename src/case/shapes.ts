// Small plane-geometry helpers for checking a case before any mesh exists.
import type { Vec2 } from './model.js';

export const cross = (a: Vec2, b: Vec2, c: Vec2): number =>
  (b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0]);

/** Nearest point of segment ab to p. */
export function nearestOnSegment(p: Vec2, a: Vec2, b: Vec2): Vec2 {
  const dx = b[0] - a[0], dy = b[1] - a[1];
  const len2 = dx * dx + dy * dy;
  let t = len2 > 0 ? ((p[0] - a[0]) * dx + (p[1] - a[1]) * dy) / len2 : 0;
  t = t < 0 ? 0 : t > 1 ? 1 : t;
  return [a[0] + t * dx, a[1] + t * dy];
}

export const dist = (p: Vec2, q: Vec2): number => Math.hypot(p[0] - q[0], p[1] - q[1]);

export const segDist = (p: Vec2, a: Vec2, b: Vec2): number => dist(p, nearestOnSegment(p, a, b));

/** Whether ab and cd cross at one point interior to both (strict orientation change). */
export function properCross(a: Vec2, b: Vec2, c: Vec2, d: Vec2): boolean {
  const d1 = cross(a, b, c), d2 = cross(a, b, d), d3 = cross(c, d, a), d4 = cross(c, d, b);
  return ((d1 > 0 && d2 < 0) || (d1 < 0 && d2 > 0)) && ((d3 > 0 && d4 < 0) || (d3 < 0 && d4 > 0));
}

/** Distance between segments ab and cd (0 when they cross). */
export function segSegDist(a: Vec2, b: Vec2, c: Vec2, d: Vec2): number {
  if (properCross(a, b, c, d)) return 0;
  return Math.min(segDist(a, c, d), segDist(b, c, d), segDist(c, a, b), segDist(d, a, b));
}

/** Even-odd point-in-polygon test (boundary points may go either way). */
export function inPolygon(p: Vec2, poly: readonly Vec2[]): boolean {
  let inside = false;
  const n = poly.length;
  for (let i = 0, j = n - 1; i < n; j = i++) {
    const a = poly[i]!, b = poly[j]!;
    if ((a[1] > p[1]) !== (b[1] > p[1]) && p[0] < ((b[0] - a[0]) * (p[1] - a[1])) / (b[1] - a[1]) + a[0]) inside = !inside;
  }
  return inside;
}

/** Distance from p to the closed polygon's edges. */
export function edgeDist(p: Vec2, poly: readonly Vec2[]): number {
  let best = Infinity;
  for (let i = 0, n = poly.length; i < n; i++) best = Math.min(best, segDist(p, poly[i]!, poly[(i + 1) % n]!));
  return best;
}

export function signedArea(poly: readonly Vec2[]): number {
  let s = 0;
  for (let i = 0, n = poly.length; i < n; i++) {
    const a = poly[i]!, b = poly[(i + 1) % n]!;
    s += a[0] * b[1] - b[0] * a[1];
  }
  return s / 2;
}

export interface Box { x0: number; y0: number; x1: number; y1: number }

export function bbox(pts: readonly Vec2[]): Box {
  const b = { x0: Infinity, y0: Infinity, x1: -Infinity, y1: -Infinity };
  for (const [x, y] of pts) {
    b.x0 = Math.min(b.x0, x); b.y0 = Math.min(b.y0, y); b.x1 = Math.max(b.x1, x); b.y1 = Math.max(b.y1, y);
  }
  return b;
}

/**
 * First pair of edges of a closed polygon that touch or cross (i < j), if any;
 * neighbouring edges count only when they fold back over each other.
 */
export function selfTouch(poly: readonly Vec2[], tol: number, from = 0, fromJ = from + 1): [number, number, Vec2] | undefined {
  const n = poly.length;
  for (let i = from; i < n; i++) {
    for (let j = i === from ? fromJ : i + 1; j < n; j++) {
      if (edgesClash(poly, i, j, tol)) {
        const a = poly[i]!, b = poly[(i + 1) % n]!, c = poly[j]!, d = poly[(j + 1) % n]!;
        const next = j === i + 1, prev = i === 0 && j === n - 1;
        return [i, j, next ? b : prev ? a : meetingPoint(a, b, c, d)];
      }
    }
  }
  return undefined;
}

/** Edges i < j of a closed polygon touch or cross; neighbouring edges only when one runs back along the other. */
export function edgesClash(poly: readonly Vec2[], i: number, j: number, tol: number): boolean {
  const n = poly.length;
  const a = poly[i]!, b = poly[(i + 1) % n]!, c = poly[j]!, d = poly[(j + 1) % n]!;
  const next = j === i + 1, prev = i === 0 && j === n - 1;
  if (next || prev) {
    // Shared vertex; they clash only if one runs back along the other.
    const far = next ? d : c, farOther = next ? a : b;
    return segDist(far, a, b) <= tol || segDist(farOther, c, d) <= tol;
  }
  return segSegDist(a, b, c, d) <= tol;
}

/** Where segments ab and cd cross, or the point of ab nearest to cd when they only come close. */
export function meetingPoint(a: Vec2, b: Vec2, c: Vec2, d: Vec2): Vec2 {
  if (properCross(a, b, c, d)) {
    const t = cross(c, d, a) / (cross(c, d, a) - cross(c, d, b));
    return [a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1])];
  }
  const cands: [Vec2, number][] = [
    [a, segDist(a, c, d)], [b, segDist(b, c, d)],
    [nearestOnSegment(c, a, b), segDist(c, a, b)], [nearestOnSegment(d, a, b), segDist(d, a, b)],
  ];
  cands.sort((u, v) => u[1] - v[1]);
  return cands[0]![0];
}
