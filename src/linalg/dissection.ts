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
}

/** Breadth-first level structure of the piece from root: queue holds the reached vertices level by level; returns [reached, height]. */
function levelStructure(wk: Work, root: number): [number, number] {
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
  return [tail, level[queue[tail - 1]]];
}

/**
 * Two ends of a pseudo-diameter found by the pseudo-peripheral search (George & Liu 1979): the root and
 * its farthest try. Starts from the level structure of start, which queue and level hold.
 */
function pseudoPeripheral(wk: Work, start: number, reached: number, height: number): [number, number] {
  const { g, level, queue } = wk;
  let root = start;
  for (;;) {
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
    const [r2, h2] = levelStructure(wk, best);
    if (h2 <= height) return [root, best];
    root = best;
    reached = r2;
    height = h2;
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
  const sep: number[] = [];
  for (const v of verts) {
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
  for (const v of verts) fresh[v] = 0;
  const moved = wk.level; // reused as a per-pass lock stamp
  for (const v of verts) moved[v] = -1;
  const log: number[] = []; // per move: v, t, count of pulled vertices, then the pulled vertices
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
 * Splits the piece (vertices marked with wk.pieceId) by a level of the level structure rooted at root,
 * refined: side[v] = 0 or 1 for the two sides, 2 for the separator. Returns the separator's weight
 * (Infinity when the structure has fewer than three levels).
 */
function levelSeparator(wk: Work, verts: Int32Array, root: number, side: Uint8Array, balance: number, passes: number): number {
  const { g, piece, level, queue } = wk;
  const id = wk.pieceId;
  const m = verts.length;
  const [, height] = levelStructure(wk, root);
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
  };
  const { piece, queue } = wk;
  const side = new Uint8Array(n);
  const depth = new Int32Array(n).fill(-1);
  let maxDepth = -1;
  const stack: { verts: Int32Array; d: number }[] = [{ verts: Int32Array.from({ length: n }, (_, i) => i), d: 0 }];
  while (stack.length > 0) {
    const { verts, d } = stack.pop()!;
    const m = verts.length;
    if (m <= leafSize) continue;
    const id = ++wk.pieceId;
    for (let t = 0; t < m; t++) piece[verts[t]] = id;

    // a piece in several components splits without a separator
    const [reached, height] = levelStructure(wk, verts[0]);
    if (reached < m) {
      const comp = queue.slice(0, reached);
      for (let t = 0; t < reached; t++) piece[comp[t]] = 0;
      stack.push({ verts: comp, d }, { verts: verts.filter((v) => piece[v] === id), d });
      continue;
    }

    // level structures from both ends of a pseudo-diameter; the lighter separator wins
    const [r1, r2] = pseudoPeripheral(wk, verts[0], reached, height);
    let sepW = levelSeparator(wk, verts, r1, side, balance, passes);
    if (r2 !== r1) {
      const keep = Uint8Array.from(verts, (v) => side[v]);
      const w2 = levelSeparator(wk, verts, r2, side, balance, passes);
      if (w2 < sepW) sepW = w2;
      else for (let t = 0; t < m; t++) side[verts[t]] = keep[t];
    }
    for (let t = 0; t < m; t++) piece[verts[t]] = 0;
    if (sepW === Infinity) continue; // too shallow to split: a leaf
    for (let t = 0; t < m; t++) if (side[verts[t]] === 2) depth[verts[t]] = d;
    if (d > maxDepth) maxDepth = d;
    stack.push({ verts: verts.filter((v) => side[v] === 0), d: d + 1 }, { verts: verts.filter((v) => side[v] === 1), d: d + 1 });
  }
  const stage = new Int32Array(n);
  for (let v = 0; v < n; v++) stage[v] = depth[v] < 0 ? 0 : maxDepth + 1 - depth[v];
  return stage;
}
