// Second-order elastic system on a PolyMesh: global dofs are the vertex values (2 per vertex)
// then the edge-midpoint values (2 per edge); the cell means are condensed out element by
// element (they couple to nothing outside their cell) and recovered after the solve.
import type { PolyMesh } from '../mesh/polymesh.js';
import { Element2Work, NB, elementStiffness2, projection2, strainAt2, displacement2 } from './element2.js';
import { patternFromBlocks, assemblyMap, blockMapOffsets, matrixOnPattern, analyze, factorize } from '../linalg/index.js';

/** Edges of the mesh and where their dofs sit. */
export interface Order2Layout {
  nv: number;
  ne: number;
  /** Two vertex ids per edge. */
  edgeVerts: Int32Array;
  /** Edge of each cell side, aligned with cellVerts (side k joins cellVerts[k] and the next vertex). */
  cellEdges: Int32Array;
  /** Global dofs: 2 nv vertex dofs, then 2 ne edge dofs (edge e at 2 nv + 2e). */
  nDof: number;
  maxVerts: number;
  /** Cells on each edge (1 on the boundary of the mesh, 2 inside). */
  edgeCells: Uint8Array;
}

export function order2Layout(m: PolyMesh): Order2Layout {
  const nv = m.xy.length >> 1, nc = m.cellStart.length - 1;
  const cellEdges = new Int32Array(m.cellVerts.length);
  const byKey = new Map<number, number>(), ev: number[] = [];
  let maxVerts = 3;
  for (let c = 0; c < nc; c++) {
    const s = m.cellStart[c], e = m.cellStart[c + 1];
    maxVerts = Math.max(maxVerts, e - s);
    for (let k = s; k < e; k++) {
      const i = m.cellVerts[k], j = m.cellVerts[k + 1 < e ? k + 1 : s];
      const key = Math.min(i, j) * nv + Math.max(i, j);
      let id = byKey.get(key);
      if (id === undefined) { id = ev.length / 2; byKey.set(key, id); ev.push(i, j); }
      cellEdges[k] = id;
    }
  }
  const ne = ev.length / 2, edgeCells = new Uint8Array(ne);
  for (let k = 0; k < cellEdges.length; k++) edgeCells[cellEdges[k]]++;
  return { nv, ne, edgeVerts: Int32Array.from(ev), cellEdges, nDof: 2 * nv + 2 * ne, maxVerts, edgeCells };
}

/** Global dof of local condensed dof q (0 … 4n−1) of the cell whose vertices start at s. */
function globalDof(m: PolyMesh, L: Order2Layout, s: number, n: number, q: number): number {
  return q < 2 * n ? 2 * m.cellVerts[s + (q >> 1)] + (q & 1) : 2 * L.nv + 2 * L.cellEdges[s + ((q - 2 * n) >> 1)] + (q & 1);
}

export interface Order2Solution {
  /** Vertex then edge-midpoint displacements (nDof). */
  u: Float64Array;
  /** Cell means (2 per cell). */
  mean: Float64Array;
  /** Per cell: centroid x, y, diameter h, then the 12 basis coefficients of Πu (see element2.ts). */
  field: Float64Array;
  /** Unknowns of the global (condensed) system. */
  nFree: number;
}

/** Per-cell stride of Order2Solution.field. */
export const FIELD = 3 + NB;

/**
 * Solve the order-2 elastic problem with the dofs in `fixed` held at `fixedValues` (any mix of
 * vertex and edge dofs) and an optional constant body force (N/mm³) on every cell.
 */
export function solveOrder2(
  m: PolyMesh, L: Order2Layout, C: Float64Array, t: number,
  fixed: Int32Array, fixedValues: Float64Array, body: [number, number] = [0, 0],
): Order2Solution {
  const nc = m.cellStart.length - 1, prescribed = new Float64Array(L.nDof), freeOf = new Int32Array(L.nDof);
  for (let k = 0; k < fixed.length; k++) { freeOf[fixed[k]] = -1; prescribed[fixed[k]] = fixedValues[k]; }
  let nFree = 0;
  for (let d = 0; d < L.nDof; d++) if (freeOf[d] === 0) freeOf[d] = nFree++;

  const blockStart = new Int32Array(nc + 1);
  for (let c = 0; c < nc; c++) blockStart[c + 1] = blockStart[c] + 4 * (m.cellStart[c + 1] - m.cellStart[c]);
  const blockDofs = new Int32Array(blockStart[nc]);
  for (let c = 0; c < nc; c++) {
    const s = m.cellStart[c], n = m.cellStart[c + 1] - s;
    for (let q = 0; q < 4 * n; q++) blockDofs[blockStart[c] + q] = freeOf[globalDof(m, L, s, n, q)];
  }
  const pattern = patternFromBlocks(nFree, blockStart, blockDofs);
  const map = assemblyMap(pattern, blockStart, blockDofs), off = blockMapOffsets(blockStart);
  const K = matrixOnPattern(pattern), f = new Float64Array(nFree);
  const ndMax = 4 * L.maxVerts + 2;
  const Ke = new Float64Array(ndMax * ndMax), w = new Element2Work(L.maxVerts);
  const Kc = new Float64Array(16 * L.maxVerts * L.maxVerts), fc = new Float64Array(4 * L.maxVerts);
  // mean of cell c = rec[c] − Σ_q R_q u_q over its 4n boundary dofs: (Kii⁻¹ fi, Kii⁻¹ Kib) kept from assembly
  const recStart = new Int32Array(nc + 1);
  for (let c = 0; c < nc; c++) recStart[c + 1] = recStart[c] + 2 + 2 * (blockStart[c + 1] - blockStart[c]);
  const rec = new Float64Array(recStart[nc]);

  for (let c = 0; c < nc; c++) {
    const s = m.cellStart[c], e = m.cellStart[c + 1], n = e - s, nd = 4 * n + 2, nb = 4 * n;
    const area = elementStiffness2(m.xy, m.cellVerts, s, e, C, t, Ke, w);
    condense(Ke, nd, t * area * body[0], t * area * body[1], Kc, fc, rec, recStart[c]);
    const o = off[c];
    for (let a = 0; a < nb; a++) {
      const ga = blockDofs[blockStart[c] + a];
      for (let b = 0; b < nb; b++) {
        const mp = map[o + a * nb + b];
        if (mp >= 0) K.values[mp] += Kc[a * nb + b];
      }
      if (ga < 0) continue;
      let r = fc[a];
      for (let b = 0; b < nb; b++) if (blockDofs[blockStart[c] + b] < 0) r -= Kc[a * nb + b] * prescribed[globalDof(m, L, s, n, b)];
      f[ga] += r;
    }
  }
  const uf = nFree > 0 ? factorize(K, analyze(K)).solve(f) : f;
  const u = prescribed.slice();
  for (let d = 0; d < L.nDof; d++) if (freeOf[d] >= 0) u[d] = uf[freeOf[d]];

  // recover the cell means and the projected strain field
  const mean = new Float64Array(2 * nc), field = new Float64Array(FIELD * nc);
  const loc = new Float64Array(ndMax), coef = new Float64Array(NB);
  for (let c = 0; c < nc; c++) {
    const s = m.cellStart[c], e = m.cellStart[c + 1], n = e - s, nd = 4 * n + 2, nb = 4 * n, r = recStart[c];
    projection2(m.xy, m.cellVerts, s, e, w);
    let m0 = rec[r], m1 = rec[r + 1];
    for (let q = 0; q < nb; q++) {
      const v = u[globalDof(m, L, s, n, q)];
      loc[q] = v; m0 -= rec[r + 2 + q] * v; m1 -= rec[r + 2 + nb + q] * v;
    }
    loc[nb] = m0; loc[nb + 1] = m1;
    mean[2 * c] = m0; mean[2 * c + 1] = m1;
    for (let j = 0; j < NB; j++) { let sum = 0; for (let q = 0; q < nd; q++) sum += w.Pi[j * nd + q] * loc[q]; coef[j] = sum; }
    field[FIELD * c] = w.cx; field[FIELD * c + 1] = w.cy; field[FIELD * c + 2] = w.h;
    field.set(coef, FIELD * c + 3);
  }
  return { u, mean, field, nFree };
}

/**
 * Static condensation of the last two (cell-mean) dofs of Ke (nd × nd) carrying the loads
 * (f0, f1): Kc = Kbb − Kbi Kii⁻¹ Kib, fc = −Kbi Kii⁻¹ fi (the body force acts only on the mean).
 * rec[o …] receives Kii⁻¹ fi (2) then the two rows of Kii⁻¹ Kib, to recover the mean.
 */
export function condense(Ke: Float64Array, nd: number, f0: number, f1: number, Kc: Float64Array, fc: Float64Array, rec: Float64Array, o: number): void {
  const nb = nd - 2;
  const k00 = Ke[nb * nd + nb], k01 = Ke[nb * nd + nb + 1], k11 = Ke[(nb + 1) * nd + nb + 1], idet = 1 / (k00 * k11 - k01 * k01);
  const i00 = k11 * idet, i01 = -k01 * idet, i11 = k00 * idet;
  rec[o] = i00 * f0 + i01 * f1; rec[o + 1] = i01 * f0 + i11 * f1;
  for (let b = 0; b < nb; b++) {
    const x = Ke[nb * nd + b], y = Ke[(nb + 1) * nd + b];
    rec[o + 2 + b] = i00 * x + i01 * y; rec[o + 2 + nb + b] = i01 * x + i11 * y;
  }
  for (let a = 0; a < nb; a++) {
    const ka0 = Ke[a * nd + nb], ka1 = Ke[a * nd + nb + 1];
    // row a of Kbi Kii⁻¹
    const g0 = ka0 * i00 + ka1 * i01, g1 = ka0 * i01 + ka1 * i11;
    for (let b = 0; b < nb; b++) Kc[a * nb + b] = Ke[a * nd + b] - g0 * Ke[nb * nd + b] - g1 * Ke[(nb + 1) * nd + b];
    fc[a] = -(g0 * f0 + g1 * f1);
  }
}

/** Strain [εxx, εyy, γxy] of cell c's projected field at (x, y). */
export function strainAtPoint2(field: Float64Array, c: number, x: number, y: number, out: Float64Array | number[]): void {
  const o = FIELD * c, h = field[o + 2];
  strainAt2(field, o + 3, h, (x - field[o]) / h, (y - field[o + 1]) / h, out);
}

/** Stress [σxx, σyy, σxy] of cell c at (x, y) from its projected field. */
export function stressAt2(field: Float64Array, c: number, C: Float64Array, x: number, y: number, out: Float64Array | number[]): void {
  strainAtPoint2(field, c, x, y, out);
  const e0 = out[0], e1 = out[1], e2 = out[2];
  out[0] = C[0] * e0 + C[1] * e1 + C[2] * e2;
  out[1] = C[3] * e0 + C[4] * e1 + C[5] * e2;
  out[2] = C[6] * e0 + C[7] * e1 + C[8] * e2;
}

/** Displacement of Πu in cell c at (x, y). */
export function displacementAt2(field: Float64Array, c: number, x: number, y: number, out: Float64Array | number[]): void {
  const o = FIELD * c, h = field[o + 2];
  displacement2(field.subarray(o + 3, o + 3 + NB), (x - field[o]) / h, (y - field[o + 1]) / h, out);
}
