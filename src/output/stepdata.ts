// The state of one step as a frame needs it, kept as a small compressed file in the run folder,
// so frames can be drawn after the run (one magnification for all) and drawn again byte for byte.
//
// Layout before deflate: u32 length of a JSON header, the header (UTF-8, padded to 4 bytes), then
// little-endian arrays: xy f32[2nv], u f32[2nv], s1/ft f32[nc], cellStart i32[nc+1], cellVerts i32[nk].

import { deflateSync, inflateSync } from 'node:zlib';
import type { PolyMesh } from '../mesh/polymesh.js';
import type { CohesiveSegment, Snapshot } from '../fracture/analysis.js';

export interface StepData {
  step: number;
  mesh: PolyMesh;
  /** Two per vertex, mm. */
  u: Float64Array;
  /** Major principal stress over ft, one per cell. */
  s1: Float64Array;
  cracks: Snapshot['cracks'];
  cohesive: CohesiveSegment[];
}

interface Header { format: 1; step: number; nv: number; nc: number; nk: number; cracks: Snapshot['cracks']; cohesive: number[] }

/** Major principal stress per cell divided by ft. */
export function s1OverFt(cellStress: Float64Array, ft: number): Float64Array {
  const n = cellStress.length / 3, out = new Float64Array(n);
  for (let c = 0; c < n; c++) {
    const sxx = cellStress[3 * c], syy = cellStress[3 * c + 1], sxy = cellStress[3 * c + 2];
    out[c] = ((sxx + syy) / 2 + Math.hypot((sxx - syy) / 2, sxy)) / ft;
  }
  return out;
}

/** Typed arrays as bytes in the machine's order (little-endian on every platform Node runs on here). */
const bytesOf = (a: Float32Array | Int32Array): Buffer => Buffer.from(a.buffer, a.byteOffset, a.byteLength);

/** A snapshot as stored bytes (single precision is far below a pixel). */
export function encodeStep(s: Snapshot, ft: number): Buffer {
  const nv = s.mesh.xy.length >> 1, nc = s.mesh.cellStart.length - 1, nk = s.mesh.cellVerts.length;
  const coh: number[] = [];
  for (const g of s.cohesive) coh.push(g.x1, g.y1, g.x2, g.y2, g.damage);
  const head: Header = { format: 1, step: s.step, nv, nc, nk, cracks: s.cracks, cohesive: coh };
  const h = Buffer.from(JSON.stringify(head), 'utf8');
  const lead = Buffer.alloc(4 + ((h.length + 3) & ~3));
  lead.writeUInt32LE(h.length, 0);
  h.copy(lead, 4);
  return deflateSync(Buffer.concat([lead, bytesOf(Float32Array.from(s.mesh.xy)), bytesOf(Float32Array.from(s.u)),
    bytesOf(Float32Array.from(s1OverFt(s.cellStress, ft))), bytesOf(Int32Array.from(s.mesh.cellStart)), bytesOf(Int32Array.from(s.mesh.cellVerts))]), { level: 6 });
}

export function decodeStep(z: Uint8Array): StepData {
  const buf = inflateSync(z);
  const hl = buf.readUInt32LE(0);
  const head = JSON.parse(buf.toString('utf8', 4, 4 + hl)) as Header;
  if (head.format !== 1) throw new Error(`step data of format ${String(head.format)}; this rupta reads format 1`);
  let o = 4 + ((hl + 3) & ~3);
  // a copy of each stretch: the inflated buffer need not be aligned for typed views
  const take = (n: number): ArrayBuffer => { const b = new Uint8Array(buf.subarray(o, o + 4 * n)).buffer; o += 4 * n; return b; };
  const f64 = (n: number) => Float64Array.from(new Float32Array(take(n)));
  const xy = f64(2 * head.nv), u = f64(2 * head.nv), s1 = f64(head.nc);
  const cellStart = new Int32Array(take(head.nc + 1)), cellVerts = new Int32Array(take(head.nk));
  const cohesive: CohesiveSegment[] = [];
  const c = head.cohesive;
  for (let k = 0; k + 4 < c.length; k += 5) cohesive.push({ x1: c[k], y1: c[k + 1], x2: c[k + 2], y2: c[k + 3], damage: c[k + 4] });
  return { step: head.step, mesh: { xy, cellStart, cellVerts }, u, s1, cracks: head.cracks, cohesive };
}
