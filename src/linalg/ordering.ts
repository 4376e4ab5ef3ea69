// Fill-reducing orderings of a symmetric pattern, computed on the compressed graph and expanded
// back to rows: minimum degree, or nested dissection with minimum degree inside its stages.

import type { CsrPattern } from './csr.js';
import { compressPattern, expandOrder } from './graph.js';
import { dissectionStages, type DissectionOptions } from './dissection.js';
import { minimumDegree } from './mindegree.js';

export type OrderingMethod = 'auto' | 'dissection' | 'mindegree';

/**
 * Rows from which 'auto' takes nested dissection: measured on the benchmark plates (npm run bench),
 * minimum degree gives the smaller factor on small meshes, dissection on large ones.
 */
export const DISSECTION_FROM_ROWS = 30_000;

/**
 * Elimination order (new → old) of the pattern's rows. Rows marked in `last` are eliminated
 * after all others (a row sharing a compressed node with a marked one goes with it), so a
 * change confined to them leaves the factor's leading columns as they are.
 */
export function fillReducingOrder(p: CsrPattern, method: OrderingMethod = 'auto', opts: DissectionOptions = {}, last?: Uint8Array): Int32Array {
  const c = compressPattern(p);
  const dissect = method === 'dissection' || (method === 'auto' && p.n >= DISSECTION_FROM_ROWS);
  let stage = dissect ? dissectionStages(c.graph, opts) : undefined;
  if (last) {
    const g = c.graph.n;
    let top = 0;
    if (stage) for (let v = 0; v < g; v++) top = Math.max(top, stage[v]);
    const st = new Int32Array(g);
    for (let v = 0; v < g; v++) {
      let marked = false;
      for (let q = c.memberPtr[v]; q < c.memberPtr[v + 1]; q++) if (last[c.members[q]]) marked = true;
      st[v] = marked ? top + 1 : stage ? stage[v] : 0;
    }
    stage = st;
  }
  return expandOrder(c, minimumDegree(c.graph, stage));
}
