// Minimum degree ordering on the quotient graph (George & Liu 1989, "The evolution of the minimum
// degree ordering algorithm", SIAM Review 31(1):1–19): an eliminated vertex becomes an element that
// stands for the clique it creates, elements adjacent to it are absorbed into the new one,
// indistinguishable vertices are merged into one weighted vertex (supervariable) and a vertex whose
// only neighbour is the new element is eliminated with it (mass elimination). Degrees are the
// approximate external degrees of Amestoy, Davis & Duff 1996, "An approximate minimum degree ordering
// algorithm", SIAM J. Matrix Anal. Appl. 17(4):886–905: an upper bound computed from the sizes of
// the elements less their overlap with the new one, which also finds elements to absorb
// (aggressive absorption). All lists live in one Int32Array; new elements are written after the
// used part and the array is compacted when it runs out.

import type { Graph } from './graph.js';

const VARIABLE = 0;
const ELEMENT = 1;
const GONE = 2;

/** Working state of one ordering run; every array is allocated once, before the first pivot. */
interface Quotient {
  /** Lists: a variable's elements first (elen of them), then its variables; an element's variables. */
  iw: Int32Array;
  start: Int32Array;
  len: Int32Array;
  elen: Int32Array;
  /** First unused entry of iw. */
  free: number;
  state: Uint8Array;
}

/** Moves every live list to the front of iw, in the order the lists sit, and grows iw if need more still does not fit. */
function compact(q: Quotient, need: number): void {
  const { start, len, state } = q;
  const n = start.length;
  let live = 0;
  for (let v = 0; v < n; v++) if (state[v] !== GONE) live++;
  // live lists sorted by position, so moving each one down never overwrites one not yet moved
  const at = new Float64Array(live);
  live = 0;
  for (let v = 0; v < n; v++) if (state[v] !== GONE) at[live++] = start[v] * n + v;
  at.sort();
  let iw = q.iw;
  let used = 0;
  for (let t = 0; t < live; t++) {
    const v = at[t] % n;
    iw.copyWithin(used, start[v], start[v] + len[v]);
    start[v] = used;
    used += len[v];
  }
  if (used + need > iw.length) {
    const grown = new Int32Array(Math.max(2 * iw.length, used + need + (iw.length >> 1)));
    grown.set(iw.subarray(0, used));
    iw = grown;
    q.iw = iw;
  }
  q.free = used;
}

/**
 * Minimum degree elimination order of the vertices of g (new → old), vertex weights counted in degrees.
 * With stage given, a vertex goes only after every vertex of a lower stage (minimum degree with
 * constraints: Liu 1989, "The minimum degree ordering with constraints", SIAM J. Sci. Stat. Comput. 10).
 */
export function minimumDegree(g: Graph, stage?: Int32Array): Int32Array {
  const n = g.n;
  const order = new Int32Array(n);
  if (n === 0) return order;
  const nnz = g.ptr[n];
  const q: Quotient = {
    iw: new Int32Array(nnz + Math.max(nnz >> 1, 4 * n) + 16),
    start: new Int32Array(n),
    len: new Int32Array(n),
    elen: new Int32Array(n),
    free: nnz,
    state: new Uint8Array(n),
  };
  const { start, len, elen, state } = q;
  q.iw.set(g.adj);
  const nv = Int32Array.from(g.weight); // supervariable weight (0 once merged into another)
  const deg = new Int32Array(n); // approximate external degree of a variable; weighted size of an element's list
  let totalW = 0;
  for (let v = 0; v < n; v++) {
    start[v] = g.ptr[v];
    len[v] = g.ptr[v + 1] - g.ptr[v];
    totalW += nv[v];
  }
  for (let v = 0; v < n; v++) {
    let d = 0;
    for (let t = g.ptr[v]; t < g.ptr[v + 1]; t++) d += nv[g.adj[t]];
    deg[v] = d;
  }

  // vertices merged into v follow it in the order: a chain v → chain[v] → … ending at chainEnd[v]
  const chain = new Int32Array(n).fill(-1);
  const chainEnd = new Int32Array(n);
  for (let v = 0; v < n; v++) chainEnd[v] = v;

  // degree buckets (doubly linked) holding the variables of the current stage
  const head = new Int32Array(totalW + 1).fill(-1);
  const nextB = new Int32Array(n);
  const prevB = new Int32Array(n);
  const inBucket = new Uint8Array(n);
  let minDeg = totalW + 1;
  const bucketIn = (v: number): void => {
    const d = deg[v];
    const h = head[d];
    nextB[v] = h;
    prevB[v] = -1;
    if (h !== -1) prevB[h] = v;
    head[d] = v;
    inBucket[v] = 1;
    if (d < minDeg) minDeg = d;
  };
  const bucketOut = (v: number): void => {
    if (inBucket[v] === 0) return;
    inBucket[v] = 0;
    const a = prevB[v];
    const b = nextB[v];
    if (a !== -1) nextB[a] = b;
    else head[deg[v]] = b;
    if (b !== -1) prevB[b] = a;
  };

  // stages open one after the other; byStage lists the vertices stage by stage
  const byStage = new Int32Array(n);
  const stageEnd: number[] = [];
  if (stage) {
    let top = 0;
    for (let v = 0; v < n; v++) top = Math.max(top, stage[v]);
    const cnt = new Int32Array(top + 2);
    for (let v = 0; v < n; v++) cnt[stage[v] + 1]++;
    for (let s = 0; s <= top; s++) cnt[s + 1] += cnt[s];
    for (let s = 1; s <= top + 1; s++) stageEnd.push(cnt[s]);
    for (let v = 0; v < n; v++) byStage[cnt[stage[v]]++] = v;
  } else {
    for (let v = 0; v < n; v++) byStage[v] = v;
    stageEnd.push(n);
  }
  let openStage = -1;
  let stageFrom = 0;
  const sameStage = (a: number, b: number): boolean => !stage || stage[a] === stage[b];
  const stageOf = (v: number): number => (stage ? stage[v] : 0);

  // per pivot stamps: mark (members of the new element, list comparisons), overlap of older elements
  const mark = new Int32Array(n);
  let stamp = 0;
  const wTag = new Int32Array(n);
  const wv = new Int32Array(n);
  let tag = 0;
  const partial = new Int32Array(n); // degree outside the new element
  const hashHead = new Int32Array(n).fill(-1);
  const hashNext = new Int32Array(n);
  const hashKey = new Int32Array(n);
  const lpBuf = new Int32Array(n);

  let k = 0; // entries of order written
  let left = totalW; // weight not yet eliminated

  while (k < n) {
    // the least degree among the open stage's variables; open the next stage when it has none left
    while (minDeg <= totalW && head[minDeg] === -1) minDeg++;
    if (minDeg > totalW) {
      openStage++;
      const to = stageEnd[openStage];
      for (let t = stageFrom; t < to; t++) {
        const v = byStage[t];
        if (state[v] === VARIABLE && nv[v] > 0) bucketIn(v);
      }
      stageFrom = to;
      continue;
    }
    const p = head[minDeg];
    bucketOut(p);
    const np = nv[p];
    for (let j = p; j !== -1; j = chain[j]) order[k++] = j;
    left -= np;

    // the new element's variables: p's variables and those of the elements it absorbs
    let bound = len[p];
    {
      const s0 = start[p];
      for (let t = 0; t < elen[p]; t++) {
        const e = q.iw[s0 + t];
        if (state[e] === ELEMENT) bound += len[e];
      }
    }
    if (q.free + bound > q.iw.length) compact(q, bound);
    const iw = q.iw;
    stamp++;
    mark[p] = stamp;
    const lpStart = q.free;
    let lpEnd = lpStart;
    let lpW = 0;
    {
      const s0 = start[p];
      const ep = elen[p];
      for (let t = 0; t < len[p]; t++) {
        const x = iw[s0 + t];
        if (t < ep) {
          if (state[x] !== ELEMENT) continue;
          const es = start[x];
          for (let u = es; u < es + len[x]; u++) {
            const v = iw[u];
            if (state[v] === VARIABLE && nv[v] > 0 && mark[v] !== stamp) {
              mark[v] = stamp;
              iw[lpEnd++] = v;
              lpW += nv[v];
            }
          }
          state[x] = GONE; // absorbed into p
        } else if (state[x] === VARIABLE && nv[x] > 0 && mark[x] !== stamp) {
          mark[x] = stamp;
          iw[lpEnd++] = x;
          lpW += nv[x];
        }
      }
    }
    state[p] = ELEMENT;
    start[p] = lpStart;
    len[p] = lpEnd - lpStart;
    elen[p] = 0;
    q.free = lpEnd;
    const lpLen = lpEnd - lpStart;
    for (let t = 0; t < lpLen; t++) lpBuf[t] = iw[lpStart + t];

    // overlap of every older element with the new one: wv[e] = |Le \ Lp| (weighted)
    tag++;
    for (let t = 0; t < lpLen; t++) {
      const i = lpBuf[t];
      bucketOut(i);
      const s0 = start[i];
      const ni = nv[i];
      for (let u = s0; u < s0 + elen[i]; u++) {
        const e = iw[u];
        if (state[e] !== ELEMENT || e === p) continue;
        if (wTag[e] !== tag) {
          wTag[e] = tag;
          wv[e] = deg[e];
        }
        wv[e] -= ni;
      }
    }

    // each variable's lists pruned (absorbed elements, variables covered by p), p put first; the
    // degree's part outside p summed; a variable left adjacent to p alone goes with p
    let massW = 0;
    for (let t = 0; t < lpLen; t++) {
      const i = lpBuf[t];
      const s0 = start[i];
      const e0 = elen[i];
      const l0 = len[i];
      let w = s0; // kept entries are written behind the reading position
      let sum = 0;
      let h = 0;
      for (let u = s0; u < s0 + e0; u++) {
        const e = iw[u];
        if (state[e] !== ELEMENT || e === p) continue;
        const x = wv[e];
        if (x === 0) {
          state[e] = GONE; // its variables all belong to p: absorbed
          continue;
        }
        sum += x;
        h += e;
        iw[w++] = e;
      }
      const ne = w - s0;
      for (let u = s0 + e0; u < s0 + l0; u++) {
        const v = iw[u];
        if (state[v] !== VARIABLE || nv[v] === 0 || mark[v] === stamp) continue;
        sum += nv[v];
        h += v;
        iw[w++] = v;
      }
      // p joins the elements: the slot of an absorbed element or of p as a variable is free
      iw[w] = iw[s0 + ne];
      iw[s0 + ne] = p;
      w++;
      elen[i] = ne + 1;
      len[i] = w - s0;
      if (ne === 0 && w - s0 === 1 && sameStage(i, p)) {
        // mass elimination: i is adjacent only to p
        for (let j = i; j !== -1; j = chain[j]) order[k++] = j;
        massW += nv[i];
        left -= nv[i];
        nv[i] = 0;
        state[i] = GONE;
        continue;
      }
      partial[i] = sum;
      hashKey[i] = (h + p) % n;
    }
    lpW -= massW;

    // indistinguishable variables of the new element merged: equal lists (p first in both)
    for (let t = 0; t < lpLen; t++) {
      const i = lpBuf[t];
      if (state[i] !== VARIABLE || nv[i] === 0) continue;
      const hk = hashKey[i];
      hashNext[i] = hashHead[hk];
      hashHead[hk] = i;
    }
    for (let t = 0; t < lpLen; t++) {
      const i = lpBuf[t];
      if (state[i] !== VARIABLE || nv[i] === 0) continue;
      const hk = hashKey[i];
      if (hashHead[hk] === -1) continue;
      // walk the bucket once from its head: each member compared with the later ones
      for (let a = hashHead[hk]; a !== -1; a = hashNext[a]) {
        if (nv[a] === 0) continue;
        stamp++;
        const sa = start[a];
        for (let u = sa; u < sa + len[a]; u++) mark[iw[u]] = stamp;
        for (let b = hashNext[a]; b !== -1; b = hashNext[b]) {
          if (nv[b] === 0 || len[b] !== len[a] || elen[b] !== elen[a] || !sameStage(a, b)) continue;
          const sb = start[b];
          let same = true;
          for (let u = sb; u < sb + len[b]; u++) {
            if (mark[iw[u]] !== stamp) {
              same = false;
              break;
            }
          }
          if (!same) continue;
          nv[a] += nv[b];
          nv[b] = 0;
          state[b] = GONE;
          chain[chainEnd[a]] = b;
          chainEnd[a] = chainEnd[b];
          if (deg[b] < deg[a]) deg[a] = deg[b];
        }
      }
      hashHead[hk] = -1;
    }

    // approximate external degrees (Amestoy, Davis & Duff 1996, the bound of their eq. (4)),
    // and the new element's list kept to its principal variables
    let kept = lpStart;
    for (let t = 0; t < lpLen; t++) {
      const i = lpBuf[t];
      if (state[i] !== VARIABLE || nv[i] === 0) continue;
      iw[kept++] = i;
      const ext = lpW - nv[i];
      let d = partial[i] + ext;
      if (deg[i] + ext < d) d = deg[i] + ext;
      if (left - nv[i] < d) d = left - nv[i];
      deg[i] = d;
      if (stageOf(i) === openStage) bucketIn(i);
    }
    len[p] = kept - lpStart;
    q.free = kept;
    deg[p] = lpW;
    if (len[p] === 0) state[p] = GONE;
  }
  return order;
}
