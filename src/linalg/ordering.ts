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

/** Elimination order (new → old) of the pattern's rows. */
export function fillReducingOrder(p: CsrPattern, method: OrderingMethod = 'auto', opts: DissectionOptions = {}): Int32Array {
  const c = compressPattern(p);
  const dissect = method === 'dissection' || (method === 'auto' && p.n >= DISSECTION_FROM_ROWS);
  const order = dissect ? minimumDegree(c.graph, dissectionStages(c.graph, opts)) : minimumDegree(c.graph);
  return expandOrder(c, order);
}
