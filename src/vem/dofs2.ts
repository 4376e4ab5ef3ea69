// Order-2 unknowns as nodes: every vertex and every edge midpoint is a node with two
// displacement dofs, and each cell lists its nodes around its boundary (v0, m0, v1, m1, …).
// Seen so, the order-2 unknowns form an ordinary PolyMesh (the node mesh) whose polygons have
// their edge midpoints as extra, collinear corners: supports, loads, strips, gauges, frames and
// VTK read it as they read an order-1 mesh, and a deformed edge is drawn through its midpoint.
// The element itself lives on the base cell (element2.ts); its cell mean is condensed out.
import type { PolyMesh } from '../mesh/polymesh.js';
import { order2Layout, condense, FIELD, stressAt2, type Order2Layout } from './system2.js';
import { Element2Work, NB, elementStiffness2 } from './element2.js';
import { sameCell, cellIdentity, type ElementCache, type ElementReuse } from '../solver/system.js';

export interface NodeMesh {
  base: PolyMesh;
  layout: Order2Layout;
  /** Nodes: the base vertices (same ids), then edge e's midpoint at nv + e; cell c is base cell c. */
  mesh: PolyMesh;
  /** 1 for a midpoint node. */
  mid: Uint8Array;
}

export function nodeMesh(base: PolyMesh): NodeMesh {
  const L = order2Layout(base), nv = L.nv, ne = L.ne, bx = base.xy;
  const xy = new Float64Array(2 * (nv + ne));
  xy.set(bx);
  for (let e = 0; e < ne; e++) {
    const a = L.edgeVerts[2 * e], b = L.edgeVerts[2 * e + 1];
    xy[2 * (nv + e)] = (bx[2 * a] + bx[2 * b]) / 2; xy[2 * (nv + e) + 1] = (bx[2 * a + 1] + bx[2 * b + 1]) / 2;
  }
  const cellStart = base.cellStart.map((v) => 2 * v), cellVerts = new Int32Array(2 * base.cellVerts.length);
  for (let k = 0; k < base.cellVerts.length; k++) { cellVerts[2 * k] = base.cellVerts[k]; cellVerts[2 * k + 1] = nv + L.cellEdges[k]; }
  const mid = new Uint8Array(nv + ne);
  mid.fill(1, nv);
  return { base, layout: L, mesh: { xy, cellStart, cellVerts }, mid };
}

/** Element dof (vertices, then midpoints, of element2.ts) of node-mesh local dof q in a cell of n vertices. */
const elementDof = (q: number, n: number): number => {
  const j = q >> 1;
  return (j & 1) === 0 ? 2 * (j >> 1) + (q & 1) : 2 * n + 2 * (j >> 1) + (q & 1);
};

/**
 * One order-2 cell as the node mesh sees it, kept between topologies (keyed by the work mesh's
 * cell id) while its vertices (stable ids) and coordinates stay: the element depends on nothing
 * else (its midpoints are those of its edges).
 */
export interface Cell2 {
  verts: Int32Array; xy: Float64Array;
  /** Condensed stiffness, 4n × 4n in node order (2 per node around the cell). */
  K: Float64Array;
  /** 12 × 4n: the basis coefficients of Πu from the node values, the cell mean recovered. */
  F: Float64Array;
  /** Centroid and diameter the basis is scaled with. */
  cx: number; cy: number; h: number;
}

/** Order-2 cells kept from one topology to the next (as ElementCache at order 1). */
export type Cell2Cache = ElementCache<Cell2>;

/**
 * Order-2 cells of a node mesh: condensed stiffness blocks in node order, and the projected
 * field. Each cell is computed once per topology, or taken from the cache when given.
 */
export class Order2Cells {
  private readonly cells: Cell2[];
  /** Node values of one cell (scratch). */
  private readonly loc: Float64Array;

  constructor(readonly nm: NodeMesh, readonly D: Float64Array, readonly t: number, reuse?: ElementReuse<Cell2>) {
    const b = nm.base, nc = b.cellStart.length - 1, n = nm.layout.maxVerts, nd = 4 * n + 2;
    const w = new Element2Work(n), Ke = new Float64Array(nd * nd), Kc = new Float64Array(16 * n * n);
    const fc = new Float64Array(4 * n), rec = new Float64Array(2 + 8 * n);
    const kept = reuse ? new Map<number, Cell2>() : null;
    this.cells = new Array<Cell2>(nc);
    this.loc = new Float64Array(4 * n);
    for (let c = 0; c < nc; c++) {
      const s = b.cellStart[c], e = b.cellStart[c + 1];
      const key = reuse ? reuse.cellKey[c] : -1, hit = reuse?.cache.entries.get(key);
      const cell = hit && sameCell(hit, b, reuse!.vertexId, s, e) ? hit
        : this.compute(s, e, reuse ? cellIdentity(b, reuse.vertexId, s, e) : { verts: new Int32Array(0), xy: new Float64Array(0) }, w, Ke, Kc, fc, rec);
      this.cells[c] = cell;
      kept?.set(key, cell);
    }
    if (reuse) reuse.cache.entries = kept!;
  }

  /** Cell s..e of the base mesh: its element with the mean condensed, rearranged to node order. */
  private compute(s: number, e: number, id: { verts: Int32Array; xy: Float64Array }, w: Element2Work,
    Ke: Float64Array, Kc: Float64Array, fc: Float64Array, rec: Float64Array): Cell2 {
    const b = this.nm.base, n = e - s, nb = 4 * n, nd = nb + 2;
    elementStiffness2(b.xy, b.cellVerts, s, e, this.D, this.t, Ke, w);
    condense(Ke, nd, 0, 0, Kc, fc, rec, 0);
    const K = new Float64Array(nb * nb), F = new Float64Array(NB * nb);
    for (let a = 0; a < nb; a++) {
      const pa = elementDof(a, n) * nb;
      for (let q = 0; q < nb; q++) K[a * nb + q] = Kc[pa + elementDof(q, n)];
    }
    // Πu = Π*_b u_b + Π*_m ū with ū = −R u_b (no body force): F = Π*_b − Π*_m R
    for (let j = 0; j < NB; j++) {
      const pm0 = w.Pi[j * nd + nb], pm1 = w.Pi[j * nd + nb + 1];
      for (let q = 0; q < nb; q++) {
        const d = elementDof(q, n);
        F[j * nb + q] = w.Pi[j * nd + d] - pm0 * rec[2 + d] - pm1 * rec[2 + nb + d];
      }
    }
    return { ...id, K, F, cx: w.cx, cy: w.cy, h: w.h };
  }

  /** The 4n × 4n block of cell c in the node mesh's dof order (2 per node around the cell). */
  stiffness(c: number, out: Float64Array): void { out.set(this.cells[c].K); }

  /**
   * Per cell (FIELD stride, as Order2Solution.field): centroid, diameter and the 12 basis
   * coefficients of Πu, from node displacements u (2 per node); the cell mean is recovered.
   */
  field(u: Float64Array): Float64Array {
    const m = this.nm.mesh, nc = m.cellStart.length - 1, out = new Float64Array(FIELD * nc), loc = this.loc;
    for (let c = 0; c < nc; c++) {
      const { F, cx, cy, h } = this.cells[c], s = m.cellStart[c], nb = 2 * (m.cellStart[c + 1] - s), o = FIELD * c;
      for (let q = 0; q < nb; q += 2) { const v = m.cellVerts[s + (q >> 1)]; loc[q] = u[2 * v]; loc[q + 1] = u[2 * v + 1]; }
      out[o] = cx; out[o + 1] = cy; out[o + 2] = h;
      for (let j = 0, r = 0; j < NB; j++, r += nb) {
        let sum = 0;
        for (let q = 0; q < nb; q++) sum += F[r + q] * loc[q];
        out[o + 3 + j] = sum;
      }
    }
    return out;
  }
}

/** Stress [σxx, σyy, σxy] per cell at its centroid, from the projected field (pictures, VTK). */
export function centroidStresses2(field: Float64Array, D: Float64Array): Float64Array {
  const nc = field.length / FIELD, out = new Float64Array(3 * nc), s = [0, 0, 0];
  for (let c = 0; c < nc; c++) {
    stressAt2(field, c, D, field[FIELD * c], field[FIELD * c + 1], s);
    out[3 * c] = s[0]; out[3 * c + 1] = s[1]; out[3 * c + 2] = s[2];
  }
  return out;
}

/**
 * Stress at every node (3 per node): the projections of the cells around it evaluated at the
 * node and averaged (a quadratic displacement field comes out exact).
 */
export function nodeStresses2(nm: NodeMesh, field: Float64Array, D: Float64Array): Float64Array {
  const m = nm.mesh, nn = m.xy.length >> 1, nc = m.cellStart.length - 1;
  const out = new Float64Array(3 * nn), cnt = new Float64Array(nn), s = [0, 0, 0];
  for (let c = 0; c < nc; c++) {
    for (let k = m.cellStart[c]; k < m.cellStart[c + 1]; k++) {
      const v = m.cellVerts[k];
      stressAt2(field, c, D, m.xy[2 * v], m.xy[2 * v + 1], s);
      out[3 * v] += s[0]; out[3 * v + 1] += s[1]; out[3 * v + 2] += s[2]; cnt[v]++;
    }
  }
  for (let v = 0; v < nn; v++) if (cnt[v] > 0) { out[3 * v] /= cnt[v]; out[3 * v + 1] /= cnt[v]; out[3 * v + 2] /= cnt[v]; }
  return out;
}
