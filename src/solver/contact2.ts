// Bearing strips on an order-2 node mesh (vem/dofs2.ts): the contact set is decided at the
// vertices. A node's own reaction is ∫ N t ds with its quadratic shape function N, and a
// vertex's N has a negative lobe, so under a platen that pushes everywhere a vertex can still
// show a pull (seen on a rocker: interior points lifted off). A vertex with half the reaction
// of each strip midpoint beside it has ∫ (N_v + ½ N_m) t ds = ∫ φ t ds, φ its linear hat on
// each edge, which is ≥ 0 wherever the platen pushes. A midpoint bears while both ends of its
// edge do.
import type { Order2Layout } from '../vem/system2.js';
import { contactUpdate, type Bearing } from './driven.js';

/**
 * The vertices among node bearings `b` (node ids), each with its own reaction plus half of the
 * strip midpoints next to it, and the least gap of itself and those midpoints (so a midpoint
 * that has gone into the platen brings its edge back).
 */
export function vertexBearings(b: readonly Bearing[], L: Order2Layout): Bearing[] {
  const at = new Map<number, Bearing>(), out: Bearing[] = [];
  for (const x of b) if (x.v < L.nv) { const y = { ...x }; at.set(key(x.strip, x.v), y); out.push(y); }
  for (const x of b) {
    if (x.v < L.nv) continue;
    const e = x.v - L.nv;
    for (const end of [L.edgeVerts[2 * e], L.edgeVerts[2 * e + 1]]) {
      const y = at.get(key(x.strip, end));
      if (!y) continue;
      y.force += 0.5 * x.force;
      y.gap = Math.min(y.gap, x.gap);
    }
  }
  return out;
}

/** The lifted-off nodes from the lifted-off vertices: those vertices and every strip midpoint next to one (sorted). */
export function withMidpoints(vertices: readonly number[], b: readonly Bearing[], L: Order2Layout): number[] {
  const off = new Set(vertices), out = new Set(vertices);
  for (const x of b) {
    if (x.v < L.nv) continue;
    const e = x.v - L.nv;
    if (off.has(L.edgeVerts[2 * e]) || off.has(L.edgeVerts[2 * e + 1])) out.add(x.v);
  }
  return [...out].sort((p, q) => p - q);
}

/**
 * One update of the contact set of a node mesh (node ids, as contactUpdate): decided at the
 * vertices, the midpoints following their edges. Null when nothing changes.
 */
export function contactUpdate2(all: readonly Bearing[], released: readonly number[], L: Order2Layout, tolF: number, tolU: number): number[] | null {
  const next = contactUpdate(vertexBearings(all, L), released.filter((n) => n < L.nv), tolF, tolU);
  return next && withMidpoints(next, all, L);
}

const key = (strip: number, v: number) => strip * 2 ** 32 + v;
