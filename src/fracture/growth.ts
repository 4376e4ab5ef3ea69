// Growth: the cracks and tips before loading (notch slits, start points, pre-cut cracks),
// a crack's start anywhere in the material, and the segments each ready tip lays. These
// change the work mesh and the crack record; the caller rebuilds the equations after.
import type { CaseModel } from '../case/model.js';
import type { PolyMesh } from '../mesh/polymesh.js';
import type { CohesiveParams } from '../cohesive/interface.js';
import { boundaryVertices } from '../solver/driven.js';
import { WorkMesh } from './workmesh.js';
import { cutRay, twinAlong, defaultCut } from './cut.js';
import { refineAround, refineAlong, coarsenAway } from './adapt.js';
import { segmentHitsBoundary, domainExtent, type Domain } from '../geometry/domain.js';
import { weakestDirection } from './criterion.js';
import {
  tipStress, growthDirection, hoopDirection, faceKink, limitTurn, MAX_TURN,
  readiness, endPairLoad, frontDistance, type FaceLoad,
} from './criterion.js';
import type { Equations } from './equations.js';
import { segDist2 } from '../geometry/rings.js';
import type { CrackState, Tip } from './state.js';
import { measureTips, type TipMeasure } from './tips.js';
import { tipFactors2 } from './sif2.js';

/** What growth reads and changes: the case, the mesh, the crack record, and the equations of the current state. */
export interface GrowthRoom {
  c: CaseModel; wm: WorkMesh; s: CrackState; coh: CohesiveParams; eq: Equations; D: Float64Array;
  /** ft at a point where the case has a random strength field (material.strengthField), else null. */
  ftAt: ((x: number, y: number) => number) | null;
  /** Boundary vertices where supports and loads touch the specimen (stable ids): a crack that reaches a loaded face ends on one of them. */
  rig?: readonly number[];
  /** Rings of the domain's holes (flat xy), for cracks that reach a hole and start again on its far side. */
  holes: readonly Float64Array[];
  /** The specimen's domain: where the line ahead of a tip leaves it. */
  domain: Domain;
  /** Called before growth first changes the tips, cracks or mesh (the loop takes its undo snapshot only then). */
  beforeChange?: () => void;
}

/** Cell stresses, areas and centroids of the last evaluated state, for the tip checks. */
export function fields(g: GrowthRoom): { m: PolyMesh; stress: Float64Array; areas: Float64Array; cent: Float64Array } {
  const m = g.eq.sys.mesh;
  const stress = g.eq.stresses(g.D).cell;
  const { areas, cent } = g.eq.cellGeometry(g.wm);
  return { m, stress, areas, cent };
}

/**
 * Cuts keep to their line: snapping to a vertex within 20 % of an edge or along an edge within
 * 7° turned a slit's end, and grown segments, by several degrees, differently at the two tips
 * of a point-symmetric problem and from one mesh seed to the next.
 */
export const SLIT_CUT = { snapFraction: 0.02, snapAngle: 0.02 };
const GROWTH_CUT = { snapFraction: 0.1, snapAngle: 0.03 };

/** Width-0 notches are cut into the mesh as traction-free cracks. */
export function insertNotchSlits(c: CaseModel, wm: WorkMesh, s: CrackState, initial: PolyMesh): void {
  const on = boundaryVertices(initial);
  for (const n of c.geometry.notches) {
    if (n.width > 0) continue;
    const a = nearestVertex(initial, n.from[0], n.from[1]);
    const L = Math.hypot(n.to[0] - n.from[0], n.to[1] - n.from[1]);
    const dx = (n.to[0] - n.from[0]) / L, dy = (n.to[1] - n.from[1]) / L;
    const cut = cutRay(wm, a, dx, dy, L, SLIT_CUT);
    const startOnBoundary = on[a] === 1;
    const tw = twinAlong(wm, cut.path, null, startOnBoundary, cut.end === 'boundary');
    s.cracks.push({ kind: 'notch', path: cut.path, twins: tw.map((t) => t[1]) });
  }
}

/** A cohesive crack cut in before loading, from a boundary point straight to another. */
export function cohesiveCut(wm: WorkMesh, s: CrackState, from: [number, number], to: [number, number]): void {
  const a = nearestLive(wm, from[0], from[1]);
  const L = Math.hypot(to[0] - from[0], to[1] - from[1]);
  const cut = cutRay(wm, a, (to[0] - from[0]) / L, (to[1] - from[1]) / L, L, { ...defaultCut, snapFraction: 0.1 });
  const tw = twinAlong(wm, cut.path, null, true, cut.end === 'boundary');
  s.cracks.push({ kind: 'cohesive', path: cut.path, twins: tw.map((t) => t[1]) });
}

/** The tips the case starts from (notch tips or given points), with the mesh refined around each. */
export function placeTips(c: CaseModel, wm: WorkMesh, s: CrackState): void {
  const crack = c.crack, tips = s.tips;
  if (!crack) return;
  if (crack.start === 'notch-tips') {
    let slit = 0;
    for (const n of c.geometry.notches) {
      const L = Math.hypot(n.to[0] - n.from[0], n.to[1] - n.from[1]);
      const dx = (n.to[0] - n.from[0]) / L, dy = (n.to[1] - n.from[1]) / L;
      if (n.width > 0) {
        tips.push({ crack: -1, v: nearestLive(wm, n.to[0], n.to[1]), dx, dy, back: null, active: true });
      } else {
        const k = s.cracks.filter((q) => q.kind === 'notch')[slit++];
        const ki = s.cracks.indexOf(k);
        const end = k.path[k.path.length - 1];
        if (k.twins[k.twins.length - 1] < 0) {
          const prev = k.path[k.path.length - 2];
          tips.push({ crack: -1, v: end, dx, dy, back: [wm.x[prev], wm.y[prev]], active: true, slit: ki });
        }
        if (k.twins[0] < 0) {
          const next = k.path[1];
          tips.push({ crack: -1, v: k.path[0], dx: -dx, dy: -dy, back: [wm.x[next], wm.y[next]], active: true, slit: ki });
        }
      }
    }
  } else if (Array.isArray(crack.start)) {
    for (const p of crack.start) tips.push({ crack: -1, v: nearestLive(wm, p[0], p[1]), dx: 0, dy: 0, back: null, active: true });
  }
  for (const t of tips) refineAround(wm, wm.x[t.v], wm.y[t.v], c.mesh.refineRadius, c.mesh.tipSize);
}

/** How close tip t is to laying its next segment (≥ 1: lay it), from the averaged stress s1 ahead of it and its faces' trial state. */
export function tipReadiness(g: GrowthRoom, t: Tip, s1: number): number {
  const crack = g.c.crack!, insertAt = crack.insertAt ?? 1;
  let faces = null;
  if (t.crack >= 0) {
    const k = g.s.cracks[t.crack];
    const f = { path: k.path, twins: k.twins, fromEnd: k.path[k.path.length - 1] === t.v };
    const l: FaceLoad = { pairOf: g.eq.pairOf, kap: g.eq.kapTrial, penalty: g.coh.penalty, ft: g.coh.law.ft, pairFt: g.eq.pairFt ?? undefined };
    faces = { frontDistance: frontDistance(f, l, g.wm.x, g.wm.y, insertAt), endPairLoad: endPairLoad(f, l) };
  }
  return readiness({ s1, ft: g.ftAt ? g.ftAt(g.wm.x[t.v], g.wm.y[t.v]) : g.c.material.ft, insertAt, growthStep: crack.growthStep, faces });
}

/** Largest readiness among the active tips with faces (0 without): more than a little over 1 and the step was too long. */
export function tipOvershoot(g: GrowthRoom): number {
  const crack = g.c.crack;
  if (!crack) return 0;
  const starts = startsPossible(g);
  if (!starts && !g.s.tips.some((t) => t.active)) return 0;
  const f = fields(g), { m, stress, areas, cent } = f;
  // a crack that starts is laid intact like the next segment of a tip: not far above its level
  let worst = starts ? Math.min(10, startCandidate(g, f).readiness) : 0;
  for (const t of g.s.tips) {
    // a tip without faces lays its first segment at any load
    if (!t.active || t.crack < 0) continue;
    const ts = tipStress(m, stress, cent, areas, g.wm.x[t.v], g.wm.y[t.v], t.dx, t.dy, crack.averagingRadius, 2);
    // past its peak the end pair's ratio grows fast; any value over the limit only cuts the step
    worst = Math.max(worst, Math.min(10, tipReadiness(g, t, ts.s1)));
  }
  return worst;
}

/**
 * Where new cracks may start. With `crack.start: anywhere`: anywhere in the material where the
 * stress reaches ft away from the cracks and the rig while no crack is growing (the first
 * crack, and further cracks once every tip has joined a hole, another crack, the outline or a
 * point of the rig, like those a split disc shows beside its bearing strips); while cracks grow
 * (`busy`: judged once they have caught up with the control level), only outside their reach
 * (`shadows`); never while a crack is held a tip cell short of a strip.
 * Whatever the start: on the rim of a hole that a crack has reached, where the stress there
 * reaches the strength (the far side of the hole, so a crack passes through it as in the lab).
 */
function startsPossible(g: GrowthRoom, busy = false): boolean {
  return freeStarts(g, busy) || g.s.tips.some((t) => t.end === 'hole');
}

/**
 * `crack.start: anywhere`, no active tip unless `busy`, and no crack held a tip cell short of a
 * strip: that leaves its halves clamped by the strips, which load them on, so a new crack
 * beside it would be the strips' doing, not the specimen's. A crack run through to a rig point
 * has split the specimen; what the pieces then carry is theirs.
 */
function freeStarts(g: GrowthRoom, busy = false): boolean {
  return g.c.crack!.start === 'anywhere' && !g.s.tips.some((t) => (t.active && !busy) || t.end === 'contact');
}

/**
 * Where no crack starts while others grow (`crack.start: anywhere`), as polylines with the
 * distance each keeps clear: around every crack grown from a tip (both halves of an interior
 * start together), within its length of it, and along the line ahead of each active tip, the
 * half-width of its refined zone out to the outline (that tip's to cut). A crack relieves the
 * stress around it over a distance of the order of its length (parallel cracks in a stressed
 * layer space at about their depth: common practice), and the faces of a growing one have yet
 * to soften, so the stress next to it does not show the relief it is about to give. Null while
 * a growing crack has no face pair past its peak (a start point included): it relieves nothing
 * yet, so nowhere can the stress be judged. Empty when no tip is active.
 */
function shadows(g: GrowthRoom, clear: number): { xy: number[]; r: number }[] | null {
  const { wm, s } = g, out: { xy: number[]; r: number }[] = [];
  if (!s.tips.some((t) => t.active)) return out;
  const l: FaceLoad = { pairOf: g.eq.pairOf, kap: g.eq.kapTrial, penalty: g.coh.penalty, ft: g.coh.law.ft, pairFt: g.eq.pairFt ?? undefined };
  const done = new Set<number>();
  for (const t of s.tips) {
    if (t.active && t.crack < 0) return null;
    if (t.crack < 0 || done.has(t.crack)) continue;
    const p = t.partner !== undefined ? s.tips[t.partner] : null;
    const halves = p && p.crack >= 0 ? [t.crack, p.crack] : [t.crack];
    let L = 0, soft = false;
    const xy: number[] = [];
    for (const [j, ki] of halves.entries()) {
      done.add(ki);
      const k = s.cracks[ki], P = j === 0 && halves.length > 1 ? [...k.path].reverse() : k.path;
      soft ||= frontDistance({ path: k.path, twins: k.twins, fromEnd: true }, l, wm.x, wm.y, 1) < Infinity;
      // the halves share the start vertex: the second one's path continues the first one's reversed
      for (let i = j === 0 ? 0 : 1; i < P.length; i++) {
        xy.push(wm.x[P[i]], wm.y[P[i]]);
        const n = xy.length;
        if (n > 2) L += Math.hypot(xy[n - 2] - xy[n - 4], xy[n - 1] - xy[n - 3]);
      }
    }
    const active = (p ? [t, p] : [t]).filter((q) => q.active);
    if (active.length > 0 && !soft) return null;
    out.push({ xy, r: Math.max(clear, L) });
    for (const q of active) out.push({ xy: ahead(g, q), r: Math.max(clear, g.c.mesh.refineRadius) });
  }
  return out;
}

/** (x, y) lies within r of the polyline (flat xy). */
function near(x: number, y: number, xy: readonly number[], r: number): boolean {
  if (xy.length === 2) return Math.hypot(x - xy[0], y - xy[1]) < r;
  for (let i = 0; i + 3 < xy.length; i += 2) if (segDist2(x, y, xy[i], xy[i + 1], xy[i + 2], xy[i + 3]) < r * r) return true;
  return false;
}

/**
 * The cell where a crack would start next and how close it is (≥ 1: start): the largest major
 * principal stress over the start level among the cells allowed (away from supports, loads,
 * cracks and tips; on the rim of a reached hole unless `anywhere` applies). In the bulk a crack
 * starts at ft. On a reached hole's rim, like a tip's next segment, it is laid intact at
 * insertAt·ft, so its faces take up load gradually.
 */
function startCandidate(g: GrowthRoom, f: ReturnType<typeof fields>, busy = false): { cell: number; readiness: number } {
  const { c, wm, s } = g, crack = c.crack!, { m, stress, cent } = f;
  const free = freeStarts(g, busy);
  const reached = new Set<number>();
  for (const t of s.tips) if (t.end === 'hole' && t.hole !== undefined) reached.add(t.hole);
  const rims = [...reached].map((h) => g.holes[h]);
  const keep = Math.max(2 * c.mesh.tipSize, crack.averagingRadius);
  const away: { x: number; y: number; r: number }[] = [];
  // a support or load along an edge keeps starts out of a band beside that edge (its ends are
  // where the stress concentrates), not out of a disc as wide as the edge is long
  const band: { xy: number[]; r: number }[] = [];
  for (const q of [...c.supports, ...c.loads]) {
    if (q.at) away.push({ x: q.at[0], y: q.at[1], r: q.width / 2 + keep });
    else if (q.along) band.push({ xy: [...q.along[0], ...q.along[1]], r: q.width / 2 + keep });
  }
  // the cracks and tips there are: the stress next to them is theirs to relieve; ahead of a
  // growing tip the whole refined zone is its process zone's
  const clear = keep + 2 * c.mesh.tipSize;
  for (const k of s.cracks) for (const v of k.path) away.push({ x: wm.x[v], y: wm.y[v], r: clear });
  for (const t of s.tips) if (t.active) away.push({ x: wm.x[t.v], y: wm.y[t.v], r: Math.max(clear, c.mesh.refineRadius) });
  const shade = free ? shadows(g, clear) : [];
  // each cell against its own strength where a field varies it, else the mean
  const ftMean = c.material.ft, insertAt = crack.insertAt ?? 1, tol = 1e-3 * c.mesh.tipSize;
  const cs = m.cellStart, cv = m.cellVerts, xy = m.xy;
  let best = -1, bestR = 0;
  for (let k = 0; k < cs.length - 1; k++) {
    const sxx = stress[3 * k], syy = stress[3 * k + 1], sxy = stress[3 * k + 2];
    const s1 = (sxx + syy) / 2 + Math.hypot((sxx - syy) / 2, sxy);
    const x = cent[2 * k], y = cent[2 * k + 1];
    const ft = g.ftAt ? g.ftAt(x, y) : ftMean, rimFt = insertAt * ft;
    if (s1 <= bestR * rimFt || s1 < 0.5 * rimFt) continue;
    if (away.some((a) => Math.hypot(x - a.x, y - a.y) < a.r)) continue;
    if (band.some((e) => near(x, y, e.xy, e.r))) continue;
    let onRim = false;
    for (let j = cs[k]; j < cs[k + 1] && !onRim && rims.length > 0; j++) onRim = ringAt(rims, xy[2 * cv[j]], xy[2 * cv[j] + 1], tol) >= 0;
    if (!onRim && (!free || shade === null || shade.some((q) => near(x, y, q.xy, q.r)))) continue;
    const r = s1 / (onRim ? rimFt : ft);
    if (r > bestR) { bestR = r; best = k; }
  }
  return { cell: best, readiness: bestR };
}

/**
 * Start a crack where startCandidate says (see startsPossible): at the boundary vertex of that
 * cell nearest its centre when it touches the outline or a hole (running into the material),
 * else at the vertex nearest to it with two tips running apart; perpendicular to the major
 * principal stress. Returns 1 when a crack started (the mesh is refined around it). `busy`:
 * also while cracks grow, outside their reach (startsPossible); `state`: the fields of the
 * current state when the caller has them.
 */
export function initiate(g: GrowthRoom, busy = false, state?: ReturnType<typeof fields>): number {
  const { c, wm } = g, crack = c.crack!, tips = g.s.tips;
  if (!startsPossible(g, busy)) return 0;
  const f = state ?? fields(g), { m, stress, cent, areas } = f;
  const { cell: best, readiness: r } = startCandidate(g, f, busy);
  if (best < 0 || r < 1) return 0;
  const x = cent[2 * best], y = cent[2 * best + 1];
  let v = -1, bd = Infinity;
  const vo = g.eq.compact.vertexOf;
  for (let j = m.cellStart[best]; j < m.cellStart[best + 1]; j++) {
    const w = vo[m.cellVerts[j]], d = Math.hypot(wm.x[w] - x, wm.y[w] - y);
    if (d < bd && onOutline(wm, w)) { bd = d; v = w; }
  }
  if (v < 0) v = nearestLive(wm, x, y);
  let ts = tipStress(m, stress, cent, areas, wm.x[v], wm.y[v], 0, 0, crack.averagingRadius, 0);
  g.beforeChange?.();
  if (ts.weight === 0) {
    // the start cell is wider than the averaging disc and no cell centre lies within it of the
    // start vertex, so the stress there says nothing yet: refine around the cell and judge the
    // start again on the finer cells (started with no stress, the crack was sent along the
    // outline and stopped at once; judged again, on a tension strip whose 10 mm cells spanned
    // the ligament beside a hole, it started on the hole's rim)
    if (refineAround(wm, x, y, c.mesh.refineRadius, c.mesh.tipSize) > 0) return 1;
    ts = tipStress(m, stress, cent, areas, wm.x[v], wm.y[v], 0, 0, 1.5 * Math.hypot(wm.x[v] - x, wm.y[v] - y), 0);
  }
  const [dx, dy] = growthDirection(ts, 1, 0);
  if (onOutline(wm, v)) {
    // from the boundary the crack runs into the material
    const sgn = dx * (x - wm.x[v]) + dy * (y - wm.y[v]) >= 0 ? 1 : -1;
    tips.push({ crack: -1, v, dx: sgn * dx, dy: sgn * dy, back: null, active: true });
  } else {
    const a = tips.length;
    tips.push({ crack: -1, v, dx, dy, back: null, active: true, partner: a + 1 });
    tips.push({ crack: -1, v, dx: -dx, dy: -dy, back: null, active: true, partner: a });
  }
  refineAround(wm, wm.x[v], wm.y[v], c.mesh.refineRadius, c.mesh.tipSize);
  return 1;
}

/** Centre (mean of the ring's points) and largest distance from it to a point of the ring. */
function ringCircle(r: Float64Array): [number, number, number] {
  const n = r.length >> 1;
  let cx = 0, cy = 0, R = 0;
  for (let i = 0; i < n; i++) { cx += r[2 * i] / n; cy += r[2 * i + 1] / n; }
  for (let i = 0; i < n; i++) R = Math.max(R, Math.hypot(r[2 * i] - cx, r[2 * i + 1] - cy));
  return [cx, cy, R];
}

/** Index of the ring (flat xy, closed) passing within tol of (x, y), or −1. */
function ringAt(rings: readonly Float64Array[], x: number, y: number, tol: number): number {
  const t2 = tol * tol;
  for (let h = 0; h < rings.length; h++) {
    const r = rings[h], n = r.length >> 1;
    for (let i = 0; i < n; i++) {
      const j = (i + 1) % n;
      if (segDist2(x, y, r[2 * i], r[2 * i + 1], r[2 * j], r[2 * j + 1]) <= t2) return h;
    }
  }
  return -1;
}

/** Check every active tip (or start a crack); grow those that meet the criterion. Returns how many grew (the mesh changed if > 0). */
export function grow(g: GrowthRoom): number {
  const { c, wm, s } = g, crack = c.crack!;
  if (initiate(g) > 0) return 1;
  const f = fields(g), { m, stress, areas, cent } = f;
  // K at the slit tips of the state before any cut of this round (the mesh changes as tips grow)
  let measured: TipMeasure[] | null = null;
  let grown = 0;
  for (const t of s.tips) {
    if (!t.active) continue;
    const tx = wm.x[t.v], ty = wm.y[t.v];
    const ts = tipStress(m, stress, cent, areas, tx, ty, t.dx, t.dy, crack.averagingRadius, 2);
    if (tipReadiness(g, t, ts.s1) < 1) continue;
    // The stress at a cohesive tip is nearly isotropic (on faces carrying a uniform traction
    // the stress along the crack equals the traction across it), so its principal axes say
    // little about the path. The mode mixity does: sliding over opening of the faces behind
    // the tip gives K_II/K_I, and the kink follows the maximum tangential stress. A tip with
    // no faces yet (a blunt notch) follows the largest hoop stress around it; a fresh start
    // point with no direction grows perpendicular to the major principal stress.
    // Out of a sharp slit the first segment follows the maximum tangential stress criterion
    // with K_I and K_II from the interaction integral.
    let slitDir: [number, number] | null = null;
    if (t.crack < 0 && t.slit !== undefined && t.slit >= 0) {
      measured ??= tipMeasures(g);
      const k = measured.find((q) => q.v === t.v);
      if (k && k.kink !== null && k.KI !== null && k.KI > 0) slitDir = [Math.cos(k.kink), Math.sin(k.kink)];
    }
    const faces = t.crack >= 0 ? t.crack : t.slit !== undefined && t.slit >= 0 ? t.slit : -1;
    const fk = faces >= 0 ? s.cracks[faces] : null;
    let [gx, gy] = slitDir ?? (fk ? faceKink(fk.path, fk.twins, fk.kind === 'cohesive' ? g.coh.beta : 1, wm.x, wm.y, s.uw, t, crack.averagingRadius) : null)
      ?? (t.dx !== 0 || t.dy !== 0
        ? hoopDirection(m, stress, cent, areas, tx, ty, t.dx, t.dy, crack.averagingRadius)
        : growthDirection(ts, t.dx, t.dy));
    // in a random strength field the crack leans toward the weaker material just ahead
    if (g.ftAt) [gx, gy] = weakestDirection(g.ftAt, tx, ty, gx, gy, crack.growthStep, MAX_TURN);
    // after the first segment a crack turns smoothly: at most MAX_TURN per growth step
    if (t.crack >= 0) [gx, gy] = limitTurn(t.dx, t.dy, gx, gy, MAX_TURN);
    // beside another crack's face it turns toward that face and joins it
    const toFace = t.crack >= 0 ? faceAim(g, t, gx, gy) : null;
    if (toFace) [gx, gy] = toFace;
    g.beforeChange?.();
    s.growthLog.push({ tip: s.tips.indexOf(t), x: tx, y: ty, dx: gx, dy: gy, first: t.crack < 0, sxx: ts.sxx, syy: ts.syy, sxy: ts.sxy });
    // Near where the machine or a support touches the specimen the crack runs through to that
    // face in one cut, ending on a point of the rig (twinned with it, so both halves bear on
    // it); the compressed zone in front of it is ligament like the rest, its faces in contact.
    // Passing beside the rig, it stops a tip cell short of it.
    const room = contactRoom(c, tx, ty);
    let len = crack.growthStep, atRig = false;
    if (room < crack.growthStep + c.mesh.tipSize) {
      const aim = rigAim(c, wm, g.rig ?? [], tx, ty, gx, gy, crack.growthStep + 2 * c.mesh.tipSize + maxWidth(c), c.mesh.tipSize);
      if (aim >= 0) {
        atRig = true;
        len = Math.hypot(wm.x[aim] - tx, wm.y[aim] - ty);
        gx = (wm.x[aim] - tx) / len; gy = (wm.y[aim] - ty) / len;
      } else {
        len = Math.min(crack.growthStep, room - c.mesh.tipSize);
        if (len < 0.5 * c.mesh.tipSize) { t.active = false; t.end = 'contact'; continue; }
      }
    }
    const cut = cutRay(wm, t.v, gx, gy, len, GROWTH_CUT);
    if (cut.path.length < 2) { t.active = false; continue; }
    if (t.crack < 0) { s.cracks.push({ kind: 'cohesive', path: [t.v], twins: [-1] }); t.crack = s.cracks.length - 1; }
    const k = s.cracks[t.crack];
    // a crack that reaches the outline, a hole or another crack's face opens into it: its
    // end is twinned like the mouth of a notch and the tip is gone
    const through = cut.end !== 'length';
    // an interior start stays one vertex until its partner tip has cut the other way
    const partner = t.partner !== undefined ? s.tips[t.partner] : null;
    const interiorStart = t.back === null && partner !== null && partner.crack < 0;
    const tw = twinAlong(wm, cut.path, t.back, !interiorStart, through);
    if (interiorStart) partner!.back = [wm.x[cut.path[1]], wm.y[cut.path[1]]];
    k.twins[k.twins.length - 1] = tw[0][1];
    // the second tip of an interior start twins the start vertex for both cracks: the first
    // one, running the other way, has the copy on its left, so it takes the copy as its path
    // vertex (the plus face) and the original as its twin
    if (partner && partner.crack >= 0 && k.path.length === 1 && tw[0][1] >= 0) {
      const q = s.cracks[partner.crack];
      if (q.path[0] === k.path[0] && q.twins[0] < 0) { q.twins[0] = q.path[0]; q.path[0] = tw[0][1]; }
    }
    for (let i = 1; i < cut.path.length; i++) { k.path.push(cut.path[i]); k.twins.push(tw[i][1]); }
    if (cut.end === 'crack') joinFace(g, t.crack, cut.path[cut.path.length - 1], tw[tw.length - 1][1]);
    const end = cut.path[cut.path.length - 1], prev = cut.path[cut.path.length - 2];
    t.back = [wm.x[prev], wm.y[prev]];
    const L = Math.hypot(wm.x[end] - tx, wm.y[end] - ty);
    t.dx = (wm.x[end] - tx) / L; t.dy = (wm.y[end] - ty) / L;
    t.v = end;
    if (through) {
      t.active = false;
      const h = cut.end === 'boundary' ? ringAt(g.holes, wm.x[end], wm.y[end], 1e-3 * c.mesh.tipSize) : -1;
      t.end = cut.end === 'crack' ? 'crack' : h >= 0 ? 'hole' : atRig ? 'rig' : 'outline';
      if (h >= 0) {
        t.hole = h;
        // the rim of the hole at the tip size, so that its stress is resolved where a crack may start again
        const [hx, hy, hr] = ringCircle(g.holes[h]);
        refineAround(wm, hx, hy, hr + crack.averagingRadius, c.mesh.tipSize);
      }
    } else {
      const [ax, ay, bx, by] = ahead(g, t);
      refineAlong(wm, ax, ay, bx, by, c.mesh.refineRadius, c.mesh.tipSize, undefined, rigZone(g));
      // a hole on the line ahead before loading gets its rim and far side refined now, not once
      // the crack has reached it under load (done at the first segment of a crack that started
      // under load, `crack.start: anywhere` on the hole beam, it moved 5.5 % of the work at once)
      const h = s.rows.length === 0 && (ax !== bx || ay !== by) ? ringAt(g.holes, bx, by, 1e-6 * domainExtent(g.domain)) : -1;
      if (h >= 0) refineBeyondHole(g, h, t.dx, t.dy);
    }
    grown++;
  }
  // once the growing cracks have caught up with this level, elsewhere where they relieve nothing
  if (grown === 0 && crack.start === 'anywhere' && s.tips.some((t) => t.active)) return initiate(g, true, f);
  if (grown > 0) {
    const at = s.tips.filter((t) => t.active).map((t) => ahead(g, t));
    if (c.mesh.coarsen && at.length > 0) coarsenAway(wm, at, 2 * c.mesh.refineRadius + 2 * c.mesh.size, rigZone(g));
  }
  return grown;
}

/**
 * The stretch kept at the tip size ahead of a tip: from the tip along its direction to where
 * that line leaves the specimen (both orders). A mesh change moves the strain energy of the cells it
 * touches, which no interface accounts for (the spaces before and after are not nested); laid
 * out along the whole line before loading, a straight crack meets no change on its way.
 */
function ahead(g: GrowthRoom, t: Tip): [number, number, number, number] {
  const x = g.wm.x[t.v], y = g.wm.y[t.v];
  if (t.dx === 0 && t.dy === 0) return [x, y, x, y];
  const L = 2 * domainExtent(g.domain);
  const hit = segmentHitsBoundary(g.domain, x, y, x + L * t.dx, y + L * t.dy);
  return hit ? [x, y, hit.x, hit.y] : [x, y, x + L * t.dx, y + L * t.dy];
}

/**
 * `crack.start: anywhere`, before loading: the line ahead of each notch of finite width, from its
 * root along the notch to where it leaves the specimen, goes to the tip size as a notch tip's line
 * does, and a hole on that line gets its rim zone and far side refined. A notch's root is where
 * such a crack most likely starts; refined only at that start, under load, the cells along its
 * path moved 1.9 % of the work at once on a notched beam (DEVELOPERS.md, known gaps). Returns
 * whether the mesh changed.
 */
export function refineNotchLines(g: GrowthRoom): boolean {
  const { c, wm, domain } = g;
  if (c.crack?.start !== 'anywhere') return false;
  let changed = 0;
  const L = 2 * domainExtent(domain), eps = 1e-3 * c.mesh.tipSize;
  for (const n of c.geometry.notches) {
    if (!(n.width > 0)) continue;
    const len = Math.hypot(n.to[0] - n.from[0], n.to[1] - n.from[1]), dx = (n.to[0] - n.from[0]) / len, dy = (n.to[1] - n.from[1]) / len;
    const hit = segmentHitsBoundary(domain, n.to[0] + eps * dx, n.to[1] + eps * dy, n.to[0] + L * dx, n.to[1] + L * dy);
    if (!hit) continue;
    changed += refineAlong(wm, n.to[0], n.to[1], hit.x, hit.y, c.mesh.refineRadius, c.mesh.tipSize);
    const h = ringAt(g.holes, hit.x, hit.y, 1e-6 * domainExtent(domain));
    if (h >= 0) changed += refineBeyondHole(g, h, dx, dy);
  }
  return changed > 0;
}

/**
 * A crack on its way to hole h (heading dx, dy): the rim and the ring of material within the
 * refined zone's reach of it, and the band of the hole's width plus that reach from the hole on
 * to the outline, go to the tip size before they are loaded. A crack that reaches a hole starts
 * again on the rim and runs on beyond it; refined only once that happens under load, the new
 * cells moved 1.5 % of the work on a beam with a hole on its ligament (0.16 % refined ahead).
 */
function refineBeyondHole(g: GrowthRoom, h: number, dx: number, dy: number): number {
  const { c, wm, domain } = g, [hx, hy, hr] = ringCircle(g.holes[h]);
  const reach = hr + c.mesh.refineRadius, L = 2 * domainExtent(domain);
  let n = refineAround(wm, hx, hy, reach, c.mesh.tipSize);
  const far = segmentHitsBoundary(domain, hx + (hr + 1e-3 * c.mesh.tipSize) * dx, hy + (hr + 1e-3 * c.mesh.tipSize) * dy, hx + L * dx, hy + L * dy);
  if (far) n += refineAlong(wm, hx, hy, far.x, far.y, reach, c.mesh.tipSize, undefined, rigZone(g));
  return n;
}

/**
 * Once loading has begun, the cells around the rig's points (two layers) are neither refined
 * nor merged: bearing stresses put much of the strain energy there, and remeshing them moved
 * up to half of it in one growth (refining them once the tip has come within a growth step
 * still left 4.4 % on the shear beam). Before loading they refine like the rest.
 */
function rigZone(g: GrowthRoom): ((c: number) => boolean) | undefined {
  const { wm, s, rig } = g;
  if (s.rows.length === 0 || !rig || rig.length === 0) return undefined;
  const cells = new Set<number>();
  let verts: Iterable<number> = rig;
  for (let layer = 0; layer < 2; layer++) {
    const next = new Set<number>();
    for (const v of verts) for (const c of wm.cellsOf(v)) { if (!cells.has(c)) { cells.add(c); for (const u of wm.cells[c]!) next.add(u); } }
    verts = next;
  }
  return (c) => cells.has(c);
}

/**
 * The direction of a tip that runs beside the face of another crack (null when none is near):
 * halfway between its own and the way to the nearest point of that face, when that point lies
 * within the refined zone around the tip (mesh.refineRadius), inside that crack (not at one of
 * its ends: two tips meeting head on join by their cuts), and not behind the tip. Between
 * overlapping cracks the ligament is a bridge that the tips cut across, so that passing cracks
 * hook into each other's faces (the S-shaped link of offset notches, common practice) instead
 * of running on side by side; repeated each step, the turn closes on the face.
 */
function faceAim(g: GrowthRoom, t: Tip, dx: number, dy: number): [number, number] | null {
  const { wm, s } = g, x = wm.x[t.v], y = wm.y[t.v], reach = g.c.mesh.refineRadius;
  const partner = t.partner !== undefined ? s.tips[t.partner].crack : -1;
  let best: [number, number] | null = null, bd = reach;
  s.cracks.forEach((k, ki) => {
    if (ki === t.crack || ki === t.slit || ki === partner) return;
    const P = k.path;
    let kd = Infinity, kx = 0, ky = 0, atEnd = false;
    for (let i = 0; i + 1 < P.length; i++) {
      const ax = wm.x[P[i]], ay = wm.y[P[i]], ex = wm.x[P[i + 1]] - ax, ey = wm.y[P[i + 1]] - ay, L2 = ex * ex + ey * ey;
      if (!(L2 > 0)) continue;
      const u = ((x - ax) * ex + (y - ay) * ey) / L2, uc = Math.max(0, Math.min(1, u));
      const px = ax + uc * ex - x, py = ay + uc * ey - y, d = Math.hypot(px, py);
      if (d < kd) { kd = d; kx = px; ky = py; atEnd = (i === 0 && u <= 0) || (i + 2 === P.length && u >= 1); }
    }
    // nearest at one of the crack's ends: its tip or mouth, not a face beside; and not behind
    // the tip (a little past square to it, for a face that bends away)
    if (atEnd || kd >= bd || kd === 0 || kx * dx + ky * dy < -0.25 * kd) return;
    bd = kd; best = [kx / kd, ky / kd];
  });
  if (!best) return null;
  const hx = dx + best[0], hy = dy + best[1], h = Math.hypot(hx, hy);
  return h > 0 ? [hx / h, hy / h] : null;
}

/**
 * A crack (index `own`) ended on vertex v of another crack's face and twinned it there, its copy
 * taking the cells on one side of the junction: the met crack records the join, so that the copy
 * pairs with its other face over the half segment the copy's cells border (pairGeometry) and
 * starts from the met pair's history. A junction cut into the middle of a face segment first
 * becomes a vertex of the met crack, paired with a new vertex on the other face's edge.
 */
function joinFace(g: GrowthRoom, own: number, v: number, copy: number): void {
  if (copy < 0) return;
  const { wm, s } = g;
  s.cracks.forEach((k, ki) => {
    if (ki === own || k.kind !== 'cohesive') return;
    let i = k.path.indexOf(v) >= 0 ? k.path.indexOf(v) : k.twins.indexOf(v);
    if (i < 0) i = splitFaceSegment(g, k, v);
    if (i < 0 || k.twins[i] < 0) return;
    const face = k.path[i] === v ? k.path : k.twins;
    const next = i + 1 < face.length ? (face[i + 1] >= 0 ? face[i + 1] : k.path[i + 1]) : -1;
    // the copy's cells border the segment toward the next vertex when one of them has both
    const after = next >= 0 && wm.cellsOf(copy).some((c) => adjacentIn(wm.cells[c]!, copy, next));
    (k.joins ??= []).push({ v, copy, after });
    const h = s.kappa.get(k.path[i]);
    if (h !== undefined) s.kappa.set(copy, h);
  });
}

/**
 * Vertex v was cut into the face edge between vertices i and i+1 of crack k (its parents):
 * put it into the crack there with a twin on the other face's edge, so that the two form a pair
 * (history interpolated from its neighbours). Returns its index in the crack, or −1.
 */
function splitFaceSegment(g: GrowthRoom, k: { path: number[]; twins: number[] }, v: number): number {
  const { wm, s } = g, from = wm.from[v];
  if (!from || from.v.length !== 2) return -1;
  const [pa, pb] = from.v, w = from.w[1];
  const other = (f: number[], o: number[], j: number): number => (o[j] >= 0 ? o[j] : f[j]);
  for (const [face, opp] of [[k.path, k.twins], [k.twins, k.path]] as const) {
    for (let i = 0; i + 1 < face.length; i++) {
      const a = face[i] >= 0 ? face[i] : k.path[i], b = face[i + 1] >= 0 ? face[i + 1] : k.path[i + 1];
      if (!((a === pa && b === pb) || (a === pb && b === pa))) continue;
      const a2 = other(face as number[], opp as number[], i), b2 = other(face as number[], opp as number[], i + 1);
      const cell = wm.cellsOf(a2).find((c) => adjacentIn(wm.cells[c]!, a2, b2));
      if (cell === undefined) return -1;
      const t = a === pa ? w : 1 - w;
      const q = wm.addVertex(wm.x[v], wm.y[v], [a2, b2], [1 - t, t]);
      wm.insertOnEdge(cell, a2, b2, q);
      wm.pinned[q] = 1; wm.face[q] = 1;
      const onPath = face === k.path;
      k.path.splice(i + 1, 0, onPath ? v : q);
      k.twins.splice(i + 1, 0, onPath ? q : v);
      const h0 = s.kappa.get(k.path[i]), h1 = s.kappa.get(k.path[i + 2]);
      if (h0 !== undefined || h1 !== undefined) s.kappa.set(k.path[i + 1], (1 - t) * (h0 ?? h1!) + t * (h1 ?? h0!));
      return i + 1;
    }
  }
  return -1;
}

/** a and b follow each other in the closed vertex list vs. */
function adjacentIn(vs: readonly number[], a: number, b: number): boolean {
  const n = vs.length, i = vs.indexOf(a);
  return i >= 0 && (vs[(i + 1) % n] === b || vs[(i + n - 1) % n] === b);
}

/** K_I, K_II and the MTS direction at every slit and crack end of the last evaluated state. */
export function tipMeasures(g: GrowthRoom, withK?: (crack: number) => boolean): TipMeasure[] {
  const el = { E: g.c.material.E, nu: g.c.material.nu, model: g.c.model, D: g.D }, cp = g.eq.compact;
  // order 2: the interaction integral on each cell's projection (vertex, midpoint and mean values)
  const field = g.eq.projectedField();
  return measureTips(g.wm, g.s.cracks, cp, g.eq.work.u, el, g.c, withK, undefined,
    field ? (tip, R, work) => tipFactors2(cp.mesh, field, el, tip, R, work) : undefined);
}

/**
 * K and directions at every tip for tips.csv: at a slit the MTS kink of its K; at the end of a
 * cohesive crack the direction the growth criterion takes there (null once the tip has stopped).
 */
export function tipDirections(g: GrowthRoom): TipMeasure[] {
  // K only at traction-free tips (written to tips.csv); a cohesive tip needs its direction alone
  const out = tipMeasures(g, (k) => g.s.cracks[k].kind !== 'cohesive'), { s, wm } = g;
  for (const m of out) {
    const k = s.cracks[m.crack];
    if (k.kind !== 'cohesive') continue;
    const t = s.tips.find((q) => q.active && q.crack === m.crack && q.v === m.v);
    if (!t) { m.kink = null; continue; }
    const [fx, fy] = faceKink(k.path, k.twins, g.coh.beta, wm.x, wm.y, s.uw, t, g.c.crack?.averagingRadius ?? 0) ?? [t.dx, t.dy];
    const [gx, gy] = limitTurn(t.dx, t.dy, fx, fy, MAX_TURN);
    m.kink = Math.atan2(gy, gx);
  }
  return out;
}

/** True once a crack has run from boundary to boundary (its last tip left the material; a hole it joined does not count). */
export function separated(s: CrackState): boolean {
  return s.tips.some((t) => !t.active && t.end !== 'hole' && t.crack >= 0 && s.cracks[t.crack].twins.at(-1)! >= 0);
}

/** Distance from (x, y) to the nearest load or support (a point, a bearing strip or a segment). */
function contactRoom(c: CaseModel, x: number, y: number): number {
  let room = Infinity;
  for (const q of [...c.supports, ...c.loads]) {
    const [p0, p1] = q.along ?? [q.at!, q.at!];
    const ex = p1[0] - p0[0], ey = p1[1] - p0[1], L2 = ex * ex + ey * ey;
    const s = L2 > 0 ? Math.max(0, Math.min(1, ((x - p0[0]) * ex + (y - p0[1]) * ey) / L2)) : 0;
    room = Math.min(room, Math.hypot(x - p0[0] - s * ex, y - p0[1] - s * ey) - q.width / 2);
  }
  return room;
}

/** Widest support or load strip (mm). */
const maxWidth = (c: CaseModel): number => Math.max(0, ...[...c.supports, ...c.loads].map((q) => q.width));

/**
 * The rig vertex a crack from (x, y) along (dx, dy) ends on (−1 when none): the centre of a
 * load or support within reach and within 45° of the direction (the line of the load; near a
 * loaded face the direction read from the stress is dominated by the contact field), else the
 * rig vertex ahead, within reach, nearest to the ray's line and within `side` of it.
 */
function rigAim(c: CaseModel, wm: WorkMesh, rig: readonly number[], x: number, y: number, dx: number, dy: number, reach: number, side: number): number {
  let best = -1, bestCos = Math.SQRT1_2;
  for (const q of [...c.supports, ...c.loads]) {
    if (!q.at) continue;
    let v = -1, dv = Infinity;
    for (const r of rig) {
      const d = Math.hypot(wm.x[r] - q.at[0], wm.y[r] - q.at[1]);
      if (wm.cellsOf(r).length > 0 && d < dv) { dv = d; v = r; }
    }
    if (v < 0 || dv > side) continue;
    const rx = wm.x[v] - x, ry = wm.y[v] - y, L = Math.hypot(rx, ry), cos = (rx * dx + ry * dy) / L;
    if (L > 0 && L <= reach && cos > bestCos) { best = v; bestCos = cos; }
  }
  if (best >= 0) return best;
  let bestOff = side;
  for (const v of rig) {
    if (wm.cellsOf(v).length === 0) continue;
    const rx = wm.x[v] - x, ry = wm.y[v] - y, along = rx * dx + ry * dy, off = Math.abs(rx * dy - ry * dx);
    if (along <= 0 || along > reach || off > along) continue;
    if (off < bestOff || (off === bestOff && best >= 0 && along < Math.hypot(wm.x[best] - x, wm.y[best] - y))) { best = v; bestOff = off; }
  }
  return best;
}

/** Vertex v lies on the outline (an edge of it has one cell only). */
function onOutline(wm: WorkMesh, v: number): boolean {
  for (const c of wm.cellsOf(v)) {
    const vs = wm.cells[c]!, n = vs.length, k = vs.indexOf(v);
    if (wm.neighbourAcross(c, v, vs[(k + 1) % n]) < 0 || wm.neighbourAcross(c, vs[(k + n - 1) % n], v) < 0) return true;
  }
  return false;
}

/** The vertex with cells nearest to (x, y). */
export function nearestLive(wm: WorkMesh, x: number, y: number): number {
  let best = -1, bd = Infinity;
  for (let v = 0; v < wm.vertexCount; v++) {
    if (wm.cellsOf(v).length === 0) continue;
    const d = Math.hypot(wm.x[v] - x, wm.y[v] - y);
    if (d < bd) { bd = d; best = v; }
  }
  return best;
}

export function nearestVertex(m: PolyMesh, x: number, y: number): number {
  let best = 0, bd = Infinity;
  for (let v = 0; v < m.xy.length >> 1; v++) { const d = Math.hypot(m.xy[2 * v] - x, m.xy[2 * v + 1] - y); if (d < bd) { bd = d; best = v; } }
  return best;
}
