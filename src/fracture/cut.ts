// Cutting the mesh along a crack: cells crossed by a ray are split along it, the cut
// points are added to the neighbours that share the cut edges, and afterwards the
// vertices on the new faces are twinned so that the two faces can separate.
import type { WorkMesh } from './workmesh.js';

const TWO_PI = 2 * Math.PI;
const wrap = (a: number): number => { a %= TWO_PI; return a < 0 ? a + TWO_PI : a; };

export interface CutOptions {
  /** Exit points closer than this fraction of the edge length to an edge end snap to it. */
  snapFraction: number;
  /** Rays within this angle (rad) of an edge run along the edge instead of making a sliver. */
  snapAngle: number;
}
export const defaultCut: CutOptions = { snapFraction: 0.2, snapAngle: 0.12 };

export interface CutResult {
  /** Vertex ids along the cut, the first being the start. */
  path: number[];
  /** 'length': stopped at about the asked length; 'boundary': left the material; 'crack': met a crack face. */
  end: 'length' | 'boundary' | 'crack';
}

/** Cell around vertex p that the ray along (dx, dy) enters, or an interior edge it runs along. */
function enteredCell(wm: WorkMesh, p: number, dx: number, dy: number, snapAngle: number):
  { cell: number; alongEdgeTo: number } {
  const ad = Math.atan2(dy, dx);
  let best = -1, bestMargin = -Infinity, alignBest = snapAngle, alignCell = -1, alignTo = -1;
  for (const c of wm.cellsOf(p)) {
    const vs = wm.cells[c]!, n = vs.length, k = vs.indexOf(p);
    const next = vs[(k + 1) % n], prev = vs[(k + n - 1) % n];
    const a1 = Math.atan2(wm.y[next] - wm.y[p], wm.x[next] - wm.x[p]);
    const a0 = Math.atan2(wm.y[prev] - wm.y[p], wm.x[prev] - wm.x[p]);
    const sweep = wrap(a0 - a1), rel = wrap(ad - a1);
    // a ray nearly along an interior edge follows it rather than cutting a sliver
    const d1 = Math.min(rel, TWO_PI - rel), d0 = Math.min(wrap(rel - sweep), wrap(sweep - rel));
    if (d1 < alignBest && wm.neighbourAcross(c, p, next) >= 0) { alignBest = d1; alignCell = c; alignTo = next; }
    if (d0 < alignBest && wm.neighbourAcross(c, prev, p) >= 0) { alignBest = d0; alignCell = c; alignTo = prev; }
    if (rel > 0 && rel < sweep) {
      const margin = Math.min(rel, sweep - rel);
      if (margin > bestMargin) { best = c; bestMargin = margin; }
    }
  }
  if (alignCell >= 0) return { cell: alignCell, alongEdgeTo: alignTo };
  return { cell: best, alongEdgeTo: -1 };
}

/** Split cell c between its vertices p and q (both in its list, not adjacent). */
function splitCell(wm: WorkMesh, c: number, p: number, q: number): [number, number] {
  const vs = wm.cells[c]!, n = vs.length;
  const i = vs.indexOf(p), j = vs.indexOf(q);
  const a: number[] = [], b: number[] = [];
  for (let k = i; ; k = (k + 1) % n) { a.push(vs[k]); if (k === j) break; }
  for (let k = j; ; k = (k + 1) % n) { b.push(vs[k]); if (k === i) break; }
  wm.setCell(c, a);
  const fam = wm.family[c];
  const d = wm.addCell(b, -1);
  // a split cell leaves its refinement family for good
  if (fam >= 0) { wm.families[fam].open = false; wm.family[c] = -1; }
  return [c, d];
}

/**
 * Cut from vertex `start` along the unit direction (dx, dy) for about `length` mm.
 * The cut always ends on a cell edge or vertex, never inside a cell.
 */
export function cutRay(wm: WorkMesh, start: number, dx: number, dy: number, length: number, opt: CutOptions = defaultCut): CutResult {
  const path = [start];
  let p = start, travelled = 0;
  for (let guard = 0; guard < 100000; guard++) {
    const { cell, alongEdgeTo } = enteredCell(wm, p, dx, dy, opt.snapAngle);
    if (cell < 0) return { path, end: 'boundary' };
    let q: number, step: number;
    if (alongEdgeTo >= 0) {
      q = alongEdgeTo;
      step = Math.hypot(wm.x[q] - wm.x[p], wm.y[q] - wm.y[p]);
      if (travelled > 0 && travelled + step - length > length - travelled) return { path, end: 'length' };
    } else {
      const hit = exitPoint(wm, cell, p, dx, dy);
      if (!hit) return { path, end: 'boundary' };
      step = hit.t;
      if (travelled > 0 && travelled + step - length > length - travelled) return { path, end: 'length' };
      const { a, b, s } = hit;
      const nb = wm.neighbourAcross(cell, a, b);
      const elen = Math.hypot(wm.x[b] - wm.x[a], wm.y[b] - wm.y[a]);
      if (s * elen <= opt.snapFraction * elen) q = a;
      else if ((1 - s) * elen <= opt.snapFraction * elen) q = b;
      else {
        q = wm.addVertex(wm.x[a] + s * (wm.x[b] - wm.x[a]), wm.y[a] + s * (wm.y[b] - wm.y[a]), [a, b], [1 - s, s]);
        wm.insertOnEdge(cell, a, b, q);
        if (nb >= 0) wm.insertOnEdge(nb, a, b, q);
      }
      if (q === p) return { path, end: 'boundary' };
      // meeting the face of a crack ends the cut there
      const hitsFace = nb < 0 && wm.face[a] === 1 && wm.face[b] === 1;
      const vs = wm.cells[cell]!, n = vs.length, k = vs.indexOf(p);
      // a side of the cell that runs straight from p to q through collinear vertices (left
      // by refining a neighbour) is followed, not split off as a cell of zero area
      const along = straightChain(wm, cell, p, q);
      if (along) {
        for (const w of along) {
          path.push(w);
          if (wm.face[w] === 1) return { path, end: 'crack' };
        }
      } else if (vs[(k + 1) % n] !== q && vs[(k + n - 1) % n] !== q) splitCell(wm, cell, p, q);
      step = Math.hypot(wm.x[q] - wm.x[p], wm.y[q] - wm.y[p]);
      if (hitsFace || wm.face[q] === 1) { path.push(q); return { path, end: 'crack' }; }
    }
    path.push(q);
    travelled += step;
    p = q;
    if (travelled >= length * (1 - 1e-9)) {
      // a cut that ends on the outline with nothing ahead of it has gone through
      return { path, end: enteredCell(wm, p, dx, dy, opt.snapAngle).cell < 0 ? 'boundary' : 'length' };
    }
  }
  throw new Error('internal: the cut did not end');
}

/**
 * The vertices strictly between p and q along one side of cell c when that side is straight
 * (every one of them on the segment pq); null when neither side is, or p and q are adjacent.
 */
function straightChain(wm: WorkMesh, c: number, p: number, q: number): number[] | null {
  const vs = wm.cells[c]!, n = vs.length, i = vs.indexOf(p), j = vs.indexOf(q);
  const ex = wm.x[q] - wm.x[p], ey = wm.y[q] - wm.y[p], L2 = ex * ex + ey * ey;
  for (const dir of [1, -1]) {
    const mid: number[] = [];
    let ok = true;
    for (let k = (i + dir + n) % n; k !== j; k = (k + dir + n) % n) {
      const w = vs[k], wx = wm.x[w] - wm.x[p], wy = wm.y[w] - wm.y[p];
      const t = (wx * ex + wy * ey) / L2;
      if (Math.abs(wx * ey - wy * ex) > 1e-6 * L2 || t <= 0 || t >= 1) { ok = false; break; }
      mid.push(w);
    }
    if (ok && mid.length > 0) return mid;
  }
  return null;
}

/** First crossing of the ray p + t·d with an edge of cell c not touching p. */
function exitPoint(wm: WorkMesh, c: number, p: number, dx: number, dy: number): { t: number; a: number; b: number; s: number } | null {
  const vs = wm.cells[c]!, n = vs.length;
  const px = wm.x[p], py = wm.y[p];
  let best: { t: number; a: number; b: number; s: number } | null = null;
  for (let k = 0; k < n; k++) {
    const a = vs[k], b = vs[(k + 1) % n];
    if (a === p || b === p) continue;
    const ex = wm.x[b] - wm.x[a], ey = wm.y[b] - wm.y[a];
    const den = dx * ey - dy * ex;
    if (Math.abs(den) < 1e-14 * Math.hypot(ex, ey)) continue;
    const wx = wm.x[a] - px, wy = wm.y[a] - py;
    const t = (wx * ey - wy * ex) / den, s = (wx * dy - wy * dx) / den;
    if (t > 1e-12 && s >= -1e-9 && s <= 1 + 1e-9 && (!best || t < best.t)) best = { t, a, b, s: Math.min(1, Math.max(0, s)) };
  }
  return best;
}

/**
 * Twin the vertices of a cut so that the faces can separate. For each path vertex the
 * cells on the right of the crack (seen along its travel direction) take a new copy.
 * `back` is the point before path[0] on the crack (null at a fresh start); the start and
 * the end are twinned only where asked (a tip inside the material stays one vertex).
 * Returns, per path vertex, [plus, minus] (minus −1 where not twinned).
 */
export function twinAlong(
  wm: WorkMesh, path: number[], back: [number, number] | null, twinStart: boolean, twinEnd: boolean,
): [number, number][] {
  const out: [number, number][] = [];
  for (let i = 0; i < path.length; i++) {
    const v = path[i];
    if ((i === 0 && !twinStart) || (i === path.length - 1 && !twinEnd)) { out.push([v, -1]); continue; }
    const vx = wm.x[v], vy = wm.y[v];
    const bp = i > 0 ? [wm.x[path[i - 1]], wm.y[path[i - 1]]] : back;
    const fp = i + 1 < path.length ? [wm.x[path[i + 1]], wm.y[path[i + 1]]] : null;
    const aBack = bp ? Math.atan2(bp[1] - vy, bp[0] - vx) : NaN;
    const aFwd = fp ? Math.atan2(fp[1] - vy, fp[0] - vx) : NaN;
    const right: number[] = [];
    for (const c of wm.cellsOf(v)) {
      const vs = wm.cells[c]!, n = vs.length, k = vs.indexOf(v);
      const next = vs[(k + 1) % n], prev = vs[(k + n - 1) % n];
      const a1 = Math.atan2(wm.y[next] - vy, wm.x[next] - vx);
      const a0 = Math.atan2(wm.y[prev] - vy, wm.x[prev] - vx);
      const mid = a1 + wrap(a0 - a1) / 2; // bisector of the cell's corner at v
      let isLeft: boolean;
      if (fp && bp) isLeft = wrap(mid - aFwd) < wrap(aBack - aFwd);
      else if (fp) isLeft = Math.sin(mid - aFwd) > 0;
      else isLeft = Math.sin(mid - (aBack + Math.PI)) > 0;
      if (!isLeft) right.push(c);
      wm.cracked[c] = true;
    }
    if (right.length === 0 || right.length === wm.cellsOf(v).length) { out.push([v, -1]); continue; }
    const twin = wm.addVertex(vx, vy, [v], [1]);
    for (const c of right) {
      const vs = wm.cells[c]!.slice();
      vs[vs.indexOf(v)] = twin;
      wm.setCell(c, vs);
    }
    wm.pinned[v] = 1; wm.pinned[twin] = 1;
    wm.face[v] = 1; wm.face[twin] = 1;
    out.push([v, twin]);
  }
  return out;
}
