// The bulk stiffness of a new topology carried over from the last one where the mesh did not
// change: a growth event changes the cells near the tip only, and every other row of the
// assembled matrix is the same sum of the same element matrices. Rows are copied with their
// columns renumbered through the stable vertex ids (the compact mesh is renumbered at every
// growth); the rows of the vertices of new, changed or removed cells and of the face pairs are
// assembled afresh from their cells in cell order, so every entry is the same sum, added in the
// same order, as a full assembly makes it.
import type { PolyMesh } from '../mesh/polymesh.js';
import type { CsrMatrix } from '../linalg/index.js';

/** The bulk matrix of the last topology on its compact dofs, with the stable id of each compact vertex. */
export interface BulkRecord { matrix: CsrMatrix; vertexOf: Int32Array }

/**
 * Compact → stable ids inverted: the compact index of every stable id below `size` (−1 where
 * the vertex is not in the mesh).
 */
export function compactOfStable(vertexOf: Int32Array, size: number): Int32Array {
  const co = new Int32Array(size).fill(-1);
  for (let i = 0; i < vertexOf.length; i++) co[vertexOf[i]] = i;
  return co;
}

/**
 * The bulk matrix of `mesh` (both triangles, sorted columns) with the extra 4-dof couplings of
 * `pairs` in its pattern (zero values), from the last topology's matrix and each cell's element
 * matrix `Ke[c]` (row-major, 2n × 2n in cell order). `dirty[v]` (compact vertex of `mesh`) marks
 * the rows to assemble afresh: it must hold every vertex of a cell not identical to one of the
 * last topology, every vertex of a last-topology cell that is gone, and every face-pair vertex of
 * both topologies. Every other vertex must have been in the last mesh (stable id `vertexId[v]`).
 */
export function carryBulk(last: BulkRecord, mesh: PolyMesh, vertexId: Int32Array, Ke: readonly Float64Array[],
  dirty: Uint8Array, pairs: { plus: Int32Array; minus: Int32Array }): CsrMatrix {
  const nv = mesh.xy.length >> 1, n = 2 * nv, nc = mesh.cellStart.length - 1, np = pairs.plus.length;
  const { cellStart, cellVerts } = mesh;
  const old = last.matrix, oldOf = last.vertexOf;
  let maxId = 0;
  for (let i = 0; i < oldOf.length; i++) if (oldOf[i] > maxId) maxId = oldOf[i];
  for (let i = 0; i < nv; i++) if (vertexId[i] > maxId) maxId = vertexId[i];
  const oldCompact = compactOfStable(oldOf, maxId + 1), newCompact = compactOfStable(vertexId, maxId + 1);
  const toNew = new Int32Array(oldOf.length);
  for (let i = 0; i < oldOf.length; i++) toNew[i] = newCompact[oldOf[i]];

  // the blocks (cells, then pairs) around each dirty vertex, in block order
  const aroundPtr = new Int32Array(nv + 1);
  for (let c = 0; c < nc; c++) for (let k = cellStart[c]; k < cellStart[c + 1]; k++) if (dirty[cellVerts[k]]) aroundPtr[cellVerts[k] + 1]++;
  for (let p = 0; p < np; p++) { aroundPtr[pairs.plus[p] + 1]++; aroundPtr[pairs.minus[p] + 1]++; }
  for (let v = 0; v < nv; v++) aroundPtr[v + 1] += aroundPtr[v];
  const around = new Int32Array(aroundPtr[nv]), fill = aroundPtr.slice(0, nv);
  for (let c = 0; c < nc; c++) for (let k = cellStart[c]; k < cellStart[c + 1]; k++) if (dirty[cellVerts[k]]) around[fill[cellVerts[k]]++] = c;
  for (let p = 0; p < np; p++) { around[fill[pairs.plus[p]]++] = nc + p; around[fill[pairs.minus[p]]++] = nc + p; }

  // row lengths: a copied row keeps its length; a fresh row counts its distinct neighbours
  const mark = new Int32Array(nv).fill(-1), rowPtr = new Int32Array(n + 1);
  const blockVerts = (b: number, visit: (w: number) => void): void => {
    if (b < nc) { for (let k = cellStart[b]; k < cellStart[b + 1]; k++) visit(cellVerts[k]); return; }
    visit(pairs.plus[b - nc]); visit(pairs.minus[b - nc]);
  };
  for (let v = 0; v < nv; v++) {
    let len: number;
    if (dirty[v]) {
      len = 0;
      for (let t = aroundPtr[v]; t < aroundPtr[v + 1]; t++) blockVerts(around[t], (w) => { if (mark[w] !== v) { mark[w] = v; len += 2; } });
      if (mark[v] !== v) len += 2; // a vertex of no block still has its diagonal
      rowPtr[2 * v + 1] = len; rowPtr[2 * v + 2] = len;
    } else {
      const o = 2 * oldCompact[vertexId[v]];
      if (o < 0) throw new RangeError(`vertex ${vertexId[v]} is not dirty but was not in the last mesh`);
      rowPtr[2 * v + 1] = old.rowPtr[o + 1] - old.rowPtr[o];
      rowPtr[2 * v + 2] = old.rowPtr[o + 2] - old.rowPtr[o + 1];
    }
  }
  for (let i = 0; i < n; i++) rowPtr[i + 1] += rowPtr[i];
  const colIdx = new Int32Array(rowPtr[n]), values = new Float64Array(rowPtr[n]);

  const pos = new Int32Array(n);
  for (let v = 0; v < nv; v++) {
    if (!dirty[v]) {
      // copy both rows, renumbering columns and keeping them sorted (insertion: nearly sorted)
      const o = 2 * oldCompact[vertexId[v]];
      for (let c = 0; c < 2; c++) {
        const w0 = rowPtr[2 * v + c], oq = old.rowPtr[o + c], len = old.rowPtr[o + c + 1] - oq;
        for (let q = 0; q < len; q++) {
          const oc = old.colIdx[oq + q], nw = toNew[oc >> 1];
          if (nw < 0) throw new RangeError(`a neighbour of vertex ${vertexId[v]} is gone although the vertex is not dirty`);
          const col = 2 * nw + (oc & 1), val = old.values[oq + q];
          let t = w0 + q;
          while (t > w0 && colIdx[t - 1] > col) { colIdx[t] = colIdx[t - 1]; values[t] = values[t - 1]; t--; }
          colIdx[t] = col; values[t] = val;
        }
      }
      continue;
    }
    // a fresh vertex: its columns (sorted), then its cells' rows added in cell order
    let w = rowPtr[2 * v];
    const w0 = w;
    mark[v] = -2 - v; colIdx[w++] = v; // vertex ids for now, doubled below
    for (let t = aroundPtr[v]; t < aroundPtr[v + 1]; t++) blockVerts(around[t], (x) => { if (mark[x] !== -2 - v) { mark[x] = -2 - v; colIdx[w++] = x; } });
    const cnt = w - w0;
    colIdx.subarray(w0, w).sort();
    const r1 = rowPtr[2 * v + 1];
    for (let k = cnt - 1; k >= 0; k--) {
      const x = colIdx[w0 + k];
      colIdx[w0 + 2 * k] = 2 * x; colIdx[w0 + 2 * k + 1] = 2 * x + 1;
      colIdx[r1 + 2 * k] = 2 * x; colIdx[r1 + 2 * k + 1] = 2 * x + 1;
    }
    for (let q = 0; q < 2 * cnt; q++) { pos[colIdx[w0 + q]] = w0 + q; }
    for (let t = aroundPtr[v]; t < aroundPtr[v + 1]; t++) {
      const b = around[t];
      if (b >= nc) continue; // face pairs add nothing to the bulk
      const s = cellStart[b], m = 2 * (cellStart[b + 1] - s), K = Ke[b];
      for (let i = 0; i < m >> 1; i++) {
        if (cellVerts[s + i] !== v) continue;
        for (let c = 0; c < 2; c++) {
          const shift = c === 0 ? 0 : r1 - w0, ro = (2 * i + c) * m;
          for (let j = 0; j < m; j++) values[pos[2 * cellVerts[s + (j >> 1)] + (j & 1)] + shift] += K[ro + j];
        }
      }
    }
  }
  return { n, rowPtr, colIdx, values };
}
