// Nested dissection by level structures: a piece of the graph is split by a separator, the two
// sides are ordered first (recursively) and the separator last, so the fill stays inside the
// sides and the separator's dense block (George 1973, "Nested dissection of a regular finite
// element mesh", SIAM J. Numer. Anal. 10:345–363). The separators come from rooted level
// structures at pseudo-peripheral vertices, a level near the middle by weight taking only its
// vertices adjacent to the next level (automatic nested dissection: George & Liu 1981, "Computer
// Solution of Large Sparse Positive Definite Systems", ch. 8; pseudo-peripheral vertices: George &
// Liu 1979, ACM TOMS 5:284–295). Pieces below a size are ordered by minimum degree.

import type { Graph } from './graph.js';

export interface DissectionOptions {
  /** Pieces with at most this many vertices are not split further (default 200). */
  leafSize?: number;
  /** Least share of the piece's weight on the lighter side of a separator (default 0.3). */
  balance?: number;
  /** Separator improvement passes (default 4; 0 keeps the level separators). */
  passes?: number;
}

/** Scratch shared by all pieces (sized for the whole graph). */
interface Work {
  g: Graph;
  piece: Int32Array;
  level: Int32Array;
  queue: Int32Array;
  /** Separator improvement: cached pulled weights (two per vertex) and whether they are current. */
  pull: Float64Array;
  fresh: Uint8Array;
  pieceId: number;
  /** Of the last level structure built: vertices reached and its height. */
  reached: number;
  height: number;
  /** The structure built before it (level2, queue2, reached2, height2), kept by swapStructures. */
  level2: Int32Array;
  queue2: Int32Array;
  reached2: number;
  height2: number;
  /** A vertex of the last level of the structure the last levelSeparator used. */
  far: number;
  /** Separator improvement lists, reused: the separator's vertices and the log of moves. */
  sep: number[];
  log: number[];
}

/** Breadth-first level structure of the piece from root: queue holds the reached vertices level by level (wk.reached, wk.height). */
function levelStructure(wk: Work, root: number): void {
  const { g, piece, level, queue, pieceId } = wk;
  level[root] = 0;
  queue[0] = root;
  // a visited vertex is moved off the piece's id until the search ends
  piece[root] = -pieceId - 1;
  let head = 0;
  let tail = 1;
  while (head < tail) {
    const v = queue[head++];
    for (let q = g.ptr[v]; q < g.ptr[v + 1]; q++) {
      const u = g.adj[q];
      if (piece[u] !== pieceId) continue;
      piece[u] = -pieceId - 1;
      level[u] = level[v] + 1;
      queue[tail++] = u;
    }
  }
  for (let t = 0; t < tail; t++) piece[queue[t]] = pieceId;
  wk.reached = tail;
  wk.height = level[queue[tail - 1]];
}

/** The current level structure becomes the kept one and the kept one current (no copying). */
function swapStructures(wk: Work): void {
  const { level, queue, reached, height } = wk;
  wk.level = wk.level2;
  wk.queue = wk.queue2;
  wk.reached = wk.reached2;
  wk.height = wk.height2;
  wk.level2 = level;
  wk.queue2 = queue;
  wk.reached2 = reached;
  wk.height2 = height;
}

/**
 * Two ends of a pseudo-diameter found by the pseudo-peripheral search (George & Liu 1979): the root and
 * its farthest try. On return the current level structure is the try's, the kept one the root's.
 * Starts from the level structure of start, the current one.
 */
function pseudoPeripheral(wk: Work, start: number): [number, number] {
  const g = wk.g;
  let root = start;
  let reached = wk.reached;
  let height = wk.height;
  for (;;) {
    const { level, queue } = wk;
    // the last level's vertex of least degree starts the next try
    let best = -1;
    let bestDeg = Infinity;
    for (let t = reached - 1; t >= 0 && level[queue[t]] === height; t--) {
      const v = queue[t];
      const d = g.ptr[v + 1] - g.ptr[v];
      if (d < bestDeg || (d === bestDeg && v < best)) {
        best = v;
        bestDeg = d;
      }
    }
    swapStructures(wk);
    levelStructure(wk, best);
    if (wk.height <= height) return [root, best];
    root = best;
    reached = wk.reached;
    height = wk.height;
  }
}

/**
 * Improves a vertex separator (side[v]: 0, 1, or 2 for the separator) by Fiduccia–Mattheyses passes
 * as described for vertex separators by Ashcraft & Liu 1994, "A partition improvement algorithm for
 * generalized nested dissection" (Boeing tech. report BCSTECH-94-020): a separator vertex moves to one
 * side and pulls its neighbours on the other side into the separator; each pass takes the best moves
 * in turn, each vertex moving once, and keeps the lightest balanced separator it passed through.
 */
function refineSeparator(wk: Work, verts: Int32Array, side: Uint8Array, balance: number, passes: number): void {
  const { g, piece, pieceId: id } = wk;
  const wt = g.weight;
  const sideW = [0, 0, 0];
  const sep = wk.sep;
  sep.length = 0;
  for (let t = 0; t < verts.length; t++) {
    const v = verts[t];
    sideW[side[v]] += wt[v];
    if (side[v] === 2) sep.push(v);
  }
  const balanced = (w0: number, w1: number) => Math.min(w0, w1) >= balance * (w0 + w1);
  // weight that moving v to side t pulls into the separator from the other side, cached until a
  // neighbour changes side
  const { pull, fresh } = wk;
  const pulled = (v: number, t: number): number => {
    if (fresh[v] !== 1) {
      let s0 = 0;
      let s1 = 0;
      for (let q = g.ptr[v]; q < g.ptr[v + 1]; q++) {
        const u = g.adj[q];
        if (piece[u] !== id) continue;
        if (side[u] === 1) s0 += wt[u];
        else if (side[u] === 0) s1 += wt[u];
      }
      pull[2 * v] = s0;
      pull[2 * v + 1] = s1;
      fresh[v] = 1;
    }
    return pull[2 * v + t];
  };
  const touch = (u: number): void => {
    for (let q = g.ptr[u]; q < g.ptr[u + 1]; q++) fresh[g.adj[q]] = 0;
  };
  const moved = wk.level; // reused as a per-pass lock stamp
  for (let t = 0; t < verts.length; t++) {
    fresh[verts[t]] = 0;
    moved[verts[t]] = -1;
  }
  const log = wk.log; // per move: v, t, count of pulled vertices, then the pulled vertices
  for (let pass = 0; pass < passes; pass++) {
    const startW = sideW[2];
    let bestW = balanced(sideW[0], sideW[1]) ? sideW[2] : Infinity;
    let bestLen = 0;
    let sinceBest = 0;
    log.length = 0;
    while (sinceBest < 50) {
      let bv = -1;
      let bt = 0;
      let bGain = -Infinity;
      let bPull = 0;
      for (const v of sep) {
        if (moved[v] === pass || side[v] !== 2) continue;
        for (let t = 0; t < 2; t++) {
          const pw = pulled(v, t);
          const gain = wt[v] - pw;
          const w0 = sideW[0] + (t === 0 ? wt[v] : -pw);
          const w1 = sideW[1] + (t === 1 ? wt[v] : -pw);
          if (!balanced(w0, w1) && balanced(sideW[0], sideW[1])) continue;
          if (gain > bGain || (gain === bGain && sideW[t] < sideW[bt])) {
            bv = v;
            bt = t;
            bGain = gain;
            bPull = pw;
          }
        }
      }
      if (bv < 0) break;
      moved[bv] = pass;
      side[bv] = bt;
      touch(bv);
      sideW[bt] += wt[bv];
      sideW[2] += bPull - wt[bv];
      sideW[1 - bt] -= bPull;
      log.push(bv, bt, 0);
      const countAt = log.length - 1;
      for (let q = g.ptr[bv]; q < g.ptr[bv + 1]; q++) {
        const u = g.adj[q];
        if (piece[u] === id && side[u] === 1 - bt) {
          side[u] = 2;
          touch(u);
          sep.push(u);
          log.push(u);
          log[countAt]++;
        }
      }
      if (sideW[2] < bestW && balanced(sideW[0], sideW[1])) {
        bestW = sideW[2];
        bestLen = log.length;
        sinceBest = 0;
      } else sinceBest++;
    }
    // undo the moves after the best point (walk the log back from its end)
    const starts: number[] = [];
    for (let at = 0; at < log.length; at += 3 + log[at + 2]) starts.push(at);
    for (let r = starts.length - 1; r >= 0 && starts[r] >= bestLen; r--) {
      const at = starts[r];
      const v = log[at];
      const t = log[at + 1];
      for (let c = 0; c < log[at + 2]; c++) {
        const u = log[at + 3 + c];
        side[u] = 1 - t;
        touch(u);
        sideW[2] -= wt[u];
        sideW[1 - t] += wt[u];
      }
      side[v] = 2;
      touch(v);
      sideW[t] -= wt[v];
      sideW[2] += wt[v];
    }
    // the separator list keeps only current separator vertices
    let k = 0;
    for (let i = 0; i < sep.length; i++) {
      const v = sep[i];
      if (side[v] === 2 && moved[v] !== -2 - pass) {
        moved[v] = -2 - pass;
        sep[k++] = v;
      }
    }
    sep.length = k;
    if (sideW[2] >= startW) break;
  }
}

/**
 * Splits the piece (vertices marked with wk.pieceId) by a level of the current level structure,
 * refined: side[v] = 0 or 1 for the two sides, 2 for the separator. Returns the separator's weight
 * (Infinity when the structure has fewer than three levels).
 */
function levelSeparator(wk: Work, verts: Int32Array, side: Uint8Array, balance: number, passes: number): number {
  const { g, piece, level, queue } = wk;
  const id = wk.pieceId;
  const m = verts.length;
  const height = wk.height;
  wk.far = queue[m - 1];
  if (height < 2) return Infinity;
  // per level: total weight and weight of the vertices adjacent to the next level
  const levelW = new Float64Array(height + 1);
  const sepW = new Float64Array(height + 1);
  let total = 0;
  for (let t = 0; t < m; t++) {
    const v = queue[t];
    const l = level[v];
    levelW[l] += g.weight[v];
    total += g.weight[v];
    for (let q = g.ptr[v]; q < g.ptr[v + 1]; q++) {
      const u = g.adj[q];
      if (piece[u] === id && level[u] === l + 1) {
        sepW[l] += g.weight[v];
        break;
      }
    }
  }
  // the lightest separator among levels leaving both sides at least `balance` of the weight
  let best = -1;
  let bestCost = Infinity;
  let bestTie = Infinity;
  let below = 0;
  for (let l = 0; l < height; l++) {
    const wA = below + levelW[l] - sepW[l];
    const wB = total - below - levelW[l];
    below += levelW[l];
    if (l === 0 || wB <= 0) continue;
    const light = Math.min(wA, wB) / (total - sepW[l]);
    const cost = light >= balance ? sepW[l] : Infinity;
    const tieBreak = Math.abs(wA - wB) / total;
    if (cost < bestCost || (cost === bestCost && cost < Infinity && tieBreak < bestTie)) {
      best = l;
      bestCost = cost;
      bestTie = tieBreak;
    }
  }
  if (best < 0) {
    // no level balances well enough: the middle level by weight
    below = 0;
    best = 1;
    for (let l = 0; l < height; l++) {
      below += levelW[l];
      if (below >= total / 2) {
        best = Math.max(1, Math.min(l, height - 1));
        break;
      }
    }
  }
  // 0 = first side (levels up to best), 1 = second side (levels after best), 2 = separator
  for (let t = 0; t < m; t++) {
    const v = queue[t];
    const l = level[v];
    let s = l < best ? 0 : l > best ? 1 : 0;
    if (l === best) {
      for (let q = g.ptr[v]; q < g.ptr[v + 1]; q++) {
        const u = g.adj[q];
        if (piece[u] === id && level[u] === best + 1) {
          s = 2;
          break;
        }
      }
    }
    side[v] = s;
  }
  if (passes > 0) refineSeparator(wk, verts, side, balance, passes);
  let w = 0;
  for (let t = 0; t < m; t++) if (side[verts[t]] === 2) w += g.weight[verts[t]];
  return w;
}

/**
 * Nested dissection of g as constraints on the elimination order: stage[v] = 0 inside the leaves,
 * and separators get higher stages the nearer they are to the top, so every separator comes after
 * the pieces it separates. Minimum degree under these constraints then orders each stage (the
 * hybrid of dissection and minimum degree: Liu 1989, "The minimum degree ordering with
 * constraints"; Ashcraft & Liu 1998, "Robust ordering of sparse matrices using multisection",
 * SIAM J. Matrix Anal. Appl. 19:816–832).
 */
export function dissectionStages(g: Graph, opts: DissectionOptions = {}): Int32Array {
  const n = g.n;
  const leafSize = opts.leafSize ?? 200;
  const balance = opts.balance ?? 0.3;
  const passes = opts.passes ?? 4;
  const wk: Work = {
    g,
    piece: new Int32Array(n),
    level: new Int32Array(n),
    queue: new Int32Array(n),
    pull: new Float64Array(2 * n),
    fresh: new Uint8Array(n),
    pieceId: 0,
    reached: 0,
    height: 0,
    level2: new Int32Array(n),
    queue2: new Int32Array(n),
    reached2: 0,
    height2: 0,
    far: -1,
    sep: [],
    log: [],
  };
  const piece = wk.piece;
  const side = new Uint8Array(n);
  const keep = new Uint8Array(n);
  const depth = new Int32Array(n).fill(-1);
  let maxDepth = -1;
  // pieces are ranges of verts, split in place; stack entries: first, end, depth, a start vertex (or −1)
  const verts = new Int32Array(n);
  for (let v = 0; v < n; v++) verts[v] = v;
  const tmp = new Int32Array(n);
  const stack: number[] = [0, n, 0, -1];
  while (stack.length > 0) {
    const hint = stack.pop()!;
    const d = stack.pop()!;
    const b = stack.pop()!;
    const a = stack.pop()!;
    const m = b - a;
    if (m <= leafSize) continue;
    const id = ++wk.pieceId;
    const pv = verts.subarray(a, b);
    for (let t = 0; t < m; t++) piece[pv[t]] = id;
    // a vertex at an end of the parent's level structure is near the periphery of this piece too
    const start = hint >= 0 && piece[hint] === id ? hint : pv[0];

    // a piece in several components splits without a separator
    levelStructure(wk, start);
    const reached = wk.reached;
    if (reached < m) {
      const queue = wk.queue;
      for (let t = 0; t < reached; t++) piece[queue[t]] = -1;
      let k = reached;
      for (let t = 0; t < m; t++) if (piece[pv[t]] === id) tmp[k++] = pv[t];
      for (let t = 0; t < m; t++) piece[pv[t]] = 0;
      pv.set(queue.subarray(0, reached));
      pv.set(tmp.subarray(reached, m), reached);
      stack.push(a, a + reached, d, start, a + reached, b, d, -1);
      continue;
    }

    // level structures from both ends of a pseudo-diameter (both built by the search); the lighter separator wins
    const [r1, r2] = pseudoPeripheral(wk, start);
    let sepW = levelSeparator(wk, pv, side, balance, 0);
    let root = r2;
    let far = wk.far;
    if (r2 !== r1) {
      for (let t = 0; t < m; t++) keep[t] = side[pv[t]];
      swapStructures(wk);
      const w1 = levelSeparator(wk, pv, side, balance, 0);
      if (w1 < sepW) {
        sepW = w1;
        root = r1;
        far = wk.far;
      } else for (let t = 0; t < m; t++) side[pv[t]] = keep[t];
    }
    if (sepW < Infinity && passes > 0) {
      refineSeparator(wk, pv, side, balance, passes);
      sepW = 0;
      for (let t = 0; t < m; t++) if (side[pv[t]] === 2) sepW += g.weight[pv[t]];
    }
    for (let t = 0; t < m; t++) piece[pv[t]] = 0;
    if (sepW === Infinity) continue; // too shallow to split: a leaf
    // sides first, separator last; each side's search starts from its end of the level structure
    let n0 = 0;
    for (let t = 0; t < m; t++) if (side[pv[t]] === 0) tmp[n0++] = pv[t];
    let n1 = n0;
    for (let t = 0; t < m; t++) if (side[pv[t]] === 1) tmp[n1++] = pv[t];
    let ns = n1;
    for (let t = 0; t < m; t++) if (side[pv[t]] === 2) tmp[ns++] = pv[t];
    pv.set(tmp.subarray(0, m));
    for (let t = n1; t < m; t++) depth[pv[t]] = d;
    if (d > maxDepth) maxDepth = d;
    stack.push(a, a + n0, d + 1, side[root] === 0 ? root : -1, a + n0, a + n1, d + 1, side[far] === 1 ? far : -1);
  }
  const stage = new Int32Array(n);
  for (let v = 0; v < n; v++) stage[v] = depth[v] < 0 ? 0 : maxDepth + 1 - depth[v];
  return stage;
}
