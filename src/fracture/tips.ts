// The crack tips of the current state and their stress intensity factors: every end of a
// slit or crack that lies inside the material (an end not twinned) is a tip; its frame is
// the direction of the last segment, and the interaction-integral domain is as large as the
// room around it allows (the outline, other cracks, loads and supports stay outside).
import type { PolyMesh } from '../mesh/polymesh.js';
import type { CaseModel } from '../case/model.js';
import type { WorkMesh } from './workmesh.js';
import { boundaryVertices } from '../solver/driven.js';
import { SifWork, mtsKink, tipFactors, type Elastic } from './sif.js';

/** A crack (slit or grown): its path of vertex ids and the twin of each (−1: not twinned). */
export interface CrackLine { kind: 'notch' | 'cohesive'; path: number[]; twins: number[] }

export interface TipMeasure {
  crack: number;
  /** 0: the end at path[0], 1: the end at the last path vertex. */
  end: 0 | 1;
  v: number; x: number; y: number; dx: number; dy: number;
  /** MPa√mm; null where the domain has no room (a tip at a boundary or against another crack). */
  KI: number | null; KII: number | null;
  /** Spread of the two rings, max |ΔK| / |K|. */
  spread: number | null;
  /** Radius of the outer ring (mm). */
  R: number;
  /** Direction by the maximum tangential stress criterion, radians from +x (null without K). */
  kink: number | null;
}

/** Ends of the cracks that lie inside the material, with the direction of their last segment. */
export function crackEnds(wm: WorkMesh, cracks: CrackLine[]): { crack: number; end: 0 | 1; v: number; back: number[] }[] {
  const out: { crack: number; end: 0 | 1; v: number; back: number[] }[] = [];
  cracks.forEach((k, i) => {
    const n = k.path.length;
    if (n < 2) return;
    if (k.twins[0] < 0) out.push({ crack: i, end: 0, v: k.path[0], back: k.path.slice(1) });
    if (k.twins[n - 1] < 0) out.push({ crack: i, end: 1, v: k.path[n - 1], back: k.path.slice(0, n - 1).reverse() });
  });
  void wm;
  return out;
}

/**
 * Radius of the domain around a tip: half the straight length of its own crack behind it,
 * 0.9 of the distance to the outline (crack faces excepted), to any other crack and to loads
 * and supports, at most `cap`.
 */
function room(wm: WorkMesh, m: PolyMesh, vertexOf: Int32Array, on: Uint8Array, c: CaseModel, cracks: CrackLine[], own: number, tip: number, back: number[], dx: number, dy: number, cap: number): number {
  const x0 = wm.x[tip], y0 = wm.y[tip];
  // the straight part of the own crack: as far back as the path stays within 10° of the tip's line
  let straight = 0;
  for (const v of back) {
    const rx = x0 - wm.x[v], ry = y0 - wm.y[v], L = Math.hypot(rx, ry);
    if (L > 0 && (rx * dx + ry * dy) / L < Math.cos(Math.PI / 18)) break;
    straight = L;
  }
  let R = Math.min(cap, 0.5 * straight);
  const nv = m.xy.length >> 1;
  const onCrack = new Set<number>();
  for (const k of cracks) { for (const v of k.path) onCrack.add(v); for (const v of k.twins) if (v >= 0) onCrack.add(v); }
  for (let i = 0; i < nv; i++) {
    if (!on[i] || wm.face[vertexOf[i]] || onCrack.has(vertexOf[i])) continue;
    R = Math.min(R, 0.9 * Math.hypot(m.xy[2 * i] - x0, m.xy[2 * i + 1] - y0));
  }
  cracks.forEach((k, i) => {
    if (i === own) return;
    for (const v of k.path) R = Math.min(R, 0.9 * Math.hypot(wm.x[v] - x0, wm.y[v] - y0));
  });
  for (const q of [...c.supports, ...c.loads]) {
    const [p0, p1] = q.along ?? [q.at!, q.at!];
    const ex = p1[0] - p0[0], ey = p1[1] - p0[1], L2 = ex * ex + ey * ey;
    const s = L2 > 0 ? Math.max(0, Math.min(1, ((x0 - p0[0]) * ex + (y0 - p0[1]) * ey) / L2)) : 0;
    R = Math.min(R, 0.9 * (Math.hypot(x0 - p0[0] - s * ex, y0 - p0[1] - s * ey) - q.width / 2));
  }
  return R;
}

/**
 * K_I, K_II and the MTS direction at every tip. m, vertexOf, compactOf: the compact mesh of the
 * current state; u its displacements (2 per compact vertex). A domain smaller than two tip
 * cells gives no K.
 */
export function measureTips(
  wm: WorkMesh, cracks: CrackLine[], cp: { mesh: PolyMesh; vertexOf: Int32Array; compactOf: Int32Array },
  u: Float64Array, el: Elastic, c: CaseModel,
): TipMeasure[] {
  const ends = crackEnds(wm, cracks);
  if (ends.length === 0) return [];
  const on = boundaryVertices(cp.mesh);
  const work = new SifWork();
  const cap = Math.max(c.mesh.refineRadius, 8 * c.mesh.tipSize);
  return ends.map((e) => {
    const x = wm.x[e.v], y = wm.y[e.v];
    // the direction of a chord at least two tip cells long: a slit cut through the cells
    // wavers by a fraction of a cell, which its last short segment would turn into degrees
    let p = e.back[0];
    for (const v of e.back) { p = v; if (Math.hypot(x - wm.x[v], y - wm.y[v]) >= 2 * c.mesh.tipSize) break; }
    const L = Math.hypot(x - wm.x[p], y - wm.y[p]), dx = (x - wm.x[p]) / L, dy = (y - wm.y[p]) / L;
    const R = room(wm, cp.mesh, cp.vertexOf, on, c, cracks, e.crack, e.v, e.back, dx, dy, cap);
    const base = { crack: e.crack, end: e.end, v: e.v, x, y, dx, dy, R };
    if (!(R >= 2 * c.mesh.tipSize)) return { ...base, KI: null, KII: null, spread: null, kink: null };
    const f = tipFactors(cp.mesh, u, el, { x, y, dx, dy }, R, work);
    return { ...base, KI: f.KI, KII: f.KII, spread: f.spread, kink: Math.atan2(dy, dx) + mtsKink(f.KI, f.KII) };
  });
}
