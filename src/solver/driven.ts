// Which vertices the supports hold, the machine drives and the gauge reads, picked once
// on the initial mesh (vertex ids are stable afterwards).
import type { CaseModel, Vec2 } from '../case/model.js';
import type { PolyMesh } from '../mesh/polymesh.js';
import { InputError } from '../errors.js';

/** A vertex dof with a weight: comp 0 = x, 1 = y. */
export interface VertexDof { v: number; comp: 0 | 1; w: number }

export interface Driven {
  fixed: VertexDof[];
  load: VertexDof[];
  gauge: VertexDof[];
  gaugeVerts: [number, number] | null;
}

/** Vertices on the boundary: those with an edge that only one cell has. */
export function boundaryVertices(m: PolyMesh): Uint8Array {
  const nv = m.xy.length >> 1, on = new Uint8Array(nv);
  const edges = new Map<number, number>();
  const key = (a: number, b: number) => a * nv + b;
  const { cellStart, cellVerts } = m;
  for (let c = 0; c + 1 < cellStart.length; c++) {
    const s = cellStart[c], e = cellStart[c + 1];
    for (let k = s; k < e; k++) edges.set(key(cellVerts[k], cellVerts[k + 1 < e ? k + 1 : s]), 1);
  }
  for (let c = 0; c + 1 < cellStart.length; c++) {
    const s = cellStart[c], e = cellStart[c + 1];
    for (let k = s; k < e; k++) {
      const a = cellVerts[k], b = cellVerts[k + 1 < e ? k + 1 : s];
      if (!edges.has(key(b, a))) { on[a] = 1; on[b] = 1; }
    }
  }
  return on;
}

function nearestBoundary(m: PolyMesh, on: Uint8Array, p: Vec2): { v: number; d: number } {
  let best = -1, bd = Infinity;
  for (let v = 0; v < on.length; v++) {
    if (!on[v]) continue;
    const d = Math.hypot(m.xy[2 * v] - p[0], m.xy[2 * v + 1] - p[1]);
    if (d < bd) { bd = d; best = v; }
  }
  return { v: best, d: bd };
}

function segDist(px: number, py: number, a: Vec2, b: Vec2): number {
  const ex = b[0] - a[0], ey = b[1] - a[1], L2 = ex * ex + ey * ey;
  const t = L2 > 0 ? Math.max(0, Math.min(1, ((px - a[0]) * ex + (py - a[1]) * ey) / L2)) : 0;
  return Math.hypot(px - a[0] - t * ex, py - a[1] - t * ey);
}

/** Boundary vertices a support or load acts on. */
function pick(m: PolyMesh, on: Uint8Array, field: string, at: Vec2 | undefined, along: [Vec2, Vec2] | undefined, width: number, tol: number): number[] {
  const out: number[] = [];
  if (along) {
    for (let v = 0; v < on.length; v++) if (on[v] && segDist(m.xy[2 * v], m.xy[2 * v + 1], along[0], along[1]) <= tol) out.push(v);
    if (out.length === 0) throw new InputError(`${field}.along does not run along the specimen boundary (no mesh vertex within ${tol.toPrecision(2)} mm of it)`);
    return out;
  }
  const p = at!;
  const near = nearestBoundary(m, on, p);
  if (near.v < 0 || near.d > Math.max(tol, 1e-6)) {
    throw new InputError(`${field}.at must be a point on the specimen boundary in mm (found [${p[0]}, ${p[1]}], ${near.d.toPrecision(3)} mm away from it)`);
  }
  if (width > 0) {
    for (let v = 0; v < on.length; v++) if (on[v] && Math.hypot(m.xy[2 * v] - p[0], m.xy[2 * v + 1] - p[1]) <= width / 2 + tol) out.push(v);
    return out;
  }
  return [near.v];
}

export function selectDriven(c: CaseModel, m: PolyMesh, tol: number): Driven {
  const on = boundaryVertices(m);
  const fixed: VertexDof[] = [], load: VertexDof[] = [];
  const seen = new Map<number, string>();
  c.supports.forEach((s, i) => {
    for (const v of pick(m, on, `supports[${i}]`, s.at, s.along, s.width, tol)) {
      if (s.fix !== 'y') { fixed.push({ v, comp: 0, w: 0 }); seen.set(2 * v, `supports[${i}]`); }
      if (s.fix !== 'x') { fixed.push({ v, comp: 1, w: 0 }); seen.set(2 * v + 1, `supports[${i}]`); }
    }
  });
  c.loads.forEach((l, i) => {
    const [dx, dy] = l.direction;
    for (const v of pick(m, on, `loads[${i}]`, l.at, l.along, l.width, tol)) {
      // an axis-aligned platen prescribes its own axis only; an oblique one moves the points rigidly
      const comps: [0 | 1, number][] = Math.abs(dy) < 1e-12 ? [[0, dx]] : Math.abs(dx) < 1e-12 ? [[1, dy]] : [[0, dx], [1, dy]];
      for (const [comp, w] of comps) {
        const other = seen.get(2 * v + comp);
        if (other) throw new InputError(`loads[${i}] acts on a point that ${other} already holds in the same direction; move the load or the support`);
        seen.set(2 * v + comp, `loads[${i}]`);
        load.push({ v, comp, w });
      }
    }
  });
  let gauge: VertexDof[] = [], gaugeVerts: [number, number] | null = null;
  const g = c.control.gauge;
  if (g) {
    const a = nearestBoundary(m, on, g.from), b = nearestBoundary(m, on, g.to);
    if (a.d > Math.max(tol, 1e-6)) throw new InputError(`control.gauge.from must be a point on the specimen boundary in mm (found [${g.from}], ${a.d.toPrecision(3)} mm away from it)`);
    if (b.d > Math.max(tol, 1e-6)) throw new InputError(`control.gauge.to must be a point on the specimen boundary in mm (found [${g.to}], ${b.d.toPrecision(3)} mm away from it)`);
    const ex = g.to[0] - g.from[0], ey = g.to[1] - g.from[1], L = Math.hypot(ex, ey);
    if (!(L > 0)) throw new InputError('control.gauge.to must differ from control.gauge.from (found the same point)');
    gauge = [{ v: b.v, comp: 0, w: ex / L }, { v: b.v, comp: 1, w: ey / L }, { v: a.v, comp: 0, w: -ex / L }, { v: a.v, comp: 1, w: -ey / L }];
    gaugeVerts = [a.v, b.v];
  }
  if (load.length === 0) throw new InputError('loads must name at least one point or strip on the specimen boundary (found none)');
  return { fixed, load, gauge, gaugeVerts };
}
