// Minimum degree ordering on the quotient graph, as described in George & Liu 1989, "The evolution
// of the minimum degree ordering algorithm", SIAM Review 31(1):1–19: eliminated vertices become
// elements that stand for the cliques they create, an element adjacent to the eliminated vertex is
// absorbed into the new one, indistinguishable vertices are merged and eliminated together, and the
// vertex of least external degree goes next (external degree: Liu 1985, "Modification of the
// minimum-degree algorithm by multiple elimination", ACM TOMS 11:141–153). Degrees are exact.

import type { Graph } from './graph.js';

const VARIABLE = 0;
const ELEMENT = 1;
const GONE = 2;

/** Binary min-heap of numeric keys (degree·n + vertex, so ties go to the lower vertex). */
class KeyHeap {
  private keys = new Float64Array(64);
  size = 0;

  push(k: number): void {
    if (this.size === this.keys.length) {
      const grown = new Float64Array(2 * this.size);
      grown.set(this.keys);
      this.keys = grown;
    }
    const a = this.keys;
    let i = this.size++;
    while (i > 0) {
      const up = (i - 1) >> 1;
      if (a[up] <= k) break;
      a[i] = a[up];
      i = up;
    }
    a[i] = k;
  }

  peek(): number {
    return this.keys[0];
  }

  pop(): number {
    const a = this.keys;
    const top = a[0];
    const k = a[--this.size];
    let i = 0;
    for (;;) {
      let c = 2 * i + 1;
      if (c >= this.size) break;
      if (c + 1 < this.size && a[c + 1] < a[c]) c++;
      if (a[c] >= k) break;
      a[i] = a[c];
      i = c;
    }
    a[i] = k;
    return top;
  }
}

/** Keeps the entries of list for which keep() holds, in order. */
function filterInPlace(list: number[], keep: (v: number) => boolean): void {
  let k = 0;
  for (let t = 0; t < list.length; t++) if (keep(list[t])) list[k++] = list[t];
  list.length = k;
}

/**
 * Minimum degree elimination order of the vertices of g (new → old), vertex weights counted in degrees.
 * With stage given, a vertex goes only after every vertex of a lower stage (minimum degree with
 * constraints: Liu 1989, "The minimum degree ordering with constraints", SIAM J. Sci. Stat. Comput. 10).
 */
export function minimumDegree(g: Graph, stage?: Int32Array): Int32Array {
  const n = g.n;
  let totalW = 0;
  for (let v = 0; v < n; v++) totalW += g.weight[v];
  // heap key: (stage, degree, vertex) packed into one exact double
  const keyOf = (v: number, d: number) => ((stage ? stage[v] * (totalW + 1) : 0) + d) * n + v;
  const state = new Uint8Array(n);
  const w = Int32Array.from(g.weight);
  const deg = new Int32Array(n);
  const varAdj: number[][] = new Array(n);
  const elAdj: number[][] = new Array(n);
  const elVars: number[][] = new Array(n);
  // vertices merged into v follow it in the order: a chain v → next[v] → … ending at last[v]
  const next = new Int32Array(n).fill(-1);
  const last = Int32Array.from({ length: n }, (_, i) => i);
  const heap = new KeyHeap();
  for (let v = 0; v < n; v++) {
    const a: number[] = [];
    let d = 0;
    for (let q = g.ptr[v]; q < g.ptr[v + 1]; q++) {
      a.push(g.adj[q]);
      d += w[g.adj[q]];
    }
    varAdj[v] = a;
    elAdj[v] = [];
    elVars[v] = [];
    deg[v] = d;
    heap.push(keyOf(v, d));
  }

  const mark = new Int32Array(n);
  let stamp = 0;
  const isLive = (u: number) => state[u] === VARIABLE && mark[u] !== stamp;
  const isElement = (e: number) => state[e] === ELEMENT;
  const order = new Int32Array(n);
  let k = 0;
  const hash = new Float64Array(n);

  // multiple elimination (Liu 1985): every vertex of the least degree that no elimination of this
  // round has touched goes in the same round; degrees are updated once per round
  const dirtyMark = new Int32Array(n);
  const dirty: number[] = [];
  const roundElements: number[] = [];
  const inP = new Int32Array(n);
  let pStamp = 0;
  let round = 0;
  /** Eliminates p: the new element, its neighbours' lists, merging; the clique's variables become dirty. */
  const eliminate = (p: number): void => {
    for (let j = p; j !== -1; j = next[j]) order[k++] = j;

    // the new element's variables: p's variable neighbours and the variables of the elements it absorbs
    stamp++;
    mark[p] = stamp;
    const lp: number[] = [];
    for (const u of varAdj[p]) {
      if (state[u] === VARIABLE && mark[u] !== stamp) {
        mark[u] = stamp;
        lp.push(u);
      }
    }
    for (const e of elAdj[p]) {
      if (state[e] !== ELEMENT) continue;
      for (const u of elVars[e]) {
        if (state[u] === VARIABLE && mark[u] !== stamp) {
          mark[u] = stamp;
          lp.push(u);
        }
      }
      state[e] = GONE;
      elVars[e] = [];
    }
    state[p] = ELEMENT;
    elVars[p] = lp;
    varAdj[p] = [];
    elAdj[p] = [];

    // neighbours: absorbed elements replaced by p; variable edges inside the new clique are implied by p
    for (const i of lp) {
      filterInPlace(elAdj[i], isElement);
      elAdj[i].push(p);
      filterInPlace(varAdj[i], isLive);
      let h = varAdj[i].length * 7 + elAdj[i].length;
      for (const u of varAdj[i]) h += u;
      for (const e of elAdj[i]) h += e;
      hash[i] = h;
    }

    // indistinguishable variables of the clique are merged (their lists are equal sets)
    lp.sort((a, b) => hash[a] - hash[b] || a - b);
    for (let s = 0; s < lp.length; ) {
      let e = s + 1;
      while (e < lp.length && hash[lp[e]] === hash[lp[s]]) e++;
      for (let a = s; a < e; a++) {
        const i = lp[a];
        if (state[i] !== VARIABLE || e - s === 1) continue;
        stamp++;
        for (const u of varAdj[i]) mark[u] = stamp;
        for (const x of elAdj[i]) mark[x] = stamp;
        for (let b = a + 1; b < e; b++) {
          const j = lp[b];
          if (state[j] !== VARIABLE || (stage && stage[j] !== stage[i])) continue;
          if (varAdj[j].length !== varAdj[i].length || elAdj[j].length !== elAdj[i].length) continue;
          let same = true;
          for (const u of varAdj[j]) if (mark[u] !== stamp) { same = false; break; }
          if (same) for (const x of elAdj[j]) if (mark[x] !== stamp) { same = false; break; }
          if (!same) continue;
          w[i] += w[j];
          state[j] = GONE;
          next[last[i]] = j;
          last[i] = last[j];
        }
      }
      s = e;
    }
    filterInPlace(lp, (u) => state[u] === VARIABLE);
    for (const i of lp) {
      if (dirtyMark[i] !== round) {
        dirtyMark[i] = round;
        dirty.push(i);
      }
    }
  };

  while (heap.size > 0) {
    round++;
    dirty.length = 0;
    roundElements.length = 0;
    let level = -1;
    while (heap.size > 0) {
      const key = heap.peek();
      const p = key % n;
      if (state[p] !== VARIABLE || keyOf(p, deg[p]) !== key) {
        heap.pop();
        continue;
      }
      const base = (key - p) / n;
      if (level >= 0 && base !== level) break;
      heap.pop();
      if (dirtyMark[p] === round) continue;
      if (level < 0) level = base;
      eliminate(p);
      roundElements.push(p);
    }

    // exact external degrees of the variables the round touched, element by element: the new
    // element's weight is counted once and its variables skipped in the scans of the older ones
    for (const p of roundElements) {
      pStamp++;
      let wp = 0;
      for (const u of elVars[p]) {
        if (state[u] !== VARIABLE) continue;
        inP[u] = pStamp;
        wp += w[u];
      }
      for (const i of elVars[p]) {
        if (state[i] !== VARIABLE || dirtyMark[i] !== round) continue;
        dirtyMark[i] = -round;
        stamp++;
        mark[i] = stamp;
        let d = wp - w[i];
        for (const u of varAdj[i]) {
          if (state[u] === VARIABLE && inP[u] !== pStamp && mark[u] !== stamp) {
            mark[u] = stamp;
            d += w[u];
          }
        }
        for (const e of elAdj[i]) {
          if (e === p) continue;
          for (const u of elVars[e]) {
            if (state[u] === VARIABLE && inP[u] !== pStamp && mark[u] !== stamp) {
              mark[u] = stamp;
              d += w[u];
            }
          }
        }
        deg[i] = d;
        heap.push(keyOf(i, d));
      }
    }
  }
  return order;
}
