// Order-2 elastic solves for tests: the exact field prescribed at the boundary vertices and
// boundary edge midpoints (or at chosen ones), everything else free.
import type { PolyMesh } from '../../src/mesh/polymesh.js';
import { order2Layout, solveOrder2, type Order2Layout, type Order2Solution } from '../../src/vem/system2.js';
import type { Field } from './elastic.js';

export interface Solved2 extends Order2Solution { layout: Order2Layout }

/** Held vertices default to those on boundary edges; held edges to the boundary edges. */
export function solvePrescribed2(
  m: PolyMesh, C: Float64Array, t: number, exact: Field,
  body: [number, number] = [0, 0], holdEdge?: (e: number, L: Order2Layout) => boolean,
): Solved2 {
  const L = order2Layout(m), fixed: number[] = [], vals: number[] = [], heldV = new Uint8Array(L.nv);
  const hold = holdEdge ?? ((e: number) => L.edgeCells[e] === 1);
  for (let e = 0; e < L.ne; e++) {
    if (!hold(e, L)) continue;
    const a = L.edgeVerts[2 * e], b = L.edgeVerts[2 * e + 1];
    heldV[a] = 1; heldV[b] = 1;
    const u = exact((m.xy[2 * a] + m.xy[2 * b]) / 2, (m.xy[2 * a + 1] + m.xy[2 * b + 1]) / 2);
    fixed.push(2 * L.nv + 2 * e, 2 * L.nv + 2 * e + 1); vals.push(u[0], u[1]);
  }
  for (let v = 0; v < L.nv; v++) {
    if (!heldV[v]) continue;
    const u = exact(m.xy[2 * v], m.xy[2 * v + 1]);
    fixed.push(2 * v, 2 * v + 1); vals.push(u[0], u[1]);
  }
  return { ...solveOrder2(m, L, C, t, Int32Array.from(fixed), Float64Array.from(vals), body), layout: L };
}
