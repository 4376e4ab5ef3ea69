// Symbolic analysis for supernodal LDLᵀ: ordering, elimination tree, postorder, column counts,
// fundamental supernodes with relaxed amalgamation, row structures and the storage layout.

import type { CsrPattern } from './csr.js';
import { fillReducingOrder } from './ordering.js';
import { forestPostorder } from './forest.js';
import { sameRow } from './graph.js';

/** Everything the numeric factorization needs that depends only on the pattern. */
export interface Symbolic {
  readonly n: number;
  /** Stored entries of the pattern it was built for (a check against other patterns). */
  readonly nnzA: number;
  /** Final elimination order, new → old. */
  readonly perm: Int32Array;
  /** old → new. */
  readonly iperm: Int32Array;
  /** Elimination tree on the new numbering (−1 for roots). */
  readonly parent: Int32Array;
  /** Entries of L (with D on its diagonal) counted column by column without amalgamation. */
  readonly nnzLExact: number;
  /** Stored entries of L: lower trapezoids of all supernodes, including zeros added by amalgamation. */
  readonly nnzL: number;
  readonly nsuper: number;
  /** First column of each supernode; superStart[nsuper] = n. */
  readonly superStart: Int32Array;
  /** Parent supernode (−1 for roots). */
  readonly superParent: Int32Array;
  /** Row list of supernode s in rowIdx[rowPtr[s]..rowPtr[s+1]): its own columns, then the rows below, ascending. */
  readonly rowPtr: Int32Array;
  readonly rowIdx: Int32Array;
  /** Offset of supernode s's column-major m×k block in the L values. */
  readonly lPtr: Int32Array;
  /** Size of the L values array (Σ m·k). */
  readonly lSize: number;
  /** Positions in the parent's row list of the rows below supernode s's columns: relIdx[relPtr[s]..relPtr[s+1]). */
  readonly relPtr: Int32Array;
  readonly relIdx: Int32Array;
  /** For every stored entry of A: its place in the L values, or −1 for the upper triangle. */
  readonly aMap: Int32Array;
  /** Largest update-matrix stack the multifrontal sweep needs (doubles). */
  readonly stackSize: number;
  /** Largest row count of a supernode. */
  readonly maxRows: number;
  /** Largest column count of a supernode. */
  readonly maxCols: number;
}

export interface AnalyzeOptions {
  /** 'auto' (default: by size, see ordering.ts), 'dissection', 'mindegree', 'natural', or a permutation new → old. */
  ordering?: 'auto' | 'dissection' | 'mindegree' | 'natural' | Int32Array;
  /** Relaxed amalgamation on (default true). */
  amalgamate?: boolean;
  /** The columns from this position of the ordering on stay last where the elimination tree allows (see postorder). */
  lastFrom?: number;
  /**
   * Analyse runs of columns with equal rows of A as one node (default true); false takes every
   * column alone. Both give the same result; false is the plain algorithm, kept as a check.
   */
  compress?: boolean;
}

/** Runs of consecutive positions of the order whose rows of A are equal, and the graph between the runs. */
interface Nodes {
  count: number;
  /** Positions start[v]..start[v+1] of the order belong to node v. */
  start: Int32Array;
  /** Adjacency between the nodes (no self loops), nodes numbered by their place in the order. */
  ptr: Int32Array;
  adj: Int32Array;
}

/**
 * Nodes of the order: runs of rows consecutive both in A's numbering and in the order with equal
 * rows of A (a mesh node's dofs are numbered together and kept together by the orderings). Rows
 * are read in A's numbering, in sequence, so the pass stays in cache.
 */
function contiguousNodes(p: CsrPattern, order: Int32Array, iorder: Int32Array, compress: boolean): Nodes {
  const n = p.n;
  const { rowPtr, colIdx } = p;
  // rows that continue the node of the row before them
  const cont = new Uint8Array(n);
  if (compress) for (let r = 1; r < n; r++) if (iorder[r] === iorder[r - 1] + 1 && sameRow(p, r - 1, r)) cont[r] = 1;
  const nodeOf = new Int32Array(n);
  const start = new Int32Array(n + 1);
  let count = 0;
  for (let k = 0; k < n; k++) {
    const r = order[k];
    if (cont[r] === 0) start[count++] = k;
    nodeOf[r] = count - 1;
  }
  start[count] = n;
  // room for each node's list: the length of its first row, which holds every neighbour
  const ptr = new Int32Array(count + 1);
  for (let v = 0; v < count; v++) {
    const r = order[start[v]];
    ptr[v + 1] = ptr[v] + rowPtr[r + 1] - rowPtr[r];
  }
  const adj = new Int32Array(ptr[count]);
  const end = new Int32Array(count);
  for (let r = 0; r < n; r++) {
    if (cont[r] === 1) continue;
    const v = nodeOf[r];
    let e = ptr[v];
    // a node's rows are consecutive, so its columns sit together in the sorted row
    let prev = -1;
    for (let q = rowPtr[r]; q < rowPtr[r + 1]; q++) {
      const u = nodeOf[colIdx[q]];
      if (u === prev) continue;
      prev = u;
      if (u !== v) adj[e++] = u;
    }
    end[v] = e;
  }
  // close the gaps left by the members' own columns and repeated nodes
  let used = 0;
  for (let v = 0; v < count; v++) {
    const b = ptr[v];
    ptr[v] = used;
    adj.copyWithin(used, b, end[v]);
    used += end[v] - b;
  }
  ptr[count] = used;
  return { count, start: start.subarray(0, count + 1), ptr, adj: adj.subarray(0, used) };
}

/** Elimination tree of the pattern permuted by perm (iperm its inverse). */
function etree(p: CsrPattern, perm: Int32Array, iperm: Int32Array): Int32Array {
  const n = p.n;
  const { rowPtr, colIdx } = p;
  const parent = new Int32Array(n);
  const ancestor = new Int32Array(n);
  for (let k = 0; k < n; k++) {
    parent[k] = -1;
    ancestor[k] = -1;
    const old = perm[k];
    for (let q = rowPtr[old]; q < rowPtr[old + 1]; q++) {
      let i = iperm[colIdx[q]];
      while (i !== -1 && i < k) {
        const inext = ancestor[i];
        ancestor[i] = k;
        if (inext === -1) parent[i] = k;
        i = inext;
      }
    }
  }
  return parent;
}

/**
 * Depth-first postorder of a forest, children visited in ascending order. With lastFrom, the
 * columns from lastFrom on are to stay last: among the children of a column (and among the
 * roots) those whose subtree holds an earlier column go first, those holding only later ones
 * after them, so where the later columns form a chain above the rest (one branch holding
 * earlier columns below each of them) they all come out last, as they went in.
 */
function postorder(parent: Int32Array, lastFrom = parent.length): Int32Array {
  const n = parent.length;
  // a virtual root n above the forest's roots, so the roots are ordered like children
  const up = new Int32Array(n + 1);
  for (let j = 0; j < n; j++) up[j] = parent[j] === -1 ? n : parent[j];
  up[n] = -1;
  const early = new Uint8Array(n + 1);
  for (let j = 0; j < n; j++) { if (j < lastFrom) early[j] = 1; if (early[j]) early[up[j]] = 1; }
  const head = new Int32Array(n + 1).fill(-1);
  const next = new Int32Array(n + 1);
  // prepended class by class, last class first: early subtrees, then the others, each ascending
  for (const cls of [0, 1]) {
    for (let j = n - 1; j >= 0; j--) {
      if (early[j] !== cls) continue;
      const pj = up[j];
      next[j] = head[pj];
      head[pj] = j;
    }
  }
  const post = new Int32Array(n + 1);
  forestPostorder(n + 1, up, head, next, post, new Int32Array(n + 1));
  return post.subarray(0, n);
}

/** Entries of a lower trapezoid with k columns and m rows (first k rows form the triangle). */
function trapezoid(k: number, m: number): number {
  return k * m - (k * (k - 1)) / 2;
}

/**
 * Whether merging is worth its zeros. Relaxed supernodes, which accept some explicit zeros for larger
 * dense blocks: Ashcraft & Grimes 1989, "The influence of relaxed supernode partitions on the
 * multifrontal method", ACM TOMS 15:291–309. The limits (any merge up to 4 columns; up to 16 with
 * under 80 % zeros, up to 48 with under 10 %, any size under 5 %) are the documented defaults of the
 * supernodal Cholesky of Chen, Davis, Hager & Rajamanickam 2008, "Algorithm 887: CHOLMOD, supernodal
 * sparse Cholesky factorization and update/downdate", ACM TOMS 35(3).
 */
function acceptMerge(cols: number, zeros: number, entries: number): boolean {
  const z = zeros / entries;
  return cols <= 4 || (cols <= 16 && z < 0.8) || (cols <= 48 && z < 0.1) || z < 0.05;
}

/** Parent supernode of each supernode (−1 for roots): the one holding the parent of its last column. */
function superParents(parent: Int32Array, superStart: Int32Array): Int32Array {
  const ns = superStart.length - 1;
  const n = parent.length;
  const colSuper = new Int32Array(n);
  for (let s = 0; s < ns; s++) for (let j = superStart[s]; j < superStart[s + 1]; j++) colSuper[j] = s;
  const sp = new Int32Array(ns);
  for (let s = 0; s < ns; s++) {
    const pl = parent[superStart[s + 1] - 1];
    sp[s] = pl === -1 ? -1 : colSuper[pl];
  }
  return sp;
}

/**
 * Row structure of every supernode: its own columns, the rows of A below them and the rows of its
 * children's structures below them (children come first in postorder). With sorted, each list
 * is put in ascending order by two passes of a counting sort over all lists at once.
 */
function superRows(p: CsrPattern, perm: Int32Array, iperm: Int32Array, superStart: Int32Array, superParent: Int32Array, sorted: boolean) {
  const n = p.n;
  const { rowPtr: aPtr, colIdx: aCol } = p;
  const nsuper = superStart.length - 1;
  const chHead = new Int32Array(nsuper).fill(-1);
  const chNext = new Int32Array(nsuper).fill(-1);
  for (let s = nsuper - 1; s >= 0; s--) {
    const ps = superParent[s];
    if (ps === -1) continue;
    chNext[s] = chHead[ps];
    chHead[ps] = s;
  }
  const rowPtr = new Int32Array(nsuper + 1);
  let rowBuf = new Int32Array(Math.max(16, aCol.length));
  const mark = new Int32Array(n).fill(-1);
  let used = 0;
  for (let s = 0; s < nsuper; s++) {
    const f = superStart[s];
    const l = superStart[s + 1];
    const need = used + (l - f) + (n - l);
    if (need > rowBuf.length) {
      const grown = new Int32Array(Math.max(need, rowBuf.length * 2));
      grown.set(rowBuf.subarray(0, used));
      rowBuf = grown;
    }
    rowPtr[s] = used;
    for (let j = f; j < l; j++) {
      rowBuf[used++] = j;
      mark[j] = s;
    }
    for (let j = f; j < l; j++) {
      const old = perm[j];
      for (let q = aPtr[old]; q < aPtr[old + 1]; q++) {
        const i = iperm[aCol[q]];
        if (i >= l && mark[i] !== s) {
          mark[i] = s;
          rowBuf[used++] = i;
        }
      }
    }
    for (let c = chHead[s]; c !== -1; c = chNext[c]) {
      const cEnd = rowPtr[c + 1];
      for (let q = rowPtr[c] + (superStart[c + 1] - superStart[c]); q < cEnd; q++) {
        const i = rowBuf[q];
        if (mark[i] !== s) {
          mark[i] = s;
          rowBuf[used++] = i;
        }
      }
    }
    rowPtr[s + 1] = used;
  }
  const rowIdx = rowBuf.slice(0, used);
  if (sorted && used > 0) {
    // supernodes by row, then rows by supernode: each list comes out ascending
    const byRow = new Int32Array(n + 1);
    for (let q = 0; q < used; q++) byRow[rowIdx[q] + 1]++;
    for (let i = 0; i < n; i++) byRow[i + 1] += byRow[i];
    const sup = new Int32Array(used);
    for (let s = 0; s < nsuper; s++) for (let q = rowPtr[s]; q < rowPtr[s + 1]; q++) sup[byRow[rowIdx[q]]++] = s;
    const fill = rowPtr.slice(0, nsuper);
    let q = 0;
    for (let i = 0; i < n; i++) for (; q < byRow[i]; q++) rowIdx[fill[sup[q]]++] = i;
  }
  return { rowPtr, rowIdx, chHead, chNext };
}

/** The elimination tree of the nodes, postordered, and its expansion to columns. */
function nodeTree(nodes: Nodes, perm0: Int32Array, lastFrom: number) {
  const nn = nodes.count;
  const n = perm0.length;
  const idN = new Int32Array(nn);
  for (let v = 0; v < nn; v++) idN[v] = v;
  const parentN0 = etree({ n: nn, rowPtr: nodes.ptr, colIdx: nodes.adj }, idN, idN);
  // a node is early (see postorder) when one of its columns is, i.e. when it starts before lastFrom
  let lastFromN = 0;
  while (lastFromN < nn && nodes.start[lastFromN] < lastFrom) lastFromN++;
  const postN = postorder(parentN0, lastFromN);
  const ipostN = new Int32Array(nn);
  for (let k = 0; k < nn; k++) ipostN[postN[k]] = k;
  const parentN = new Int32Array(nn);
  const cStart = new Int32Array(nn + 1); // first column of each node in the final order
  const perm = new Int32Array(n);
  const start = nodes.start;
  for (let k = 0; k < nn; k++) {
    const q = parentN0[postN[k]];
    parentN[k] = q === -1 ? -1 : ipostN[q];
    const v = postN[k];
    let c = cStart[k];
    for (let t = start[v]; t < start[v + 1]; t++) perm[c++] = perm0[t];
    cStart[k + 1] = c;
  }
  // a node's columns form a chain; its last column's parent is the first column of the parent node
  const parent = new Int32Array(n);
  for (let k = 0; k < nn; k++) {
    for (let j = cStart[k]; j < cStart[k + 1] - 1; j++) parent[j] = j + 1;
    parent[cStart[k + 1] - 1] = parentN[k] === -1 ? -1 : cStart[parentN[k]];
  }
  return { postN, ipostN, parentN, cStart, perm, parent };
}

/**
 * First node of each fundamental supernode, and the count as the last entry (Liu, Ng & Peyton 1993,
 * "On finding supernodes for sparse matrix computations", SIAM J. Matrix Anal. Appl. 14:242–252):
 * column j joins column j − 1 when j − 1 is its only child and j is a leaf of no row subtree. In
 * postorder the subtree of j is first[j]..j, so j is a leaf of row i's subtree when no earlier
 * column of that range has an entry in row i. On nodes: a node's later columns always join its
 * first; its first column's rows are those of the neighbouring nodes and, when the node has
 * several columns, its own.
 */
function fundamentalNodes(nodes: Nodes, postN: Int32Array, ipostN: Int32Array, parentN: Int32Array, cStart: Int32Array): Int32Array {
  const nn = nodes.count;
  const nchild = new Int32Array(nn);
  const first = new Int32Array(nn);
  for (let j = 0; j < nn; j++) first[j] = j;
  for (let j = 0; j < nn; j++) {
    const pj = parentN[j];
    if (pj === -1) continue;
    nchild[pj]++;
    if (first[j] < first[pj]) first[pj] = first[j];
  }
  const prevCol = new Int32Array(nn).fill(-1);
  const rowLeaf = new Uint8Array(nn);
  const { ptr, adj } = nodes;
  for (let j = 0; j < nn; j++) {
    if (cStart[j + 1] - cStart[j] > 1 && prevCol[j] < first[j]) rowLeaf[j] = 1;
    const old = postN[j];
    for (let q = ptr[old]; q < ptr[old + 1]; q++) {
      const i = ipostN[adj[q]];
      if (i <= j) continue;
      if (prevCol[i] < first[j]) rowLeaf[j] = 1;
      prevCol[i] = j;
    }
  }
  const fStart = new Int32Array(nn + 1);
  let nf = 0;
  for (let j = 0; j < nn; j++) if (j === 0 || !(parentN[j - 1] === j && nchild[j] === 1 && rowLeaf[j] === 0)) fStart[nf++] = j;
  fStart[nf] = nn;
  return fStart.slice(0, nf + 1);
}

/** Rows of each list counted in columns (a node stands for its columns). */
function columnCounts(rows: { rowPtr: Int32Array; rowIdx: Int32Array }, cStart: Int32Array): Int32Array {
  const ns = rows.rowPtr.length - 1;
  const { rowPtr, rowIdx } = rows;
  const count = new Int32Array(ns);
  for (let t = 0; t < ns; t++) {
    let m = 0;
    for (let q = rowPtr[t]; q < rowPtr[t + 1]; q++) m += cStart[rowIdx[q] + 1] - cStart[rowIdx[q]];
    count[t] = m;
  }
  return count;
}

/**
 * Relaxed amalgamation (Ashcraft & Grimes 1989): a chain of fundamental supernodes is absorbed into
 * the next one when it is their parent and acceptMerge allows. fStart: first columns; returns the
 * first fundamental supernode of each merged one, the count as the last entry.
 */
function amalgamation(fStart: Int32Array, fParent: Int32Array, fRows: Int32Array, amalgamate: boolean): Int32Array {
  const nf = fStart.length - 1;
  const groups = new Int32Array(nf + 1);
  let ng = 0;
  let gFirst = 0;
  let gCols = nf > 0 ? fStart[1] - fStart[0] : 0;
  let gRows = nf > 0 ? fRows[0] : 0;
  let gZeros = 0;
  let gLast = 0;
  for (let t = 1; t <= nf; t++) {
    if (t < nf && amalgamate && fParent[gLast] === t) {
      const tCols = fStart[t + 1] - fStart[t];
      const tRows = fRows[t];
      const cols = gCols + tCols;
      const rows = gCols + tRows;
      const entries = trapezoid(cols, rows);
      const zeros = entries - (trapezoid(gCols, gRows) - gZeros) - trapezoid(tCols, tRows);
      if (acceptMerge(cols, zeros, entries)) {
        gCols = cols;
        gRows = rows;
        gZeros = zeros;
        gLast = t;
        continue;
      }
    }
    groups[ng++] = gFirst;
    if (t < nf) {
      gFirst = t;
      gLast = t;
      gCols = fStart[t + 1] - fStart[t];
      gRows = fRows[t];
      gZeros = 0;
    }
  }
  groups[ng] = nf;
  return groups.slice(0, ng + 1);
}

/** Node lists expanded to column lists (a node's columns are consecutive, so they stay ascending). */
function expandRows(rowsN: { rowPtr: Int32Array; rowIdx: Int32Array }, cStart: Int32Array) {
  const ns = rowsN.rowPtr.length - 1;
  const count = columnCounts(rowsN, cStart);
  const rowPtr = new Int32Array(ns + 1);
  for (let s = 0; s < ns; s++) rowPtr[s + 1] = rowPtr[s] + count[s];
  const rowIdx = new Int32Array(rowPtr[ns]);
  const nIdx = rowsN.rowIdx;
  let r = 0;
  for (let q = 0; q < nIdx.length; q++) {
    const v = nIdx[q];
    for (let j = cStart[v]; j < cStart[v + 1]; j++) rowIdx[r++] = j;
  }
  return { rowPtr, rowIdx };
}

/** Positions in the parent's row list of the rows below each supernode's columns. */
function relativeIndices(superStart: Int32Array, rowPtr: Int32Array, rowIdx: Int32Array, chHead: Int32Array, chNext: Int32Array, n: number) {
  const nsuper = superStart.length - 1;
  const relPtr = new Int32Array(nsuper + 1);
  for (let s = 0; s < nsuper; s++) {
    const k = superStart[s + 1] - superStart[s];
    relPtr[s + 1] = relPtr[s] + (rowPtr[s + 1] - rowPtr[s] - k);
  }
  const relIdx = new Int32Array(relPtr[nsuper]);
  const pos = new Int32Array(n);
  for (let s = 0; s < nsuper; s++) {
    if (chHead[s] === -1) continue;
    for (let q = rowPtr[s]; q < rowPtr[s + 1]; q++) pos[rowIdx[q]] = q - rowPtr[s];
    for (let c = chHead[s]; c !== -1; c = chNext[c]) {
      const k = superStart[c + 1] - superStart[c];
      let r = relPtr[c];
      for (let q = rowPtr[c] + k; q < rowPtr[c + 1]; q++) relIdx[r++] = pos[rowIdx[q]];
    }
  }
  return { relPtr, relIdx };
}

/**
 * For every stored entry of A: its place in the L values, or −1 for the upper triangle. The rows of
 * a node's columns hold the same columns in the same places, so each column of A is looked up once
 * per node.
 */
function entryMap(p: CsrPattern, perm: Int32Array, iperm: Int32Array, superStartN: Int32Array, cStart: Int32Array, rowPtr: Int32Array, rowIdx: Int32Array, lPtr: Int32Array): Int32Array {
  const { rowPtr: aPtr, colIdx: aCol } = p;
  const nsuper = superStartN.length - 1;
  const aMap = new Int32Array(aCol.length).fill(-1);
  const pos = new Int32Array(p.n);
  for (let s = 0; s < nsuper; s++) {
    const f = cStart[superStartN[s]];
    const m = rowPtr[s + 1] - rowPtr[s];
    for (let q = rowPtr[s]; q < rowPtr[s + 1]; q++) pos[rowIdx[q]] = q - rowPtr[s];
    for (let v = superStartN[s]; v < superStartN[s + 1]; v++) {
      const j0 = cStart[v];
      const w = cStart[v + 1] - j0;
      const q0 = aPtr[perm[j0]];
      const len = aPtr[perm[j0] + 1] - q0;
      for (let e = 0; e < len; e++) {
        const i = iperm[aCol[q0 + e]];
        if (i < j0) continue;
        const at = lPtr[s] + (j0 - f) * m + pos[i];
        for (let t = 0; t < w && i >= j0 + t; t++) aMap[aPtr[perm[j0 + t]] + e] = at + t * m;
      }
    }
  }
  return aMap;
}

/** Largest stack of update matrices in the multifrontal sweep (postorder: children sit on top when the parent comes). */
function stackNeed(superStart: Int32Array, rowPtr: Int32Array, chHead: Int32Array, chNext: Int32Array): number {
  const nsuper = superStart.length - 1;
  const updSize = new Float64Array(nsuper);
  let top = 0;
  let stackSize = 0;
  for (let s = 0; s < nsuper; s++) {
    const k = superStart[s + 1] - superStart[s];
    const r = rowPtr[s + 1] - rowPtr[s] - k;
    const own = r * r;
    stackSize = Math.max(stackSize, top + own);
    for (let c = chHead[s]; c !== -1; c = chNext[c]) top -= updSize[c];
    updSize[s] = own;
    top += own;
  }
  return stackSize;
}

/** Symbolic analysis of a symmetric pattern; reusable for every matrix on the same pattern. */
export function analyze(p: CsrPattern, opts: AnalyzeOptions = {}): Symbolic {
  const n = p.n;
  const ordering = opts.ordering ?? 'auto';
  let perm0: Int32Array;
  if (ordering === 'auto' || ordering === 'dissection' || ordering === 'mindegree') perm0 = fillReducingOrder(p, ordering);
  else if (ordering === 'natural') {
    perm0 = new Int32Array(n);
    for (let i = 0; i < n; i++) perm0[i] = i;
  } else {
    perm0 = ordering;
    if (perm0.length !== n) throw new RangeError(`ordering has ${perm0.length} entries for a matrix of order ${n}`);
  }
  const iperm0 = new Int32Array(n).fill(-1);
  for (let k = 0; k < n; k++) {
    const o = perm0[k];
    if (o < 0 || o >= n || iperm0[o] !== -1) throw new RangeError(`ordering is not a permutation (entry ${k} = ${o})`);
    iperm0[o] = k;
  }

  // The analysis runs on nodes: runs of consecutive columns (in the given order) whose rows of A
  // hold the same columns, such as the two dofs of a mesh node. Such a run is a chain of the
  // elimination tree with nested structures, so its columns always share a supernode, and the
  // tree, the postorder, the supernodes and their row lists follow from those of the quotient
  // graph between the nodes (Ashcraft 1995, compressed graphs) with a quarter of A's entries for
  // elasticity's 2×2 blocks; they are expanded to columns at the end.
  const nodes = contiguousNodes(p, perm0, iperm0, opts.compress ?? true);
  const graphN: CsrPattern = { n: nodes.count, rowPtr: nodes.ptr, colIdx: nodes.adj };
  // postorder the elimination tree so that supernodes are contiguous; the tree is relabelled, not rebuilt
  const { postN, ipostN, parentN, cStart, perm, parent } = nodeTree(nodes, perm0, opts.lastFrom ?? n);
  const iperm = new Int32Array(n);
  for (let k = 0; k < n; k++) iperm[perm[k]] = k;

  const fSuperN = fundamentalNodes(nodes, postN, ipostN, parentN, cStart);
  const nf = fSuperN.length - 1;
  const fParent = superParents(parentN, fSuperN);
  // rows of each fundamental supernode: its first column's count, the other columns' counts follow
  const fRows = columnCounts(superRows(graphN, postN, ipostN, fSuperN, fParent, false), cStart);
  const fStart = new Int32Array(nf + 1);
  for (let t = 0; t <= nf; t++) fStart[t] = cStart[fSuperN[t]];
  let nnzLExact = 0;
  for (let t = 0; t < nf; t++) nnzLExact += trapezoid(fStart[t + 1] - fStart[t], fRows[t]);

  const groups = amalgamation(fStart, fParent, fRows, opts.amalgamate ?? true);
  const nsuper = groups.length - 1;
  const superStartN = new Int32Array(nsuper + 1);
  const superStart = new Int32Array(nsuper + 1);
  for (let s = 0; s <= nsuper; s++) {
    superStartN[s] = fSuperN[groups[s]];
    superStart[s] = cStart[superStartN[s]];
  }
  const superParent = superParents(parentN, superStartN);
  const rowsN = superRows(graphN, postN, ipostN, superStartN, superParent, true);
  const { chHead, chNext } = rowsN;
  const { rowPtr, rowIdx } = expandRows(rowsN, cStart);

  // storage layout and sizes
  const lOff = new Float64Array(nsuper + 1);
  let nnzL = 0;
  let maxRows = 0;
  let maxCols = 0;
  for (let s = 0; s < nsuper; s++) {
    const k = superStart[s + 1] - superStart[s];
    const m = rowPtr[s + 1] - rowPtr[s];
    lOff[s + 1] = lOff[s] + m * k;
    nnzL += trapezoid(k, m);
    if (m > maxRows) maxRows = m;
    if (k > maxCols) maxCols = k;
  }
  const lSize = lOff[nsuper];
  if (lSize >= 2 ** 31) throw new RangeError(`the factor would need ${lSize} entries, more than this solver can index`);
  // integer offsets keep index arithmetic in the kernels on small integers
  const lPtr = Int32Array.from(lOff);
  const { relPtr, relIdx } = relativeIndices(superStart, rowPtr, rowIdx, chHead, chNext, n);

  return {
    n,
    nnzA: p.colIdx.length,
    perm,
    iperm,
    parent,
    nnzLExact,
    nnzL,
    nsuper,
    superStart,
    superParent,
    rowPtr,
    rowIdx,
    lPtr,
    lSize,
    relPtr,
    relIdx,
    aMap: entryMap(p, perm, iperm, superStartN, cStart, rowPtr, rowIdx, lPtr),
    stackSize: stackNeed(superStart, rowPtr, chHead, chNext),
    maxRows,
    maxCols,
  };
}
