// Distorted polygon meshes for patch tests: non-convex cells and collinear (hanging) vertices.
import { WorkMesh } from '../../src/fracture/workmesh.js';
import { refineCell } from '../../src/fracture/adapt.js';
import type { PolyMesh } from '../../src/mesh/polymesh.js';

/** Merge pairs of neighbouring cells into (mostly non-convex) polygons, and refine others
 *  into kites, which leaves collinear (hanging) vertices on their neighbours. */
export function distort(m: PolyMesh, seed: number): { mesh: PolyMesh; nonConvex: number; hanging: number } {
  const wm = WorkMesh.fromPolyMesh(m);
  let nonConvex = 0;
  const nc = wm.cells.length;
  for (let c = seed % 7; c < nc; c += 9) {
    const a = wm.cells[c];
    if (!a) continue;
    // a neighbour across the first edge
    const d = wm.neighbourAcross(c, a[0], a[1]);
    if (d < 0 || !wm.cells[d]) continue;
    const edges = new Map<number, number>();
    for (const cc of [c, d]) { const vs = wm.cells[cc]!; vs.forEach((v, k) => edges.set(v, vs[(k + 1) % vs.length])); }
    // union boundary: drop the shared edge both ways
    const A = wm.cells[c]!, B = wm.cells[d]!;
    const dir = new Set<string>();
    for (const vs of [A, B]) vs.forEach((v, k) => dir.add(`${v},${vs[(k + 1) % vs.length]}`));
    const succ = new Map<number, number>();
    for (const vs of [A, B]) vs.forEach((v, k) => { const w = vs[(k + 1) % vs.length]; if (!dir.has(`${w},${v}`)) succ.set(v, w); });
    const start = succ.keys().next().value!;
    const loop = [start];
    for (let v = succ.get(start)!; v !== start && loop.length <= succ.size; v = succ.get(v)!) loop.push(v);
    if (loop.length !== succ.size) continue;
    wm.removeCell(d);
    wm.setCell(c, loop);
    const n = loop.length;
    for (let k = 0; k < n; k++) {
      const p = loop[(k + n - 1) % n], q = loop[k], r = loop[(k + 1) % n];
      if ((wm.x[q] - wm.x[p]) * (wm.y[r] - wm.y[q]) - (wm.y[q] - wm.y[p]) * (wm.x[r] - wm.x[q]) < -1e-12) { nonConvex++; break; }
    }
  }
  let refined = 0;
  for (let c = (seed + 3) % 5; c < nc; c += 11) if (wm.cells[c] && refineCell(wm, c)) refined++;
  const mesh = wm.toPolyMesh().mesh;
  // count vertices that lie on a straight side of some cell
  let hanging = 0;
  for (let c = 0; c + 1 < mesh.cellStart.length; c++) {
    const s = mesh.cellStart[c], e = mesh.cellStart[c + 1];
    for (let k = s; k < e; k++) {
      const p = mesh.cellVerts[k === s ? e - 1 : k - 1], q = mesh.cellVerts[k], r = mesh.cellVerts[k + 1 < e ? k + 1 : s];
      const cr = (mesh.xy[2 * q] - mesh.xy[2 * p]) * (mesh.xy[2 * r + 1] - mesh.xy[2 * q + 1]) - (mesh.xy[2 * q + 1] - mesh.xy[2 * p + 1]) * (mesh.xy[2 * r] - mesh.xy[2 * q]);
      if (Math.abs(cr) < 1e-10) hanging++;
    }
  }
  return { mesh, nonConvex, hanging: refined > 0 ? hanging : 0 };
}
