// Checks of a filled case that need no mesh: value ranges, a sound outline, holes and
// notches inside it, supports, loads and gauge on the boundary, no rigid-body motion.
import { InputError } from '../errors.js';
import { dotted, fieldKey, inRange, mustBe, specOf } from './fields.js';
import { describeValue, fmtNum, fmtPoint } from './messages.js';
import type { CaseModel, Hole, Notch, Vec2 } from './model.js';
import {
  bbox, dist, edgeDist, inPolygon, nearestOnSegment, segDist, signedArea,
} from './shapes.js';
import { BoxGrid, RingIndex, ringsTouch, selfTouchFast } from './boxgrid.js';

/** Test rigs: a strip may follow a curved or polygonal boundary that turns by at most this much under it (rad). */
const MAX_STRIP_TURN = Math.PI / 4;

/** Largest mesh the checks let through (estimated polygons); beyond it a run would not finish. */
export const MAX_POLYGONS = 2_000_000;

type Path = (string | number)[];

function fail(path: Path, found: string, by?: unknown): never {
  throw new InputError(`${name(path)} ${mustBe(fieldKey(path), by)} (${found})`);
}

const name = (path: Path): string => dotted(path);

function num(v: unknown, path: Path, by?: unknown): void {
  const r = specOf(fieldKey(path)).range;
  if (typeof v !== 'number' || (r && !inRange(v, r))) fail(path, `found ${describeValue(v)}`, by);
}

function checkNumbers(c: CaseModel): void {
  num(c.thickness, ['thickness']);
  const m = c.material;
  num(m.E, ['material', 'E']); num(m.nu, ['material', 'nu']); num(m.ft, ['material', 'ft']);
  num(m.GF, ['material', 'GF']); num(m.shearWeight, ['material', 'shearWeight']);
  if (m.strengthField) for (const k of ['cov', 'correlationLength', 'seed', 'pointsPerLength'] as const) num(m.strengthField[k], ['material', 'strengthField', k]);
  c.geometry.holes.forEach((h, i) => { if (h.kind === 'circle') num(h.radius, ['geometry', 'holes', i, 'circle', 'radius']); });
  c.geometry.notches.forEach((n, i) => num(n.width, ['geometry', 'notches', i, 'width']));
  c.supports.forEach((s, i) => num(s.width, ['supports', i, 'width']));
  c.loads.forEach((l, i) => num(l.width, ['loads', i, 'width']));
  num(c.control.target, ['control', 'target'], c.control.by);
  num(c.control.increments, ['control', 'increments']);
  num(c.control.stopAtLoadFraction, ['control', 'stopAtLoadFraction']);
  if (c.crack) {
    num(c.crack.growthStep, ['crack', 'growthStep']);
    num(c.crack.averagingRadius, ['crack', 'averagingRadius']);
    num(c.crack.insertAt, ['crack', 'insertAt']);
  }
  if (m.KIc !== undefined) num(m.KIc, ['material', 'KIc']);
  if (c.crack?.model === 'lefm' && m.KIc === undefined) fail(['material', 'KIc'], 'found none; crack.model lefm grows a crack where K reaches KIc');
  if (c.crack?.model === 'lefm' && c.geometry.notches.length === 0) {
    throw new InputError('crack.model lefm needs a notch in geometry.notches (a sharp slit of width 0 mm, or a notch of width > 0 mm from whose root a short slit is started), where K is defined at a crack tip (found none)');
  }
  const g = c.mesh;
  num(g.size, ['mesh', 'size']); num(g.tipSize, ['mesh', 'tipSize']); num(g.refineRadius, ['mesh', 'refineRadius']);
  num(g.seed, ['mesh', 'seed']); num(g.lloyd, ['mesh', 'lloyd']);
  if (g.tipSize > g.size) fail(['mesh', 'tipSize'], `found ${fmtNum(g.tipSize)}, mesh.size is ${fmtNum(g.size)}`);
  // order 2: elastic runs (fracture/elastic2.ts) and cohesive growth (the loop's equations on the node mesh); the brittle mode is of order 1
  if (g.order === 2 && c.crack?.model === 'lefm') {
    throw new InputError('mesh.order must be 1 with crack.model lefm: the brittle mode does not yet support second-order elements (found 2)');
  }
  num(c.output.every, ['output', 'every']); num(c.output.pngWidth, ['output', 'pngWidth']);
}

/** The specimen as the checks see it: outline, holes and notch cuts, with a length tolerance. */
class Specimen {
  readonly tol: number;
  /** The outline's edges, and the holes' boxes, in grids: each question about a point looks only nearby. */
  readonly ring: RingIndex;
  readonly holeGrid: BoxGrid;
  private segs: [Vec2, Vec2][] | null = null;
  constructor(readonly outline: Vec2[], readonly holes: Hole[], readonly notches: Notch[]) {
    const b = bbox(outline);
    this.tol = 1e-6 * Math.hypot(b.x1 - b.x0, b.y1 - b.y0);
    this.ring = new RingIndex(outline);
    const hb = new Float64Array(4 * holes.length);
    holes.forEach((h, i) => {
      const r = h.kind === 'circle' ? { x0: h.center[0] - h.radius, y0: h.center[1] - h.radius, x1: h.center[0] + h.radius, y1: h.center[1] + h.radius } : bbox(h.points);
      hb[4 * i] = r.x0 - this.tol; hb[4 * i + 1] = r.y0 - this.tol; hb[4 * i + 2] = r.x1 + this.tol; hb[4 * i + 3] = r.y1 + this.tol;
    });
    this.holeGrid = new BoxGrid(hb);
  }

  /** Index of the notch whose cut-out region holds p (its faces excluded), or -1. */
  notchAt(p: Vec2): number {
    const t = this.tol;
    for (let i = 0; i < this.notches.length; i++) {
      const n = this.notches[i]!;
      const len = dist(n.from, n.to);
      if (len === 0) continue;
      const ux = (n.to[0] - n.from[0]) / len, uy = (n.to[1] - n.from[1]) / len;
      const dx = p[0] - n.from[0], dy = p[1] - n.from[1];
      const s = dx * ux + dy * uy, q = -dx * uy + dy * ux;
      if (s > -t && s < len - t && Math.abs(q) < n.width / 2 - t) return i;
    }
    return -1;
  }

  inNotch(p: Vec2): boolean {
    return this.notchAt(p) >= 0;
  }

  inHole(p: Vec2, margin: number): boolean {
    const m = Math.abs(margin);
    return this.holeGrid.some(p[0] - m, p[1] - m, p[0] + m, p[1] + m, (i) => {
      const h = this.holes[i]!;
      return h.kind === 'circle' ? dist(p, h.center) < h.radius - margin
        : inPolygon(p, h.points) && edgeDist(p, h.points) > margin;
    });
  }

  /** Inside the material or on its boundary. */
  contains(p: Vec2): boolean {
    const t = this.tol;
    const inOutline = this.ring.contains(p) || this.ring.near(p, t);
    return inOutline && !this.inHole(p, t) && !this.inNotch(p);
  }

  /** Straight boundary pieces: outline edges, polygon-hole edges, notch faces and tip ends (made once). */
  segments(): [Vec2, Vec2][] {
    if (this.segs) return this.segs;
    const out: [Vec2, Vec2][] = this.segs = [];
    const ring = (pts: Vec2[]) => pts.forEach((a, i) => out.push([a, pts[(i + 1) % pts.length]!]));
    ring(this.outline);
    for (const h of this.holes) if (h.kind === 'polygon') ring(h.points);
    for (const n of this.notches) {
      const len = dist(n.from, n.to);
      if (len === 0) continue;
      const h = n.width / 2;
      const nx = (-(n.to[1] - n.from[1]) / len) * h, ny = ((n.to[0] - n.from[0]) / len) * h;
      const f1: Vec2 = [n.from[0] + nx, n.from[1] + ny], f2: Vec2 = [n.from[0] - nx, n.from[1] - ny];
      const t1: Vec2 = [n.to[0] + nx, n.to[1] + ny], t2: Vec2 = [n.to[0] - nx, n.to[1] - ny];
      if (h === 0) out.push([n.from, n.to]);
      else out.push([f1, t1], [f2, t2], [t1, t2]);
    }
    return out;
  }

  /** Nearest boundary point to p and its distance. */
  nearestBoundary(p: Vec2): [Vec2, number] {
    let best: Vec2 = p, bd = Infinity;
    for (const [a, b] of this.segments()) {
      const q = nearestOnSegment(p, a, b), d = dist(p, q);
      if (d < bd) { bd = d; best = q; }
    }
    for (const h of this.holes) {
      if (h.kind !== 'circle') continue;
      const d = dist(p, h.center);
      const q: Vec2 = d > 0 ? [h.center[0] + ((p[0] - h.center[0]) * h.radius) / d, h.center[1] + ((p[1] - h.center[1]) * h.radius) / d]
        : [h.center[0] + h.radius, h.center[1]];
      if (Math.abs(d - h.radius) < bd) { bd = Math.abs(d - h.radius); best = q; }
    }
    return [best, bd];
  }

  onBoundary(p: Vec2): boolean {
    return this.nearestBoundary(p)[1] <= this.tol && !this.inNotch(p);
  }

  /** A bearing strip of the given width centred at p lies on one straight piece (or p is on a circular hole). */
  stripFits(p: Vec2, width: number): boolean {
    return this.stripTurn(p, width) <= MAX_STRIP_TURN;
  }

  /**
   * Test rigs: how far (radians) the boundary turns under a strip of the given width, measured
   * along the boundary both ways from p: 0 on a straight edge, about width/r on an arc of
   * radius r; Infinity when the strip is longer than half the ring it sits on.
   */
  stripTurn(p: Vec2, width: number): number {
    const t = this.tol;
    for (const h of this.holes) {
      if (h.kind === 'circle' && Math.abs(dist(p, h.center) - h.radius) <= t) return width <= Math.PI * h.radius ? width / h.radius : Infinity;
    }
    const rings = [this.outline, ...this.holes.flatMap((h) => (h.kind === 'polygon' ? [h.points] : []))];
    for (const ring of rings) {
      const n = ring.length;
      for (let i = 0; i < n; i++) {
        const a = ring[i]!, b = ring[(i + 1) % n]!, len = dist(a, b);
        if (len === 0 || segDist(p, a, b) > t) continue;
        let perim = 0;
        for (let k = 0; k < n; k++) perim += dist(ring[k]!, ring[(k + 1) % n]!);
        if (width > perim / 2) return Infinity;
        const dir = (k: number) => { const u = ring[k % n]!, v = ring[(k + 1) % n]!; return Math.atan2(v[1] - u[1], v[0] - u[0]); };
        const turn = (k: number) => { let d = dir(k) - dir(k + n - 1); while (d > Math.PI) d -= 2 * Math.PI; while (d < -Math.PI) d += 2 * Math.PI; return Math.abs(d); };
        const s = dist(a, p);
        let total = 0;
        // forwards from p to the strip's end, then backwards
        let left = width / 2 - (len - s), k = i + 1;
        while (left > t) { total += turn(k); left -= dist(ring[k % n]!, ring[(k + 1) % n]!); k++; }
        left = width / 2 - s; k = i;
        while (left > t) { total += turn(k); k = (k + n - 1) % n; left -= dist(ring[k]!, ring[(k + 1) % n]!); }
        return total;
      }
    }
    return Infinity;
  }

  /** Both ends on one straight boundary piece. */
  onOneEdge(a: Vec2, b: Vec2): boolean {
    if (this.inNotch(a) || this.inNotch(b)) return false;
    return this.segments().some(([p, q]) => segDist(a, p, q) <= this.tol && segDist(b, p, q) <= this.tol);
  }
}

function checkOutline(outline: Vec2[], path: Path, tol: number): void {
  const clash = selfTouchFast(outline, tol);
  if (clash) {
    throw new InputError(`${name(path)} must be a simple polygon that does not touch or cross itself `
      + `(found edge ${clash[0]} touching edge ${clash[1]} near ${fmtPoint(clash[2])} mm)`);
  }
  if (Math.abs(signedArea(outline)) <= tol * tol) fail(path, 'found a polygon of zero area');
}

/** Polygon stand-in for a hole, for hole–hole overlap tests. */
function ring(h: Hole): Vec2[] {
  if (h.kind === 'polygon') return h.points;
  const pts: Vec2[] = [];
  for (let k = 0; k < 64; k++) {
    const a = (2 * Math.PI * k) / 64;
    pts.push([h.center[0] + h.radius * Math.cos(a), h.center[1] + h.radius * Math.sin(a)]);
  }
  return pts;
}

function holeText(h: Hole): string {
  return h.kind === 'circle' ? `a circle at ${fmtPoint(h.center)} with radius ${fmtNum(h.radius)} mm`
    : `a polygon of ${h.points.length} points`;
}

function checkHoles(sp: Specimen): void {
  const { holes, tol, ring: outer } = sp;
  const rings: (Vec2[] | null)[] = holes.map(() => null);
  const ringOf = (k: number) => (rings[k] ??= ring(holes[k]!));
  holes.forEach((h, i) => {
    const path: Path = ['geometry', 'holes', i];
    if (h.kind === 'polygon') checkOutline(h.points, [...path, 'polygon'], tol);
    const inside = h.kind === 'circle'
      ? outer.contains(h.center) && !outer.near(h.center, h.radius + tol)
      : h.points.every((p) => outer.contains(p) && !outer.near(p, tol))
        && h.points.every((p, k) => !outer.nearSegment(p, h.points[(k + 1) % h.points.length]!, tol));
    if (!inside) throw new InputError(`${name(path)} must lie inside the outline without touching it (found ${holeText(h)})`);
    // the earliest hole it meets, among those whose boxes come near
    const b = sp.holeGrid.boxes;
    let first = -1;
    sp.holeGrid.some(b[4 * i], b[4 * i + 1], b[4 * i + 2], b[4 * i + 3], (j) => {
      if (j < i && (first < 0 || j < first) && ringsTouch(ringOf(i), ringOf(j), tol)) first = j;
    });
    if (first >= 0) throw new InputError(`${name(path)} must not touch or overlap geometry.holes[${first}] (found ${holeText(h)})`);
  });
}

function checkNotches(sp: Specimen): void {
  const { outline, tol } = sp;
  sp.notches.forEach((n, i) => {
    const path: Path = ['geometry', 'notches', i];
    if (dist(n.from, n.to) <= tol) {
      throw new InputError(`${name(path)} must have distinct from and to points (found both at ${fmtPoint(n.from)} mm)`);
    }
    const fromOk = sp.ring.contains(n.from) || sp.ring.near(n.from, tol);
    if (!fromOk) {
      throw new InputError(`${name([...path, 'from'])} must be a point on the outline or inside it in mm (found ${fmtPoint(n.from)})`);
    }
    const toOk = sp.ring.contains(n.to) && !sp.ring.near(n.to, tol) && !sp.inHole(n.to, -tol);
    if (!toOk) {
      throw new InputError(`${name([...path, 'to'])} must be a point inside the specimen, off its boundary, in mm (found ${fmtPoint(n.to)})`);
    }
    const crosses = sp.ring.crossedBy(n.from, n.to);
    const mid: Vec2 = [(n.from[0] + n.to[0]) / 2, (n.from[1] + n.to[1]) / 2];
    if (crosses || !sp.ring.contains(mid)) {
      throw new InputError(`${name(path)} must run inside the outline from its mouth to its tip `
        + `(found from ${fmtPoint(n.from)} to ${fmtPoint(n.to)} mm crossing the outline)`);
    }
  });
}

function onBoundary(sp: Specimen, p: Vec2, path: Path): void {
  if (sp.onBoundary(p)) return;
  const notch = sp.notchAt(p);
  const [q] = sp.nearestBoundary(p);
  const why = notch >= 0 ? `inside the cut of geometry.notches[${notch}]` : `the nearest boundary point is ${fmtPoint(q)}`;
  throw new InputError(`${name(path)} must be a point on the specimen boundary in mm (found ${fmtPoint(p)}, ${why})`);
}

function placed(sp: Specimen, at: Vec2 | undefined, along: [Vec2, Vec2] | undefined, width: number, path: Path): void {
  if (at) {
    onBoundary(sp, at, [...path, 'at']);
    if (width > 0 && !sp.stripFits(at, width)) {
      const turn = sp.stripTurn(at, width);
      throw new InputError(`${name([...path, 'width'])} must fit on the boundary around ${name([...path, 'at'])} without turning by more than 45° in mm `
        + `(found ${fmtNum(width)} at ${fmtPoint(at)}, ${Number.isFinite(turn) ? `where the boundary turns by ${Math.round(turn * 180 / Math.PI)}°` : 'longer than half the boundary'})`);
    }
    return;
  }
  const [a, b] = along!;
  if (dist(a, b) <= sp.tol) {
    throw new InputError(`${name([...path, 'along'])} must be two distinct points in mm (found both at ${fmtPoint(a)})`);
  }
  if (!sp.onOneEdge(a, b)) {
    throw new InputError(`${name([...path, 'along'])} must be two points on one straight edge of the specimen in mm `
      + `(found ${fmtPoint(a)} to ${fmtPoint(b)})`);
  }
  if (width > 0) {
    throw new InputError(`${name([...path, 'width'])} must be 0 for a support or load along an edge; `
      + `a bearing width applies to a point (found ${fmtNum(width)})`);
  }
}

/** Test rigs: loads that share one machine force through a spreader all state a share and push along x or y. */
function checkSpreader(c: CaseModel): void {
  const shared = c.loads.findIndex((l) => l.share !== undefined);
  if (shared < 0) return;
  c.loads.forEach((l, i) => {
    if (l.share === undefined) {
      throw new InputError(`loads[${i}].share must be given on every load when loads[${shared}] has one (the loads then share one machine force through a spreader), as a positive number, dimensionless (found none)`);
    }
    num(l.share, ['loads', i, 'share']);
    if (Math.abs(l.direction[0]) > 1e-12 && Math.abs(l.direction[1]) > 1e-12) {
      throw new InputError(`loads[${i}].direction must be along x or y when the loads share a spreader (found ${fmtPoint(l.direction)})`);
    }
  });
}

/** Test rigs: a wedge drives exactly two loads apart along one axis. */
function checkWedge(c: CaseModel): void {
  if (!c.wedge) return;
  num(c.wedge.angle, ['wedge', 'angle']);
  const [a, b] = c.loads;
  const apart = c.loads.length === 2 && a && b && Math.abs(a.direction[0] * b.direction[0] + a.direction[1] * b.direction[1] + 1) < 1e-9
    && (Math.abs(a.direction[0]) < 1e-12 || Math.abs(a.direction[1]) < 1e-12);
  if (!apart) throw new InputError(`loads must be two loads in opposite directions along x or y when the case has a wedge (found ${c.loads.length} load${c.loads.length === 1 ? '' : 's'}${c.loads.length === 2 ? ' not opposite along an axis' : ''})`);
  if (c.loads.some((l) => l.share !== undefined)) throw new InputError('loads[0].share must be left out when the case has a wedge (the wedge shares the force equally)');
}

/** Test rigs: a gauge point may lie anywhere on the specimen's face (boundary included), not in a hole or notch cut. */
function inSpecimen(sp: Specimen, p: Vec2, path: Path): void {
  if (sp.contains(p)) return;
  const notch = sp.notchAt(p);
  const why = notch >= 0 ? `inside the cut of geometry.notches[${notch}]` : 'outside the specimen or in a hole';
  throw new InputError(`${name(path)} must be a point of the specimen in mm (found ${fmtPoint(p)}, ${why})`);
}

/** Test rigs: named gauges have distinct names and two distinct points of the specimen; a control gauge given by name names one. */
function checkGauges(c: CaseModel, sp: Specimen): void {
  const gauges = c.gauges ?? [], names = new Set<string>();
  gauges.forEach((g, i) => {
    if (typeof g.name !== 'string' || g.name.trim() === '') fail(['gauges', i, 'name'], `found ${describeValue(g.name)}`);
    if (names.has(g.name)) throw new InputError(`gauges[${i}].name must be a name no other gauge uses (found ${JSON.stringify(g.name)} twice)`);
    names.add(g.name);
    inSpecimen(sp, g.from, ['gauges', i, 'from']);
    inSpecimen(sp, g.to, ['gauges', i, 'to']);
    if (dist(g.from, g.to) <= sp.tol) throw new InputError(`gauges[${i}] must have distinct from and to points (found both at ${fmtPoint(g.from)} mm)`);
  });
  const n = c.control.gaugeName;
  if (n !== undefined && !names.has(n)) {
    throw new InputError(`control.gauge must be {from, to} or the name of one of gauges (found ${JSON.stringify(n)}; `
      + `${names.size ? `the gauges are ${[...names].join(', ')}` : 'the case names no gauges'})`);
  }
}

/**
 * Rows of the rigid-motion map (u = a − θ y, v = b + θ x) restrained by the supports and by the
 * displacements the loads prescribe must have rank 3. The machine drives the load points by one load
 * factor (an axis-aligned load its own axis, an oblique one both), so a load holds its point like a
 * support would: a bar pulled at both ends is held in its axis by the two loads. Loads that share one
 * force through a spreader or a wedge are not counted.
 */
function checkRigid(c: CaseModel, sp: Specimen): void {
  const b = bbox(sp.outline);
  const cx = (b.x0 + b.x1) / 2, cy = (b.y0 + b.y1) / 2, L = Math.hypot(b.x1 - b.x0, b.y1 - b.y0);
  const rows: number[][] = [];
  let hasX = false, hasY = false;
  const hold = (p: Vec2, x: boolean, y: boolean): void => {
    const px = (p[0] - cx) / L, py = (p[1] - cy) / L;
    if (x) { rows.push([1, 0, -py]); hasX = true; }
    if (y) { rows.push([0, 1, px]); hasY = true; }
  };
  for (const s of c.supports) for (const p of s.at ? [s.at] : s.along!) hold(p, s.fix !== 'y', s.fix !== 'x');
  // loads on a spreader or a wedge share one force and do not hold their points one by one
  const driven = !c.wedge && !c.loads.some((l) => l.share !== undefined);
  if (driven) for (const l of c.loads) {
    const [dx, dy] = l.direction;
    for (const p of l.at ? [l.at] : l.along!) hold(p, Math.abs(dx) >= 1e-12, Math.abs(dy) >= 1e-12);
  }
  const why = !hasX ? 'found no support or load holding x' : !hasY ? 'found no support or load holding y'
    : rank3(rows) < 3 ? 'found supports and loads that leave a rotation free' : '';
  if (why) {
    throw new InputError(`supports must hold the specimen against rigid-body motion in x, y and rotation, together with the displacements the loads prescribe (${why})`);
  }
}

function rank3(rows: number[][]): number {
  const m = rows.map((r) => r.slice());
  let rank = 0;
  for (let col = 0; col < 3 && rank < m.length; col++) {
    let piv = rank;
    for (let r = rank + 1; r < m.length; r++) if (Math.abs(m[r]![col]!) > Math.abs(m[piv]![col]!)) piv = r;
    if (Math.abs(m[piv]![col]!) < 1e-9) continue;
    [m[rank], m[piv]] = [m[piv]!, m[rank]!];
    for (let r = rank + 1; r < m.length; r++) {
      const f = m[r]![col]! / m[rank]![col]!;
      for (let k = col; k < 3; k++) m[r]![k]! -= f * m[rank]![k]!;
    }
    rank++;
  }
  return rank;
}

function checkMeshSize(c: CaseModel, sp: Specimen): void {
  const area = Math.abs(signedArea(sp.outline));
  const tips = Math.max(1, c.geometry.notches.length);
  const { size, tipSize, refineRadius } = c.mesh;
  const refined = Math.min(area, tips * Math.PI * refineRadius * refineRadius);
  const estimate = area / (size * size) + refined / (tipSize * tipSize);
  if (estimate > MAX_POLYGONS) {
    throw new InputError(`mesh.size and mesh.tipSize must give at most ${MAX_POLYGONS} polygons `
      + `(found about ${Math.round(estimate)} polygons with size ${fmtNum(size)} mm and tipSize ${fmtNum(tipSize)} mm)`);
  }
}

/** Control characters (line breaks, tabs, escapes) would break the tables, pictures and reports that carry the text. */
const CONTROL = /[\u0000-\u001f\u007f-\u009f\u2028\u2029]/;

function plainText(v: string, path: Path): void {
  const m = CONTROL.exec(v);
  if (m) {
    const code = `U+${m[0].charCodeAt(0).toString(16).toUpperCase().padStart(4, '0')}`;
    throw new InputError(`${name(path)} must be one line of text without control characters such as line breaks or tabs (found ${code} at character ${m.index + 1})`);
  }
}

/** Throws an InputError naming the first problem of a filled case; the order of checks is fixed. */
export function checkCase(c: CaseModel): void {
  plainText(c.title, ['title']);
  c.probes.forEach((p, i) => { if (typeof p.name === 'string') plainText(p.name, ['probes', i, 'name']); });
  checkNumbers(c);
  const sp = new Specimen(c.geometry.outline, c.geometry.holes, c.geometry.notches);
  checkOutline(c.geometry.outline, ['geometry', 'outline'], sp.tol);
  checkHoles(sp);
  checkNotches(sp);

  c.supports.forEach((s, i) => placed(sp, s.at, s.along, s.width, ['supports', i]));
  c.loads.forEach((l, i) => {
    if (l.direction[0] === 0 && l.direction[1] === 0) fail(['loads', i, 'direction'], `found ${fmtPoint(l.direction)}`);
    placed(sp, l.at, l.along, l.width, ['loads', i]);
  });
  checkSpreader(c);
  checkWedge(c);
  checkRigid(c, sp);

  const { control } = c;
  checkGauges(c, sp);
  if (control.by === 'cmod' && !control.gauge) throw new InputError('control.gauge is required when control.by is cmod');
  if (control.gauge) {
    const g = control.gauge;
    inSpecimen(sp, g.from, ['control', 'gauge', 'from']);
    inSpecimen(sp, g.to, ['control', 'gauge', 'to']);
    if (dist(g.from, g.to) <= sp.tol) {
      throw new InputError(`control.gauge must have distinct from and to points (found both at ${fmtPoint(g.from)} mm)`);
    }
  }

  if (c.crack) {
    const s = c.crack.start;
    if (s === 'notch-tips' && c.geometry.notches.length === 0) {
      throw new InputError('crack.start must be anywhere or a list of [x, y] points in mm when the geometry has no notches (found "notch-tips")');
    }
    if (Array.isArray(s)) {
      s.forEach((p, i) => {
        if (!sp.contains(p)) throw new InputError(`crack.start[${i}] must be a point in the specimen in mm (found ${fmtPoint(p)})`);
      });
    }
  }

  const names = new Set<string>();
  c.probes.forEach((p, i) => {
    if (typeof p.name !== 'string' || p.name.trim() === '') fail(['probes', i, 'name'], `found ${describeValue(p.name)}`);
    if (names.has(p.name)) {
      throw new InputError(`probes[${i}].name must be a name no other probe uses (found ${JSON.stringify(p.name)} twice)`);
    }
    names.add(p.name);
    if (!sp.contains(p.at)) throw new InputError(`probes[${i}].at must be a point in the specimen in mm (found ${fmtPoint(p.at)})`);
  });

  checkMeshSize(c, sp);
}
