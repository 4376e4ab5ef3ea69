// The mechanism check before a run: the mesh, with its slits cut in, falls into pieces
// (cells joined through shared edges); each piece must be held by the supports against
// rigid-body motion (x, y and rotation), or the run would trace a meaningless curve.
import type { CaseModel } from '../case/model.js';
import { InputError } from '../errors.js';
import type { PolyMesh } from '../mesh/polymesh.js';
import { selectDriven } from '../solver/driven.js';
import type { SlaveDof } from '../solver/platens.js';
import type { WorkMesh } from './workmesh.js';

function find(parent: Int32Array, v: number): number {
  while (parent[v] !== v) { parent[v] = parent[parent[v]]; v = parent[v]; }
  return v;
}

/** Rank (0–3) of the rigid-motion rows u = a − θy, v = b + θx restrained by fixed dofs, coordinates scaled to the piece. */
function rigidRank(rows: number[][]): number {
  let rank = 0;
  const m = rows;
  for (let col = 0; col < 3 && rank < m.length; col++) {
    let piv = rank;
    for (let r = rank + 1; r < m.length; r++) if (Math.abs(m[r][col]) > Math.abs(m[piv][col])) piv = r;
    if (Math.abs(m[piv][col]) < 1e-9) continue;
    [m[rank], m[piv]] = [m[piv], m[rank]];
    for (let r = rank + 1; r < m.length; r++) {
      const f = m[r][col] / m[rank][col];
      for (let k = col; k < 3; k++) m[r][k] -= f * m[rank][k];
    }
    rank++;
  }
  return rank;
}

export interface Piece { cells: number; x0: number; y0: number; x1: number; y1: number; rank: number }

/** The pieces of a work mesh (linear in its size) and how firmly the supports hold each. */
export function heldPieces(c: CaseModel, initial: PolyMesh, wm: WorkMesh): Piece[] {
  // cells are joined through shared edges: a piece hanging on one vertex (where two slits meet) is loose
  const nc = wm.cells.length, nv = wm.vertexCount;
  const parent = new Int32Array(nc);
  for (let k = 0; k < nc; k++) parent[k] = k;
  const edgeCell = new Map<number, number>();
  wm.cells.forEach((cell, k) => {
    if (!cell) return;
    for (let i = 0; i < cell.length; i++) {
      const a = cell[i], b = cell[(i + 1) % cell.length];
      const key = a < b ? a * nv + b : b * nv + a;
      const o = edgeCell.get(key);
      if (o === undefined) edgeCell.set(key, k);
      else { const r = find(parent, o), q = find(parent, k); if (r !== q) parent[q] = r; }
    }
  });
  const pieceOf = new Map<number, number>();
  const vertexPiece = new Int32Array(nv).fill(-1);
  const pieces: (Piece & { rows: [number, number][]; levers: SlaveDof[] })[] = [];
  wm.cells.forEach((cell, c0) => {
    if (!cell || cell.length === 0) return;
    const r = find(parent, c0);
    let k = pieceOf.get(r);
    if (k === undefined) { k = pieces.length; pieceOf.set(r, k); pieces.push({ cells: 0, x0: Infinity, y0: Infinity, x1: -Infinity, y1: -Infinity, rank: 0, rows: [], levers: [] }); }
    const p = pieces[k];
    p.cells++;
    for (const v of cell) {
      vertexPiece[v] = k;
      p.x0 = Math.min(p.x0, wm.x[v]); p.x1 = Math.max(p.x1, wm.x[v]);
      p.y0 = Math.min(p.y0, wm.y[v]); p.y1 = Math.max(p.y1, wm.y[v]);
    }
  });
  let ext = 0;
  for (let v = 0; v < (initial.xy.length >> 1); v++) ext = Math.max(ext, Math.abs(initial.xy[2 * v]), Math.abs(initial.xy[2 * v + 1]));
  const { fixed, slaves } = selectDriven(c, initial, 1e-6 * Math.max(ext, 1));
  // a support on a vertex shared by two pieces (a hinge) is counted for the piece its last cell belongs to
  for (const d of fixed) {
    const k = vertexPiece[d.v];
    if (k >= 0) pieces[k].rows.push([d.v, d.comp]);
  }
  // a rocker support holds its centre along its normal: u_i − Σ w·u_master = 0 with no machine term
  for (const sd of slaves) {
    const k = vertexPiece[sd.v];
    if (k >= 0 && sd.z === 0 && sd.masters.every((q) => vertexPiece[q.v] === k)) pieces[k].levers.push(sd);
  }
  return pieces.map((p) => {
    const cx = (p.x0 + p.x1) / 2, cy = (p.y0 + p.y1) / 2, L = Math.max(Math.hypot(p.x1 - p.x0, p.y1 - p.y0), 1e-300);
    const row = (v: number, comp: number) => (comp === 0 ? [1, 0, -(wm.y[v] - cy) / L] : [0, 1, (wm.x[v] - cx) / L]);
    const rows = p.rows.map(([v, comp]) => row(v, comp));
    for (const sd of p.levers) {
      const r = row(sd.v, sd.comp);
      for (const q of sd.masters) { const rq = row(q.v, q.comp); for (let j = 0; j < 3; j++) r[j] -= q.w * rq[j]; }
      rows.push(r);
    }
    return { cells: p.cells, x0: p.x0, y0: p.y0, x1: p.x1, y1: p.y1, rank: rigidRank(rows) };
  });
}

const pt = (x: number, y: number) => `[${+x.toPrecision(6)}, ${+y.toPrecision(6)}]`;

/** Refuses a mesh with a piece the supports do not hold (a loose piece cut off by slits or notches). */
export function checkHeldPieces(c: CaseModel, initial: PolyMesh, wm: WorkMesh): void {
  const pieces = heldPieces(c, initial, wm);
  const loose = pieces.find((p) => p.rank < 3);
  if (!loose) return;
  const how = loose.rank === 0 ? 'is held by no support' : 'is left free to move or turn by its supports';
  if (pieces.length > 1) {
    throw new InputError(`geometry.notches and geometry.holes must leave every piece of the specimen held by the supports against rigid-body motion (found ${pieces.length} pieces; the piece from ${pt(loose.x0, loose.y0)} to ${pt(loose.x1, loose.y1)} mm ${how})`);
  }
  throw new InputError(`supports must hold the specimen against rigid-body motion in x, y and rotation (found that the meshed specimen ${how})`);
}
