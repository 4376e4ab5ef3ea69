// Local refinement ahead of crack tips and coarsening behind them.
// A cell is refined by joining its centroid to the middle of each of its sides (a side
// runs between two corners; collinear vertices on it stay), so neighbours only gain
// collinear vertices, which the virtual element method accepts as they are. Children
// remember their family, so far from the tips a family is merged back into its parent.
import type { WorkMesh } from './workmesh.js';
import { segDist2 } from '../geometry/rings.js';

/** Cell size as the spacing of a regular hexagonal tiling with the same cell area. */
export const cellSize = (area: number): number => Math.sqrt(area * 1.1547);

function isCorner(wm: WorkMesh, a: number, v: number, b: number): boolean {
  const ux = wm.x[v] - wm.x[a], uy = wm.y[v] - wm.y[a], wx = wm.x[b] - wm.x[v], wy = wm.y[b] - wm.y[v];
  return Math.abs(ux * wy - uy * wx) > 1e-6 * Math.hypot(ux, uy) * Math.hypot(wx, wy);
}

/** Split one cell into kites around its centroid; false if its shape does not allow it. */
export function refineCell(wm: WorkMesh, c: number): boolean {
  const vs = wm.cells[c]!, n = vs.length;
  const corners: number[] = [];
  for (let k = 0; k < n; k++) if (isCorner(wm, vs[(k + n - 1) % n], vs[k], vs[(k + 1) % n])) corners.push(k);
  if (corners.length < 3) return false;
  const [gx, gy] = wm.centroid(c);
  // star-shaped with respect to the centroid, or the kites would fold
  for (let k = 0; k < n; k++) {
    const i = vs[k], j = vs[(k + 1) % n];
    if ((wm.x[i] - gx) * (wm.y[j] - gy) - (wm.x[j] - gx) * (wm.y[i] - gy) <= 1e-9 * wm.area(c)) return false;
  }
  // middle of each side: an existing vertex near it, else a new one on the edge that holds it
  const list = vs.slice();
  const mids: number[] = [];
  for (let s = 0; s < corners.length; s++) {
    const k0 = corners[s], k1 = corners[(s + 1) % corners.length];
    const seq: number[] = [];
    for (let k = k0; ; k = (k + 1) % n) { seq.push(vs[k]); if (k === k1) break; }
    const cum = [0];
    for (let k = 1; k < seq.length; k++) cum.push(cum[k - 1] + Math.hypot(wm.x[seq[k]] - wm.x[seq[k - 1]], wm.y[seq[k]] - wm.y[seq[k - 1]]));
    const L = cum[cum.length - 1], half = L / 2;
    let near = -1, nearD = 0.2 * L;
    for (let k = 1; k + 1 < seq.length; k++) { const d = Math.abs(cum[k] - half); if (d < nearD) { nearD = d; near = seq[k]; } }
    if (near >= 0) { mids.push(near); continue; }
    let k = 1;
    while (cum[k] < half) k++;
    const a = seq[k - 1], b = seq[k], t = (half - cum[k - 1]) / (cum[k] - cum[k - 1]);
    const m = wm.addVertex(wm.x[a] + t * (wm.x[b] - wm.x[a]), wm.y[a] + t * (wm.y[b] - wm.y[a]), [a, b], [1 - t, t]);
    const nb = wm.neighbourAcross(c, a, b);
    if (nb >= 0) wm.insertOnEdge(nb, a, b, m);
    list.splice(list.indexOf(a) + 1, 0, m);
    mids.push(m);
  }
  const g = wm.addVertex(gx, gy, vs.slice(), vs.map(() => 1 / n));
  const fam = wm.families.length;
  wm.families.push({ children: [], open: true, parentId: c, parentFamily: wm.family[c] });
  wm.removeCell(c);
  const L = list.length;
  for (let s = 0; s < mids.length; s++) {
    const m0 = mids[(s + mids.length - 1) % mids.length], m1 = mids[s];
    const child = [g];
    for (let k = list.indexOf(m0); ; k = (k + 1) % L) { child.push(list[k]); if (list[k] === m1) break; }
    wm.families[fam].children.push(wm.addCell(child, fam));
  }
  return true;
}

/** Refine cells near (cx, cy) until they are about `size` across; returns the number of cells split. */
export function refineAround(wm: WorkMesh, cx: number, cy: number, radius: number, size: number, maxRounds = 6): number {
  return refineAlong(wm, cx, cy, cx, cy, radius, size, maxRounds);
}

/**
 * Refine cells within `radius` of the segment a–b until they are about `size` across, leaving
 * the cells `frozen` says as they are; returns the number of cells split.
 */
export function refineAlong(wm: WorkMesh, ax: number, ay: number, bx: number, by: number, radius: number, size: number, maxRounds = 6, frozen?: (c: number) => boolean): number {
  let total = 0;
  for (let round = 0; round < maxRounds; round++) {
    const todo: number[] = [];
    wm.cells.forEach((vs, c) => {
      if (!vs || wm.cracked[c]) return;
      const a = wm.area(c), h = cellSize(a);
      if (h < 1.5 * size) return;
      if (frozen && frozen(c)) return;
      const [gx, gy] = wm.centroid(c);
      if (Math.sqrt(segDist2(gx, gy, ax, ay, bx, by)) - 0.5 * h < radius) todo.push(c);
    });
    let done = 0;
    for (const c of todo) if (wm.cells[c] && refineCell(wm, c)) done++;
    total += done;
    if (done === 0) break;
  }
  return total;
}

/** Merge one family back into its parent cell; false if it may not be merged. */
function mergeFamily(wm: WorkMesh, f: number): boolean {
  const fam = wm.families[f];
  if (!fam.open) return false;
  for (const ch of fam.children) if (!wm.cells[ch] || wm.family[ch] !== f || wm.cracked[ch]) return false;
  // boundary of the union: directed edges without their reverse
  const next = new Map<number, number>();
  const inner = new Set<number>();
  for (const ch of fam.children) {
    const vs = wm.cells[ch]!;
    for (let k = 0; k < vs.length; k++) next.set(vs[k] * 1e7 + vs[(k + 1) % vs.length], 1);
  }
  const succ = new Map<number, number>();
  for (const ch of fam.children) {
    const vs = wm.cells[ch]!;
    for (let k = 0; k < vs.length; k++) {
      const a = vs[k], b = vs[(k + 1) % vs.length];
      if (next.has(b * 1e7 + a)) { inner.add(a); continue; }
      succ.set(a, b);
    }
  }
  const start = succ.keys().next().value as number;
  const loop = [start];
  for (let v = succ.get(start)!; v !== start; v = succ.get(v)!) {
    loop.push(v);
    if (loop.length > succ.size) return false; // not a single loop: leave the family as it is
  }
  if (loop.length !== succ.size) return false;
  for (const ch of fam.children) wm.removeCell(ch);
  wm.cells[fam.parentId] = null;
  wm.setCell(fam.parentId, loop);
  wm.family[fam.parentId] = fam.parentFamily;
  fam.open = false;
  // side middles that no cell needs as a corner any more are dropped
  for (const v of loop) pruneIfCollinear(wm, v);
  return true;
}

/** Remove vertex v from every cell if it is a made vertex, straight in all its cells. */
function pruneIfCollinear(wm: WorkMesh, v: number): void {
  if (wm.pinned[v] || !wm.from[v]) return;
  const cs = wm.cellsOf(v).slice();
  if (cs.length === 0 || cs.length > 2) return;
  for (const c of cs) {
    const vs = wm.cells[c]!, n = vs.length, k = vs.indexOf(v);
    if (n <= 3 || isCorner(wm, vs[(k + n - 1) % n], v, vs[(k + 1) % n])) return;
  }
  for (const c of cs) { const vs = wm.cells[c]!.slice(); vs.splice(vs.indexOf(v), 1); wm.setCell(c, vs); }
}

/**
 * Merge families whose cells are all farther than `radius` from every kept segment
 * [ax, ay, bx, by] (a point: both ends the same) and none of them `frozen`; returns merges done.
 */
export function coarsenAway(wm: WorkMesh, keep: [number, number, number, number][], radius: number, frozen?: (c: number) => boolean): number {
  let total = 0;
  for (let round = 0; round < 8; round++) {
    let done = 0;
    for (let f = wm.families.length - 1; f >= 0; f--) {
      const fam = wm.families[f];
      if (!fam.open) continue;
      let far = true;
      for (const ch of fam.children) {
        if (!wm.cells[ch] || (frozen && frozen(ch))) { far = false; break; }
        const [gx, gy] = wm.centroid(ch);
        for (const t of keep) if (segDist2(gx, gy, t[0], t[1], t[2], t[3]) < radius * radius) { far = false; break; }
        if (!far) break;
      }
      if (far && mergeFamily(wm, f)) done++;
    }
    total += done;
    if (done === 0) break;
  }
  return total;
}
