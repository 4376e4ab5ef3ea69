// Order-2 unknowns as nodes: every vertex and every edge midpoint is a node with two
// displacement dofs, and each cell lists its nodes around its boundary (v0, m0, v1, m1, …).
// Seen so, the order-2 unknowns form an ordinary PolyMesh (the node mesh) whose polygons have
// their edge midpoints as extra, collinear corners: supports, loads, strips, gauges, frames and
// VTK read it as they read an order-1 mesh, and a deformed edge is drawn through its midpoint.
// The element itself lives on the base cell (element2.ts); its cell mean is condensed out.
import type { PolyMesh } from '../mesh/polymesh.js';
import { order2Layout, condense, FIELD, stressAt2, type Order2Layout } from './system2.js';
import { Element2Work, NB, elementStiffness2 } from './element2.js';

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

/** Order-2 cells of a node mesh: condensed stiffness blocks in node order, and the projected field. */
export class Order2Cells {
  private readonly w: Element2Work;
  private readonly Ke: Float64Array;
  private readonly Kc: Float64Array;
  private readonly fc: Float64Array;
  private readonly rec: Float64Array;
  private readonly loc: Float64Array;

  constructor(readonly nm: NodeMesh, readonly D: Float64Array, readonly t: number) {
    const n = nm.layout.maxVerts, nd = 4 * n + 2;
    this.w = new Element2Work(n);
    this.Ke = new Float64Array(nd * nd); this.Kc = new Float64Array(16 * n * n);
    this.fc = new Float64Array(4 * n); this.rec = new Float64Array(2 + 8 * n); this.loc = new Float64Array(nd);
  }

  /** Element matrix of cell c with its mean condensed: Kc (element order) and the mean's recovery rows in rec. */
  private condensed(c: number): number {
    const b = this.nm.base, s = b.cellStart[c], e = b.cellStart[c + 1], n = e - s;
    elementStiffness2(b.xy, b.cellVerts, s, e, this.D, this.t, this.Ke, this.w);
    condense(this.Ke, 4 * n + 2, 0, 0, this.Kc, this.fc, this.rec, 0);
    return n;
  }

  /** The 4n × 4n block of cell c in the node mesh's dof order (2 per node around the cell). */
  stiffness(c: number, out: Float64Array): void {
    const n = this.condensed(c), nb = 4 * n, Kc = this.Kc;
    for (let a = 0; a < nb; a++) {
      const pa = elementDof(a, n) * nb;
      for (let b = 0; b < nb; b++) out[a * nb + b] = Kc[pa + elementDof(b, n)];
    }
  }

  /**
   * Per cell (FIELD stride, as Order2Solution.field): centroid, diameter and the 12 basis
   * coefficients of Πu, from node displacements u (2 per node); the cell mean is recovered.
   */
  field(u: Float64Array): Float64Array {
    const m = this.nm.mesh, nc = m.cellStart.length - 1, out = new Float64Array(FIELD * nc), { loc, rec, w } = this;
    for (let c = 0; c < nc; c++) {
      const n = this.condensed(c), nb = 4 * n, nd = nb + 2, s = m.cellStart[c];
      for (let q = 0; q < nb; q++) loc[elementDof(q, n)] = u[2 * m.cellVerts[s + (q >> 1)] + (q & 1)];
      let m0 = rec[0], m1 = rec[1];
      for (let q = 0; q < nb; q++) { m0 -= rec[2 + q] * loc[q]; m1 -= rec[2 + nb + q] * loc[q]; }
      loc[nb] = m0; loc[nb + 1] = m1;
      const o = FIELD * c;
      out[o] = w.cx; out[o + 1] = w.cy; out[o + 2] = w.h;
      for (let j = 0; j < NB; j++) {
        let sum = 0;
        for (let q = 0; q < nd; q++) sum += w.Pi[j * nd + q] * loc[q];
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
