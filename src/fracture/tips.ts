// The crack tips of the current state and their stress intensity factors: every end of a
// slit or crack that lies inside the material (an end not twinned) is a tip; its frame is
// the direction of the last segment, and the interaction-integral domain is as large as the
// room around it allows (the outline, other cracks, loads and supports stay outside).
import type { PolyMesh } from '../mesh/polymesh.js';
import type { CaseModel } from '../case/model.js';
import type { WorkMesh } from './workmesh.js';
import { PER_SQRT_M, SifWork, mtsKink, tipFactors, type Elastic, type FaceData, type TipFrame, type TipResult } from './sif.js';

/**
 * Tractions on the crack faces for the face term of the interaction integral: for a face vertex
 * (work-mesh id) its normal and tangential traction (MPa) in the face's own frame (see FaceData),
 * or null where the face is free.
 */
export type FaceTraction = (v: number) => readonly [number, number] | null;

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
export function crackEnds(cracks: CrackLine[]): { crack: number; end: 0 | 1; v: number; back: number[] }[] {
  const out: { crack: number; end: 0 | 1; v: number; back: number[] }[] = [];
  // an end from which another crack has grown is no longer a tip
  const starts = new Set<number>();
  for (const k of cracks) if (k.path.length > 1) starts.add(k.path[0]);
  // the path behind a crack's start, where it grew out of the end of another crack
  const behind = (k: CrackLine, depth: number): number[] => {
    if (depth > 8) return [];
    const s = k.path[0];
    for (const o of cracks) {
      if (o === k || o.path.length < 2) continue;
      const n = o.path.length;
      if (o.path[n - 1] === s) return [...o.path.slice(0, n - 1).reverse(), ...behind(o, depth + 1)];
      if (o.path[0] === s && o.twins[0] < 0) return o.path.slice(1);
    }
    return [];
  };
  cracks.forEach((k, i) => {
    const n = k.path.length;
    if (n < 2) return;
    if (k.twins[0] < 0) out.push({ crack: i, end: 0, v: k.path[0], back: k.path.slice(1) });
    if (k.twins[n - 1] < 0 && !starts.has(k.path[n - 1])) out.push({ crack: i, end: 1, v: k.path[n - 1], back: [...k.path.slice(0, n - 1).reverse(), ...behind(k, 0)] });
  });
  return out;
}

/**
 * Radius of the domain around a tip: half the straight length of its own crack behind it,
 * 0.9 of the distance to the outline (crack faces excepted), to any other crack and to loads
 * and supports, at most `cap`.
 */
function room(wm: WorkMesh, m: PolyMesh, vertexOf: Int32Array, c: CaseModel, cracks: CrackLine[], own: number, tip: number, back: number[], dx: number, dy: number, cap: number): number {
  const x0 = wm.x[tip], y0 = wm.y[tip];
  // the straight part of the own crack: as far back as the path stays within 10° of the tip's line
  let straight = 0, bent = false, chain = 0;
  for (const v of back) {
    const rx = x0 - wm.x[v], ry = y0 - wm.y[v], L = Math.hypot(rx, ry);
    if (L > 0 && (rx * dx + ry * dy) / L < Math.cos(Math.PI / 18)) bent = true;
    if (!bent) straight = L;
    chain = Math.max(chain, L);
  }
  // past a kink the faces are not along x1 and the integral loses a little; a freshly kinked
  // tip still gets a domain of four tip cells where its crack is long enough
  let R = Math.min(cap, Math.max(0.5 * straight, Math.min(4 * c.mesh.tipSize, 0.5 * chain)));
  const onCrack = new Set<number>();
  for (const k of cracks) { for (const v of k.path) onCrack.add(v); for (const v of k.twins) if (v >= 0) onCrack.add(v); }
  // outline edges near the tip: edges of the cells within reach that no other cell shares
  const { xy, cellStart, cellVerts } = m, nc = cellStart.length - 1, reach2 = R * R / 0.81;
  const edges = new Set<string>(), near: number[] = [];
  for (let e = 0; e < nc; e++) {
    let inside = false;
    for (let k = cellStart[e]; k < cellStart[e + 1] && !inside; k++) {
      const v = cellVerts[k];
      inside = (xy[2 * v] - x0) ** 2 + (xy[2 * v + 1] - y0) ** 2 < reach2;
    }
    if (!inside) continue;
    near.push(e);
    for (let k = cellStart[e]; k < cellStart[e + 1]; k++) edges.add(`${cellVerts[k]},${cellVerts[k + 1 < cellStart[e + 1] ? k + 1 : cellStart[e]]}`);
  }
  for (const e of near) {
    for (let k = cellStart[e]; k < cellStart[e + 1]; k++) {
      const a = cellVerts[k], b = cellVerts[k + 1 < cellStart[e + 1] ? k + 1 : cellStart[e]];
      if (edges.has(`${b},${a}`)) continue;
      for (const v of [a, b]) {
        if (wm.face[vertexOf[v]] || onCrack.has(vertexOf[v])) continue;
        R = Math.min(R, 0.9 * Math.hypot(xy[2 * v] - x0, xy[2 * v + 1] - y0));
      }
    }
  }
  // other cracks, apart from the ones this tip's crack grew out of
  const mine = new Set(back);
  cracks.forEach((k, i) => {
    if (i === own) return;
    for (const v of k.path) if (!mine.has(v) && v !== tip) R = Math.min(R, 0.9 * Math.hypot(wm.x[v] - x0, wm.y[v] - y0));
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
 * cells gives no K; so does a crack for which withK is false (its end is listed all the same).
 * factors: K at one tip within radius R (default: the order-1 interaction integral on cp.mesh and u).
 */
export function measureTips(
  wm: WorkMesh, cracks: CrackLine[], cp: { mesh: PolyMesh; vertexOf: Int32Array; compactOf: Int32Array },
  u: Float64Array, el: Elastic, c: CaseModel, withK: (crack: number) => boolean = () => true, traction?: FaceTraction,
  factors?: (tip: TipFrame, R: number, work: SifWork) => TipResult,
): TipMeasure[] {
  const ends = crackEnds(cracks);
  if (ends.length === 0) return [];
  const work = new SifWork();
  const faces = traction ? faceData(cracks, cp.compactOf, cp.mesh.xy.length >> 1, traction) : null;
  const cap = Math.max(c.mesh.refineRadius, 8 * c.mesh.tipSize);
  return ends.map((e) => {
    const x = wm.x[e.v], y = wm.y[e.v];
    // the direction of a chord at least two tip cells long: a slit cut through the cells
    // wavers by a fraction of a cell, which its last short segment would turn into degrees.
    // The chord stays on the tip's own crack: a crack kinked out of a slit less than two tip
    // cells ago would otherwise take a frame turned part way back toward the slit, and K read
    // in a frame that is not the crack's is not the crack's K.
    const own = cracks[e.crack].path.length - 1;
    let p = e.back[0];
    for (let i = 0; i < own; i++) { p = e.back[i]; if (Math.hypot(x - wm.x[p], y - wm.y[p]) >= 2 * c.mesh.tipSize) break; }
    const L = Math.hypot(x - wm.x[p], y - wm.y[p]), dx = (x - wm.x[p]) / L, dy = (y - wm.y[p]) / L;
    if (!withK(e.crack)) return { crack: e.crack, end: e.end, v: e.v, x, y, dx, dy, R: 0, KI: null, KII: null, spread: null, kink: null };
    const R = room(wm, cp.mesh, cp.vertexOf, c, cracks, e.crack, e.v, e.back, dx, dy, cap);
    const base = { crack: e.crack, end: e.end, v: e.v, x, y, dx, dy, R };
    if (!(R >= 2 * c.mesh.tipSize)) return { ...base, KI: null, KII: null, spread: null, kink: null };
    const f = factors ? factors({ x, y, dx, dy }, R, work) : tipFactors(cp.mesh, u, el, { x, y, dx, dy }, R, work, faces);
    // an unloaded tip has no direction to take
    const kink = f.KI === 0 && f.KII === 0 ? null : Math.atan2(dy, dx) + mtsKink(f.KI, f.KII);
    return { ...base, KI: f.KI, KII: f.KII, spread: f.spread, kink };
  });
}

/** The faces of all cracks on the compact mesh, with their tractions. */
function faceData(cracks: CrackLine[], compactOf: Int32Array, nv: number, traction: FaceTraction): FaceData {
  const onFace = new Uint8Array(nv), t = new Float64Array(2 * nv);
  let loaded = false;
  const mark = (v: number) => {
    const k = compactOf[v];
    if (k < 0 || onFace[k]) return;
    onFace[k] = 1;
    const f = traction(v);
    if (f) { t[2 * k] = f[0]; t[2 * k + 1] = f[1]; loaded ||= f[0] !== 0 || f[1] !== 0; }
  };
  for (const k of cracks) { for (const v of k.path) mark(v); for (const v of k.twins) if (v >= 0) mark(v); }
  return { onFace, traction: loaded ? t : null };
}

/** One row of tips.csv. */
export interface TipRow { step: number; crack: number; tip: number; x_mm: number; y_mm: number; KI_MPa_sqrtm: number | null; KII_MPa_sqrtm: number | null; kink_deg: number | null }

/**
 * Rows of tips.csv: cracks numbered from 1 in the order of the case's slits and then of the
 * cracks grown, tip 1 at a crack's start and 2 at its far end. K in MPa√m at traction-free
 * tips; at the end of a cohesive crack the faces carry tractions and no K is written.
 */
export function tipRows(step: number, tips: TipMeasure[], cracks: CrackLine[]): TipRow[] {
  return tips.map((t) => {
    const free = cracks[t.crack].kind === 'notch';
    return {
      step, crack: t.crack + 1, tip: t.end + 1, x_mm: t.x, y_mm: t.y,
      KI_MPa_sqrtm: free && t.KI !== null ? t.KI * PER_SQRT_M : null,
      KII_MPa_sqrtm: free && t.KII !== null ? t.KII * PER_SQRT_M : null,
      kink_deg: t.kink === null ? null : t.kink * 180 / Math.PI,
    };
  });
}
