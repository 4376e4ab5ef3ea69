// Approximate minimum degree ordering (Amestoy, Davis and Duff, 1996) on the quotient graph:
// approximate external degrees, element absorption, mass elimination, supervariables by hashing,
// aggressive absorption; rows denser than 10·√n are ordered last.

import type { CsrPattern } from './csr.js';
import { forestPostorder } from './forest.js';

/** Fill-reducing permutation perm (new → old) of a symmetric pattern. */
export function amdOrder(p: CsrPattern): Int32Array {
  const n = p.n;
  const perm = new Int32Array(n);
  if (n === 0) return perm;
  const { rowPtr, colIdx } = p;

  // quotient graph storage: adjacency without diagonal, plus elbow room for new elements
  let offDiag = 0;
  for (let i = 0; i < n; i++) for (let q = rowPtr[i]; q < rowPtr[i + 1]; q++) if (colIdx[q] !== i) offDiag++;
  const cap = offDiag + Math.floor(offDiag / 5) + 2 * n + 1;
  const adj = new Int32Array(cap);
  const start = new Int32Array(n + 1); // start of object's list; after elimination: flipped parent
  const len = new Int32Array(n + 1);
  let used = 0;
  for (let i = 0; i < n; i++) {
    start[i] = used;
    for (let q = rowPtr[i]; q < rowPtr[i + 1]; q++) {
      const j = colIdx[q];
      if (j !== i) adj[used++] = j;
    }
    len[i] = used - start[i];
  }

  const nv = new Int32Array(n + 1); // supervariable size; negated while in the current element
  const next = new Int32Array(n + 1);
  const last = new Int32Array(n + 1);
  const head = new Int32Array(n + 1);
  const elen = new Int32Array(n + 1); // number of elements in a variable's list; −2 element, −1 absorbed
  const degree = new Int32Array(n + 1);
  const w = new Int32Array(n + 1);
  const hhead = new Int32Array(n + 1);

  const dense = Math.min(n - 2, Math.max(16, Math.floor(10 * Math.sqrt(n))));

  for (let i = 0; i <= n; i++) {
    head[i] = -1;
    last[i] = -1;
    next[i] = -1;
    hhead[i] = -1;
    nv[i] = 1;
    w[i] = 1;
    elen[i] = 0;
    degree[i] = len[i];
  }
  let mark = clearMarks(0, 0, w, n);
  elen[n] = -2;
  start[n] = -1;
  w[n] = 0;
  let nel = 0;

  for (let i = 0; i < n; i++) {
    const d = degree[i];
    if (d === 0) {
      elen[i] = -2;
      nel++;
      start[i] = -1;
      w[i] = 0;
    } else if (d > dense) {
      // dense row: absorbed into the placeholder element n, ordered last
      nv[i] = 0;
      elen[i] = -1;
      nel++;
      start[i] = flip(n);
      nv[n]++;
    } else {
      if (head[d] !== -1) last[head[d]] = i;
      next[i] = head[d];
      head[d] = i;
    }
  }

  let mindeg = 0;
  let lemax = 0;
  while (nel < n) {
    // pick a variable of least approximate degree
    let k = -1;
    for (; mindeg < n; mindeg++) {
      k = head[mindeg];
      if (k !== -1) break;
    }
    if (next[k] !== -1) last[next[k]] = -1;
    head[mindeg] = next[k];
    const elenk = elen[k];
    let nvk = nv[k];
    nel += nvk;

    // compact storage when the new element might not fit
    if (elenk > 0 && used + mindeg >= cap) {
      for (let j = 0; j < n; j++) {
        const q = start[j];
        if (q >= 0) {
          start[j] = adj[q];
          adj[q] = flip(j);
        }
      }
      let dst = 0;
      for (let src = 0; src < used; ) {
        const j = flip(adj[src++]);
        if (j >= 0) {
          adj[dst] = start[j];
          start[j] = dst++;
          for (let t = 0; t < len[j] - 1; t++) adj[dst++] = adj[src++];
        }
      }
      used = dst;
    }

    // form element k as the union of its variables and the variables of its elements
    let dk = 0;
    nv[k] = -nvk;
    let pp = start[k];
    const pk1 = elenk === 0 ? pp : used;
    let pk2 = pk1;
    for (let k1 = 1; k1 <= elenk + 1; k1++) {
      let e: number;
      let pj: number;
      let ln: number;
      if (k1 > elenk) {
        e = k;
        pj = pp;
        ln = len[k] - elenk;
      } else {
        e = adj[pp++];
        pj = start[e];
        ln = len[e];
      }
      for (let k2 = 1; k2 <= ln; k2++) {
        const i = adj[pj++];
        const nvi = nv[i];
        if (nvi <= 0) continue;
        dk += nvi;
        nv[i] = -nvi;
        adj[pk2++] = i;
        if (next[i] !== -1) last[next[i]] = last[i];
        if (last[i] !== -1) next[last[i]] = next[i];
        else head[degree[i]] = next[i];
      }
      if (e !== k) {
        start[e] = flip(k);
        w[e] = 0;
      }
    }
    if (elenk !== 0) used = pk2;
    degree[k] = dk;
    start[k] = pk1;
    len[k] = pk2 - pk1;
    elen[k] = -2;

    // |Le \ Lk| for every element e adjacent to a variable of Lk, kept in w[e] − mark
    mark = clearMarks(mark, lemax, w, n);
    for (let pk = pk1; pk < pk2; pk++) {
      const i = adj[pk];
      const eln = elen[i];
      if (eln <= 0) continue;
      const nvi = -nv[i];
      const wnvi = mark - nvi;
      for (let q = start[i]; q <= start[i] + eln - 1; q++) {
        const e = adj[q];
        if (w[e] >= mark) w[e] -= nvi;
        else if (w[e] !== 0) w[e] = degree[e] + wnvi;
      }
    }

    // approximate degrees, pruning of absorbed elements and hashing of variables
    for (let pk = pk1; pk < pk2; pk++) {
      const i = adj[pk];
      const p1 = start[i];
      const p2 = p1 + elen[i] - 1;
      let pn = p1;
      let h = 0;
      let d = 0;
      for (let q = p1; q <= p2; q++) {
        const e = adj[q];
        if (w[e] !== 0) {
          const dext = w[e] - mark;
          if (dext > 0) {
            d += dext;
            adj[pn++] = e;
            h += e;
          } else {
            // aggressive absorption: Le is inside Lk
            start[e] = flip(k);
            w[e] = 0;
          }
        }
      }
      elen[i] = pn - p1 + 1;
      const p3 = pn;
      const p4 = p1 + len[i];
      for (let q = p2 + 1; q < p4; q++) {
        const j = adj[q];
        const nvj = nv[j];
        if (nvj <= 0) continue;
        d += nvj;
        adj[pn++] = j;
        h += j;
      }
      if (d === 0) {
        // mass elimination: i is adjacent only to k
        start[i] = flip(k);
        const nvi = -nv[i];
        dk -= nvi;
        nvk += nvi;
        nel += nvi;
        nv[i] = 0;
        elen[i] = -1;
      } else {
        degree[i] = Math.min(degree[i], d);
        adj[pn] = adj[p3];
        adj[p3] = adj[p1];
        adj[p1] = k;
        len[i] = pn - p1 + 1;
        h = h % n;
        next[i] = hhead[h];
        hhead[h] = i;
        last[i] = h;
      }
    }
    degree[k] = dk;
    lemax = Math.max(lemax, dk);
    mark = clearMarks(mark + lemax, lemax, w, n);

    // merge indistinguishable variables of Lk into supervariables
    for (let pk = pk1; pk < pk2; pk++) {
      let i = adj[pk];
      if (nv[i] >= 0) continue;
      const h = last[i];
      i = hhead[h];
      hhead[h] = -1;
      for (; i !== -1 && next[i] !== -1; i = next[i], mark++) {
        const ln = len[i];
        const eln = elen[i];
        for (let q = start[i] + 1; q <= start[i] + ln - 1; q++) w[adj[q]] = mark;
        let jlast = i;
        for (let j = next[i]; j !== -1; ) {
          let ok = len[j] === ln && elen[j] === eln;
          for (let q = start[j] + 1; ok && q <= start[j] + ln - 1; q++) if (w[adj[q]] !== mark) ok = false;
          if (ok) {
            start[j] = flip(i);
            nv[i] += nv[j];
            nv[j] = 0;
            elen[j] = -1;
            j = next[j];
            next[jlast] = j;
          } else {
            jlast = j;
            j = next[j];
          }
        }
      }
    }

    // put the surviving variables of Lk back into the degree lists
    let q = pk1;
    for (let pk = pk1; pk < pk2; pk++) {
      const i = adj[pk];
      const nvi = -nv[i];
      if (nvi <= 0) continue;
      nv[i] = nvi;
      let d = degree[i] + dk - nvi;
      d = Math.min(d, n - nel - nvi);
      if (head[d] !== -1) last[head[d]] = i;
      next[i] = head[d];
      last[i] = -1;
      head[d] = i;
      mindeg = Math.min(mindeg, d);
      degree[i] = d;
      adj[q++] = i;
    }
    nv[k] = nvk;
    len[k] = q - pk1;
    if (len[k] === 0) {
      start[k] = -1;
      w[k] = 0;
    }
    if (elenk !== 0) used = q;
  }

  // postorder the assembly tree: variables follow the element that absorbed them
  for (let i = 0; i < n; i++) start[i] = flip(start[i]);
  const parent = start; // now parent in the assembly tree, −1 for roots
  head.fill(-1);
  for (let j = n; j >= 0; j--) {
    if (nv[j] > 0) continue;
    next[j] = head[parent[j]];
    head[parent[j]] = j;
  }
  for (let e = n; e >= 0; e--) {
    if (nv[e] <= 0) continue;
    if (parent[e] !== -1) {
      next[e] = head[parent[e]];
      head[parent[e]] = e;
    }
  }
  const order = new Int32Array(n + 1);
  const kk = forestPostorder(n + 1, parent, head, next, order, w);
  let t = 0;
  for (let s = 0; s < kk; s++) if (order[s] < n) perm[t++] = order[s];
  if (t !== n) throw new Error(`minimum degree ordering lost nodes (${t} of ${n})`);
  return perm;
}

/** Encodes a parent or list start as a negative number (involution). */
function flip(i: number): number {
  return -i - 2;
}

/** Reset the marker array when the mark would overflow. */
function clearMarks(mark: number, lemax: number, w: Int32Array, n: number): number {
  if (mark < 2 || mark + lemax >= 0x3fffffff) {
    for (let k = 0; k < n; k++) if (w[k] !== 0) w[k] = 1;
    return 2;
  }
  return mark;
}
