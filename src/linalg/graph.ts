// Adjacency graph of a symmetric pattern with indistinguishable rows merged into weighted vertices.
// Rows with the same structure (the x and y dofs of one mesh node) are eliminated together by any
// sensible ordering, so orderings work on the smaller graph and expand at the end (the compressed
// graph: Ashcraft 1995, "Compressed graphs and the minimum degree algorithm", SIAM J. Sci. Comput. 16).

import type { CsrPattern } from './csr.js';

/** Undirected graph without self loops; weight[v] counts the rows vertex v stands for. */
export interface Graph {
  readonly n: number;
  readonly ptr: Int32Array;
  readonly adj: Int32Array;
  readonly weight: Int32Array;
}

/** A compressed graph and, for each of its vertices, the rows it stands for: members[memberPtr[v]..memberPtr[v+1]). */
export interface CompressedPattern {
  readonly graph: Graph;
  readonly memberPtr: Int32Array;
  readonly members: Int32Array;
}

/** Whether rows a and b of the pattern hold the same columns. */
export function sameRow(p: CsrPattern, a: number, b: number): boolean {
  const { rowPtr, colIdx } = p;
  const la = rowPtr[a + 1] - rowPtr[a];
  if (la !== rowPtr[b + 1] - rowPtr[b]) return false;
  for (let t = 0; t < la; t++) if (colIdx[rowPtr[a] + t] !== colIdx[rowPtr[b] + t]) return false;
  return true;
}

/** Merges rows of identical structure (the pattern holds its diagonal) and builds the graph between the groups. */
export function compressPattern(p: CsrPattern): CompressedPattern {
  const n = p.n;
  const { rowPtr, colIdx } = p;
  // rows in a hash table keyed by their structure: a row joins the first earlier row of its chain
  // with the same columns (chains hold representatives only, so each row is compared with few)
  const hash = new Int32Array(n);
  const head = new Int32Array(n).fill(-1);
  const chain = new Int32Array(n);
  const rep = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    let h = rowPtr[i + 1] - rowPtr[i];
    for (let q = rowPtr[i]; q < rowPtr[i + 1]; q++) h = (Math.imul(h, 31) + colIdx[q]) | 0;
    hash[i] = h;
    const slot = (h >>> 0) % n;
    let r = head[slot];
    while (r !== -1 && !(hash[r] === h && sameRow(p, r, i))) r = chain[r];
    if (r !== -1) rep[i] = r;
    else {
      rep[i] = i;
      chain[i] = head[slot];
      head[slot] = i;
    }
  }
  // groups numbered by their lowest row
  const group = new Int32Array(n);
  let ng = 0;
  for (let i = 0; i < n; i++) group[i] = rep[i] === i ? ng++ : group[rep[i]];
  const memberPtr = new Int32Array(ng + 1);
  for (let i = 0; i < n; i++) memberPtr[group[i] + 1]++;
  for (let g = 0; g < ng; g++) memberPtr[g + 1] += memberPtr[g];
  const members = new Int32Array(n);
  const fill = memberPtr.slice(0, ng);
  for (let i = 0; i < n; i++) members[fill[group[i]]++] = i;

  const weight = new Int32Array(ng);
  const ptr = new Int32Array(ng + 1);
  const mark = new Int32Array(ng).fill(-1);
  let adjBuf = new Int32Array(Math.max(16, colIdx.length));
  let used = 0;
  for (let g = 0; g < ng; g++) {
    weight[g] = memberPtr[g + 1] - memberPtr[g];
    const r = members[memberPtr[g]];
    mark[g] = g;
    for (let q = rowPtr[r]; q < rowPtr[r + 1]; q++) {
      const h = group[colIdx[q]];
      if (mark[h] === g) continue;
      mark[h] = g;
      if (used === adjBuf.length) {
        const grown = new Int32Array(2 * used);
        grown.set(adjBuf);
        adjBuf = grown;
      }
      adjBuf[used++] = h;
    }
    ptr[g + 1] = used;
  }
  return { graph: { n: ng, ptr, adj: adjBuf.slice(0, used), weight }, memberPtr, members };
}

/** Order of the pattern's rows (new → old) from an order of the compressed graph's vertices. */
export function expandOrder(c: CompressedPattern, order: Int32Array): Int32Array {
  const perm = new Int32Array(c.members.length);
  let k = 0;
  for (let t = 0; t < order.length; t++) {
    const g = order[t];
    for (let q = c.memberPtr[g]; q < c.memberPtr[g + 1]; q++) perm[k++] = c.members[q];
  }
  return perm;
}
