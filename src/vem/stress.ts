// Cell stresses (constant per polygon) and the recovered vertex field used for probes and pictures.
import type { PolyMesh } from '../mesh/polymesh.js';
import { cellStrain } from './element.js';

/** σ = D ε per cell: 3 per cell [σxx, σyy, σxy] (MPa). */
export function cellStresses(m: PolyMesh, u: Float64Array, D: Float64Array, out?: Float64Array): Float64Array {
  const nc = m.cellStart.length - 1;
  const s = out ?? new Float64Array(3 * nc);
  let maxn = 3;
  for (let c = 0; c < nc; c++) maxn = Math.max(maxn, m.cellStart[c + 1] - m.cellStart[c]);
  const q = new Float64Array(2 * maxn), eps = new Float64Array(3);
  for (let c = 0; c < nc; c++) {
    cellStrain(m.xy, m.cellVerts, m.cellStart[c], m.cellStart[c + 1], u, q, eps);
    const exx = eps[0], eyy = eps[1], gxy = eps[2];
    s[3 * c] = D[0] * exx + D[1] * eyy + D[2] * gxy;
    s[3 * c + 1] = D[3] * exx + D[4] * eyy + D[5] * gxy;
    s[3 * c + 2] = D[6] * exx + D[7] * eyy + D[8] * gxy;
  }
  return s;
}

/**
 * Vertex stresses by area-weighted averaging of the cells around each vertex.
 * Constant cell stresses are first-order accurate; the average removes the cell-to-cell jumps
 * and is what probes report (never a single raw cell value).
 */
export function vertexStresses(m: PolyMesh, cellStress: Float64Array, cellAreas: Float64Array, out?: Float64Array): Float64Array {
  const nv = m.xy.length >> 1, nc = m.cellStart.length - 1;
  const sv = out ?? new Float64Array(3 * nv);
  sv.fill(0);
  const wsum = new Float64Array(nv);
  for (let c = 0; c < nc; c++) {
    const a = cellAreas[c];
    for (let k = m.cellStart[c]; k < m.cellStart[c + 1]; k++) {
      const v = m.cellVerts[k];
      wsum[v] += a;
      sv[3 * v] += a * cellStress[3 * c]; sv[3 * v + 1] += a * cellStress[3 * c + 1]; sv[3 * v + 2] += a * cellStress[3 * c + 2];
    }
  }
  for (let v = 0; v < nv; v++) if (wsum[v] > 0) { const iw = 1 / wsum[v]; sv[3 * v] *= iw; sv[3 * v + 1] *= iw; sv[3 * v + 2] *= iw; }
  return sv;
}

/** Signed cell areas (positive for counter-clockwise cells). */
export function cellAreas(m: PolyMesh, out?: Float64Array): Float64Array {
  const nc = m.cellStart.length - 1, a = out ?? new Float64Array(nc);
  const { xy, cellStart, cellVerts } = m;
  for (let c = 0; c < nc; c++) {
    const s = cellStart[c], e = cellStart[c + 1];
    let sum = 0;
    for (let k = s; k < e; k++) {
      const i = cellVerts[k], j = cellVerts[k + 1 < e ? k + 1 : s];
      sum += xy[2 * i] * xy[2 * j + 1] - xy[2 * j] * xy[2 * i + 1];
    }
    a[c] = sum / 2;
  }
  return a;
}

/**
 * Vertex stresses recovered by a local linear least-squares fit of the cell stresses over the
 * cells around each vertex (their centroids carry the constant cell values), evaluated at the
 * vertex. Second-order at interior and boundary vertices alike, so a stress concentration on
 * an edge is not flattened as by plain averaging; where the patch is too small or degenerate
 * the area-weighted average is kept.
 */
export function recoveredVertexStresses(m: PolyMesh, cellStress: Float64Array, cellAreasArr: Float64Array, centroids: Float64Array, out?: Float64Array): Float64Array {
  const nv = m.xy.length >> 1, nc = m.cellStart.length - 1;
  const sv = vertexStresses(m, cellStress, cellAreasArr, out);
  // cells of each vertex as a CSR list
  const ptr = new Int32Array(nv + 1);
  for (let k = 0; k < m.cellVerts.length; k++) ptr[m.cellVerts[k] + 1]++;
  for (let v = 0; v < nv; v++) ptr[v + 1] += ptr[v];
  const lst = new Int32Array(ptr[nv]), fill = ptr.slice(0, nv);
  for (let c = 0; c < nc; c++) for (let k = m.cellStart[c]; k < m.cellStart[c + 1]; k++) lst[fill[m.cellVerts[k]]++] = c;
  for (let v = 0; v < nv; v++) {
    const n = ptr[v + 1] - ptr[v];
    if (n < 3) continue;
    const vx = m.xy[2 * v], vy = m.xy[2 * v + 1];
    // normal equations of [1, dx, dy] with area weights
    let s00 = 0, s01 = 0, s02 = 0, s11 = 0, s12 = 0, s22 = 0, scale = 0;
    for (let k = ptr[v]; k < ptr[v + 1]; k++) {
      const c = lst[k], w = cellAreasArr[c], dx = centroids[2 * c] - vx, dy = centroids[2 * c + 1] - vy;
      s00 += w; s01 += w * dx; s02 += w * dy; s11 += w * dx * dx; s12 += w * dx * dy; s22 += w * dy * dy;
      scale += w * (dx * dx + dy * dy);
    }
    const c00 = s11 * s22 - s12 * s12, c01 = s02 * s12 - s01 * s22, c02 = s01 * s12 - s02 * s11;
    const det = s00 * c00 + s01 * c01 + s02 * c02;
    // a nearly collinear patch of centroids cannot carry a gradient: keep the average
    if (!(det > 1e-5 * s00 * scale * scale)) continue;
    for (let q = 0; q < 3; q++) {
      let b0 = 0, b1 = 0, b2 = 0;
      for (let k = ptr[v]; k < ptr[v + 1]; k++) {
        const c = lst[k], w = cellAreasArr[c] * cellStress[3 * c + q];
        b0 += w; b1 += w * (centroids[2 * c] - vx); b2 += w * (centroids[2 * c + 1] - vy);
      }
      sv[3 * v + q] = (c00 * b0 + c01 * b1 + c02 * b2) / det;
    }
  }
  return sv;
}
