// Cohesive face pairs of order 2: along each crack segment the opening is quadratic (vertex,
// midpoint, vertex on each face), and the traction is integrated with the three Newton–Cotes
// (Simpson) points of the segment, which are those three nodes: a vertex pair carries 1/6 of
// each segment it ends, a midpoint pair 4/6 of its segment. With one point per node pair the
// interface stays a set of independent pairs, as at order 1 (solver/system.ts).
import type { PairGeom } from '../solver/system.js';
import type { NodeMesh } from '../vem/dofs2.js';
import type { WorkMesh } from './workmesh.js';
import type { Crack } from './state.js';

/** Key of an edge from its two stable vertex ids (either order; exact below 2²⁶ vertices). */
export const edgeKey = (a: number, b: number): number => Math.min(a, b) * 67108864 + Math.max(a, b);

/** Key of a segment's midpoint pair in the history map: negative, from the segment's two stable vertex ids. */
export const midpointKey = (a: number, b: number): number => -1 - edgeKey(a, b);

/** Node pairs (node-mesh ids) of the cohesive cracks with normals and Simpson face areas, and the history key of each. */
export function pairGeometry2(wm: WorkMesh, cracks: readonly Crack[], co: Int32Array, thickness: number, nm: NodeMesh): { geom: PairGeom; plus: number[] } {
  const L = nm.layout, nv = L.nv, edgeOf = new Map<number, number>();
  for (let e = 0; e < L.ne; e++) {
    const a = L.edgeVerts[2 * e], b = L.edgeVerts[2 * e + 1];
    edgeOf.set(Math.min(a, b) * nv + Math.max(a, b), e);
  }
  const mid = (a: number, b: number): number => {
    const e = edgeOf.get(Math.min(a, b) * nv + Math.max(a, b));
    if (e === undefined) throw new Error(`crack segment ${a}–${b} is not an edge of the mesh`);
    return nv + e;
  };
  const plus: number[] = [], minus: number[] = [], nx: number[] = [], ny: number[] = [], area: number[] = [], keys: number[] = [];
  const { x, y } = wm;
  for (const k of cracks) {
    if (k.kind !== 'cohesive') continue;
    const P = k.path, T = k.twins, n = P.length, J = k.joins ?? [], seg = (i: number) => Math.hypot(x[P[i + 1]] - x[P[i]], y[P[i + 1]] - y[P[i]]);
    // where another crack ended on a face, the met vertex keeps the cells on one side of the
    // junction and its copy those on the other: the face's edge toward index i + dir ends on
    // the copy when the copy's cells border that segment (Crack.joins, `after` for dir = +1)
    const onFace = (v: number, dir: 1 | -1): number => {
      const j = J.find((q) => q.v === v);
      return j && j.after === (dir > 0) ? j.copy : v;
    };
    for (let i = 0; i < n; i++) {
      if (T[i] >= 0) {
        const a = i > 0 ? P[i - 1] : P[i], b = i + 1 < n ? P[i + 1] : P[i];
        const tx = x[b] - x[a], ty = y[b] - y[a], l = Math.hypot(tx, ty);
        const before = i > 0 ? seg(i - 1) : 0, after = i + 1 < n ? seg(i) : 0;
        const j = J.find((q) => q.v === P[i] || q.v === T[i]);
        plus.push(co[P[i]]); minus.push(co[T[i]]); keys.push(P[i]);
        nx.push(-ty / l); ny.push(tx / l);
        area.push((j ? (j.after ? before : after) : before + after) * thickness / 6);
        if (j) {
          // the copy pairs with the other face over the segment its cells border (history keyed by the copy)
          const onPlus = j.v === P[i];
          plus.push(co[onPlus ? j.copy : P[i]]); minus.push(co[onPlus ? T[i] : j.copy]); keys.push(j.copy);
          nx.push(-ty / l); ny.push(tx / l); area.push((j.after ? after : before) * thickness / 6);
        }
      }
      if (i + 1 < n && (T[i] >= 0 || T[i + 1] >= 0)) {
        const tx = x[P[i + 1]] - x[P[i]], ty = y[P[i + 1]] - y[P[i]], l = Math.hypot(tx, ty);
        const m0 = T[i] >= 0 ? T[i] : P[i], m1 = T[i + 1] >= 0 ? T[i + 1] : P[i + 1];
        const p0 = J.length ? onFace(P[i], 1) : P[i], p1 = J.length ? onFace(P[i + 1], -1) : P[i + 1];
        const q0 = J.length && T[i] >= 0 ? onFace(m0, 1) : m0, q1 = J.length && T[i + 1] >= 0 ? onFace(m1, -1) : m1;
        plus.push(mid(co[p0], co[p1])); minus.push(mid(co[q0], co[q1])); keys.push(midpointKey(P[i], P[i + 1]));
        nx.push(-ty / l); ny.push(tx / l); area.push(4 * l * thickness / 6);
      }
    }
  }
  return {
    geom: { plus: Int32Array.from(plus), minus: Int32Array.from(minus), nx: Float64Array.from(nx), ny: Float64Array.from(ny), area: Float64Array.from(area) },
    plus: keys,
  };
}
