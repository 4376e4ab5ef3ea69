// Shared checks of the template tests: the points a case names, and whether each lies on
// the material boundary of the specimen (outline, notch faces and tips, hole edges).
type P = [number, number];

export interface RawCase {
  geometry: { outline: P[]; holes?: { circle?: { center: P; radius: number }; polygon?: P[] }[]; notches?: { from: P; to: P; width?: number }[] };
  supports: { at?: P; along?: [P, P]; fix: string; width?: number }[];
  loads: { at?: P; along?: [P, P]; direction: P; width?: number }[];
  control: { by: string; gauge?: { from: P; to: P }; target: number };
  [k: string]: unknown;
}

function segDist(p: P, a: P, b: P): number {
  const ex = b[0] - a[0], ey = b[1] - a[1], L2 = ex * ex + ey * ey;
  const t = L2 > 0 ? Math.max(0, Math.min(1, ((p[0] - a[0]) * ex + (p[1] - a[1]) * ey) / L2)) : 0;
  return Math.hypot(p[0] - a[0] - t * ex, p[1] - a[1] - t * ey);
}

const onPolyline = (p: P, ring: P[], tol: number): boolean =>
  ring.some((a, i) => segDist(p, a, ring[(i + 1) % ring.length]!) <= tol);

/** Sides and tip end of a notch (a slit is its own segment). */
function notchSides(n: { from: P; to: P; width?: number }): [P, P][] {
  const w = n.width ?? 0, L = Math.hypot(n.to[0] - n.from[0], n.to[1] - n.from[1]);
  if (w === 0) return [[n.from, n.to]];
  const nx = (-(n.to[1] - n.from[1]) / L) * (w / 2), ny = ((n.to[0] - n.from[0]) / L) * (w / 2);
  const f1: P = [n.from[0] + nx, n.from[1] + ny], f2: P = [n.from[0] - nx, n.from[1] - ny];
  const t1: P = [n.to[0] + nx, n.to[1] + ny], t2: P = [n.to[0] - nx, n.to[1] - ny];
  return [[f1, t1], [f2, t2], [t1, t2]];
}

/** Strictly inside the cut of a notch of some width (its open mouth is no material boundary). */
function inCut(p: P, n: { from: P; to: P; width?: number }, tol: number): boolean {
  const w = n.width ?? 0, L = Math.hypot(n.to[0] - n.from[0], n.to[1] - n.from[1]);
  const ux = (n.to[0] - n.from[0]) / L, uy = (n.to[1] - n.from[1]) / L;
  const dx = p[0] - n.from[0], dy = p[1] - n.from[1];
  const s = dx * ux + dy * uy, d = -dx * uy + dy * ux;
  return s > -tol && s < L - tol && Math.abs(d) < w / 2 - tol;
}

/** On the outline (outside any notch mouth), on a notch side or tip, or on a hole edge. */
export function onMaterialBoundary(c: RawCase, p: P, tol = 1e-9): boolean {
  const notches = c.geometry.notches ?? [];
  if (notches.some((n) => inCut(p, n, tol))) return false;
  if (onPolyline(p, c.geometry.outline, tol)) return true;
  if (notches.some((n) => notchSides(n).some(([a, b]) => segDist(p, a, b) <= tol))) return true;
  return (c.geometry.holes ?? []).some((h) => h.circle
    ? Math.abs(Math.hypot(p[0] - h.circle.center[0], p[1] - h.circle.center[1]) - h.circle.radius) <= tol
    : onPolyline(p, h.polygon!, tol));
}

/** Every point that supports, loads and the gauge name, with a label. */
export function namedPoints(c: RawCase): [string, P][] {
  const out: [string, P][] = [];
  c.supports.forEach((s, i) => (s.at ? [s.at] : s.along!).forEach((p, k) => out.push([`supports[${i}]#${k}`, p])));
  c.loads.forEach((l, i) => (l.at ? [l.at] : l.along!).forEach((p, k) => out.push([`loads[${i}]#${k}`, p])));
  if (c.control.gauge) out.push(['control.gauge.from', c.control.gauge.from], ['control.gauge.to', c.control.gauge.to]);
  return out;
}

/** Shoelace area of a ring. */
export function area(ring: P[]): number {
  let s = 0;
  for (let i = 0; i < ring.length; i++) {
    const a = ring[i]!, b = ring[(i + 1) % ring.length]!;
    s += a[0] * b[1] - a[1] * b[0];
  }
  return s / 2;
}

/**
 * A bearing strip of that width centred on p fits on one straight piece of the boundary, or
 * follows the outline (measured along it) while it turns by at most 45° (test rigs).
 */
export function stripFits(c: RawCase, p: P, width: number, tol = 1e-9): boolean {
  const ring = c.geometry.outline;
  const pieces: [P, P][] = ring.map((a, i) => [a, ring[(i + 1) % ring.length]!]);
  for (const n of c.geometry.notches ?? []) pieces.push(...notchSides(n));
  if (pieces.some(([a, b]) => segDist(p, a, b) <= tol
    && Math.hypot(p[0] - a[0], p[1] - a[1]) >= width / 2 - tol && Math.hypot(p[0] - b[0], p[1] - b[1]) >= width / 2 - tol)) return true;
  // walk the outline from p both ways, adding up the turns at the corners passed
  const n = ring.length, i = ring.findIndex((a, k) => segDist(p, a, ring[(k + 1) % n]!) <= tol);
  if (i < 0) return false;
  const at = (k: number) => ring[((k % n) + n) % n]!;
  const dir = (k: number) => Math.atan2(at(k + 1)[1] - at(k)[1], at(k + 1)[0] - at(k)[0]);
  const turn = (k: number) => Math.abs(Math.atan2(Math.sin(dir(k) - dir(k - 1)), Math.cos(dir(k) - dir(k - 1))));
  const len = (k: number) => Math.hypot(at(k + 1)[0] - at(k)[0], at(k + 1)[1] - at(k)[1]);
  let total = 0, left = width / 2 - Math.hypot(at(i + 1)[0] - p[0], at(i + 1)[1] - p[1]), k = i + 1;
  while (left > tol) { total += turn(k); left -= len(k); k++; }
  left = width / 2 - Math.hypot(p[0] - at(i)[0], p[1] - at(i)[1]); k = i;
  while (left > tol) { total += turn(k); k--; left -= len(k); }
  return total <= Math.PI / 4 + 1e-9;
}
