// Mesh queries: summary numbers, vertex look-ups, edge → cell adjacency.

import type { Vec2 } from '../case/model.js';
import { cellArea, cellCount, vertexCount, type PolyMesh } from './polymesh.js';

/** Unique edges: vertices edgeVerts[2e], edgeVerts[2e+1] (a < b); cells edgeCells[2e], edgeCells[2e+1] (-1 on the boundary). */
export interface EdgeTable {
  edgeVerts: Int32Array;
  edgeCells: Int32Array;
  /** Edge of each cell side: cellEdges[k] for the side cellVerts[k] → next vertex. */
  cellEdges: Int32Array;
  count: number;
}

export function buildEdges(m: PolyMesh): EdgeTable {
  const { cellStart, cellVerts } = m, nc = cellCount(m), nv = vertexCount(m), nk = cellVerts.length;
  // sort sides by (min, max) vertex via counting on the smaller vertex
  const lo = new Int32Array(nk), hi = new Int32Array(nk), owner = new Int32Array(nk);
  for (let c = 0; c < nc; c++) {
    const s = cellStart[c], e = cellStart[c + 1];
    for (let k = s; k < e; k++) {
      const a = cellVerts[k], b = cellVerts[k + 1 < e ? k + 1 : s];
      lo[k] = a < b ? a : b; hi[k] = a < b ? b : a; owner[k] = c;
    }
  }
  const start = new Int32Array(nv + 1);
  for (let k = 0; k < nk; k++) start[lo[k] + 1]++;
  for (let v = 0; v < nv; v++) start[v + 1] += start[v];
  const pos = start.slice(0, nv), bucket = new Int32Array(nk);
  for (let k = 0; k < nk; k++) bucket[pos[lo[k]]++] = k;
  const ev: number[] = [], ec: number[] = [];
  const cellEdges = new Int32Array(nk).fill(-1);
  for (let v = 0; v < nv; v++) {
    const s = start[v], e = start[v + 1];
    for (let i = s; i < e; i++) {
      const k = bucket[i];
      if (cellEdges[k] >= 0) continue;
      const id = ev.length >> 1;
      ev.push(v, hi[k]); ec.push(owner[k], -1);
      cellEdges[k] = id;
      for (let j = i + 1; j < e; j++) {
        const k2 = bucket[j];
        if (cellEdges[k2] < 0 && hi[k2] === hi[k]) { cellEdges[k2] = id; ec[2 * id + 1] = owner[k2]; break; }
      }
    }
  }
  return { edgeVerts: Int32Array.from(ev), edgeCells: Int32Array.from(ec), cellEdges, count: ev.length >> 1 };
}

export function meshStats(m: PolyMesh): { polygons: number; vertices: number; minArea: number; maxArea: number; minEdge: number; maxEdge: number; maxVerticesPerCell: number; boundaryEdges: number } {
  const nc = cellCount(m), { xy, cellStart } = m;
  let minArea = Infinity, maxArea = -Infinity, maxV = 0;
  for (let c = 0; c < nc; c++) {
    const a = cellArea(m, c);
    if (a < minArea) minArea = a; if (a > maxArea) maxArea = a;
    maxV = Math.max(maxV, cellStart[c + 1] - cellStart[c]);
  }
  const E = buildEdges(m);
  let minEdge = Infinity, maxEdge = 0, nb = 0;
  for (let e = 0; e < E.count; e++) {
    const a = E.edgeVerts[2 * e], b = E.edgeVerts[2 * e + 1];
    const l = Math.hypot(xy[2 * a] - xy[2 * b], xy[2 * a + 1] - xy[2 * b + 1]);
    if (l < minEdge) minEdge = l; if (l > maxEdge) maxEdge = l;
    if (E.edgeCells[2 * e + 1] < 0) nb++;
  }
  return { polygons: nc, vertices: vertexCount(m), minArea, maxArea, minEdge, maxEdge, maxVerticesPerCell: maxV, boundaryEdges: nb };
}

/** Vertices within tol of (x, y), nearest first. */
export function findVertices(m: PolyMesh, x: number, y: number, tol: number): number[] {
  const { xy } = m, out: [number, number][] = [];
  for (let v = 0, n = xy.length >> 1; v < n; v++) {
    const d = Math.hypot(xy[2 * v] - x, xy[2 * v + 1] - y);
    if (d <= tol) out.push([d, v]);
  }
  return out.sort((a, b) => a[0] - b[0] || a[1] - b[1]).map(p => p[1]);
}

/** Vertices within tol of segment a–b, sorted from a to b. */
export function verticesOnSegment(m: PolyMesh, a: Vec2, b: Vec2, tol: number): number[] {
  const { xy } = m, dx = b[0] - a[0], dy = b[1] - a[1], l2 = dx * dx + dy * dy, out: [number, number][] = [];
  for (let v = 0, n = xy.length >> 1; v < n; v++) {
    const px = xy[2 * v] - a[0], py = xy[2 * v + 1] - a[1];
    let t = l2 > 0 ? (px * dx + py * dy) / l2 : 0;
    const tc = t < 0 ? 0 : t > 1 ? 1 : t;
    if (Math.hypot(px - tc * dx, py - tc * dy) <= tol) { t = tc; out.push([t, v]); }
  }
  return out.sort((p, q) => p[0] - q[0] || p[1] - q[1]).map(p => p[1]);
}
