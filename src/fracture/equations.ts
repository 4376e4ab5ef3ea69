// One topology's equations for the loop: the compact mesh of the work mesh, its System with
// the face pairs of the cohesive cracks, and the maps between the displacement vector on
// stable vertex ids (uw) and the compact (u) and free (uf) vectors of the System.
import type { PolyMesh } from '../mesh/polymesh.js';
import { interfaceEnergy, atStrength, type CohesiveParams } from '../cohesive/interface.js';
import { System, type PairGeom, type ElementCache } from '../solver/system.js';
import { NewtonWork } from '../solver/newton.js';
import { compactDriven, type Driven } from '../solver/driven.js';
import { RunStopped } from '../errors.js';
import type { CsrMatrix } from '../linalg/index.js';
import type { WorkMesh } from './workmesh.js';
import type { Crack, MidValues } from './state.js';
import { nodeMesh, Order2Cells, centroidStresses2, nodeStresses2, type NodeMesh, type Cell2Cache } from '../vem/dofs2.js';
import { cellAreas, cellStresses, vertexStresses } from '../vem/stress.js';
import { pairGeometry2, edgeKey, midpointKey } from './interface2.js';

/** The interface of the mean material and the strength at a point, where the case has a random strength field. */
export interface LocalStrength { coh: CohesiveParams; ftAt: (x: number, y: number) => number }

/** Order 2: the rig on a node mesh (each node's key among the lifted-off points given), and the cells kept from the last topology. */
export interface Order2Setup { drivenOn: (nm: NodeMesh, key: Float64Array) => Driven; cells?: Cell2Cache }

export class Equations {
  readonly compact: ReturnType<WorkMesh['toPolyMesh']>;
  readonly sys: System;
  readonly work: NewtonWork;
  /** Free displacements of the last converged (or restored) state. */
  readonly uf: Float64Array;
  /** Cohesive histories per pair: committed, and of the last evaluation. */
  readonly kap: Float64Array;
  readonly kapTrial: Float64Array;
  /** Plus-face vertex (stable id) of each pair, and the pair of a plus-face vertex. */
  readonly pairPlus: number[];
  readonly pairOf: Map<number, number>;
  /**
   * Each pair's interface with the ft of the strength field at its plus node (a weak spot
   * softens sooner and, GF kept, over a longer opening); null without a field: the mean's.
   */
  readonly pairCoh: readonly CohesiveParams[] | null = null;
  /** Each pair's ft where a strength field varies it (what the growth checks read), else null. */
  readonly pairFt: Float64Array | null = null;

  /** Order 2: the node mesh the System is built on (vertices keep their compact ids, midpoints follow). */
  readonly node: NodeMesh | null = null;
  private readonly cells2: Order2Cells | null = null;
  /** Order 2: the key (edgeKey of its stable vertex ids) of each edge, in the node mesh's midpoint order. */
  readonly midKey: Float64Array | null = null;
  /**
   * Order 2: the rig as held on the node mesh (node ids; `ids` maps them to themselves, as a
   * compact map), and each node's key among the lifted-off strip points of the record (a
   * vertex's stable id, a midpoint's midpointKey).
   */
  readonly nodeRig: { driven: Driven; ids: Int32Array; key: Float64Array } | null = null;

  /**
   * Stresses of the last evaluated state: per cell (order 1 its constant, order 2 the
   * projection's at the centroid) and, when asked, per node (order 1 the area-weighted vertex
   * average, order 2 the projections of the cells around the node evaluated there).
   */
  stresses(D: Float64Array, atNodes = false): { cell: Float64Array; node: Float64Array | null } {
    const m = this.sys.mesh, u = this.work.u;
    if (!this.cells2 || !this.node) {
      const cell = cellStresses(m, u, D);
      return { cell, node: atNodes ? vertexStresses(m, cell, cellAreas(m)) : null };
    }
    const field = this.cells2.field(u);
    return { cell: centroidStresses2(field, D), node: atNodes ? nodeStresses2(this.node, field, D) : null };
  }

  /** Order 2: the projected field (FIELD stride per cell, vem/system2.ts) of the last evaluated state; null at order 1. */
  projectedField(): Float64Array | null {
    return this.cells2 ? this.cells2.field(this.work.u) : null;
  }

  /**
   * The equations of the work mesh as it is; throws RunStopped above maxDofs. With `order2`
   * the System is of second order on the node mesh (vem/dofs2.ts), driven as order2.drivenOn
   * selects on it, with Simpson face pairs (interface2.ts); unchanged cells come from order2.cells.
   * With `local` each pair softens with the strength at its place (pairCoh).
   */
  constructor(wm: WorkMesh, cracks: readonly Crack[], driven: Driven, D: Float64Array, thickness: number,
    kappa: ReadonlyMap<number, number>, uw: Float64Array, maxDofs?: number, elements?: ElementCache, order2?: Order2Setup, mid?: MidValues | null,
    local?: LocalStrength | null) {
    const cp = wm.toPolyMesh();
    this.compact = cp;
    const co = cp.compactOf;
    const nm = order2 ? nodeMesh(cp.mesh) : null;
    const nd = nm ? nm.mesh.xy.length : 2 * cp.vertexOf.length;
    if (maxDofs && nd > maxDofs) throw new RunStopped(`the mesh grew to ${nd} dofs, above the limit of ${maxDofs}`);
    const { geom, plus } = nm ? pairGeometry2(wm, cracks, co, thickness, nm) : pairGeometry(wm, cracks, co, thickness);
    this.pairPlus = plus;
    this.pairOf = new Map(plus.map((v, i) => [v, i]));
    if (nm && order2) {
      const cells = new Order2Cells(nm, D, thickness, order2.cells ? { cache: order2.cells, cellKey: cp.cellOf, vertexId: cp.vertexOf } : undefined), nn = nm.mesh.xy.length >> 1, id = new Int32Array(nn);
      for (let i = 0; i < nn; i++) id[i] = i;
      this.node = nm; this.cells2 = cells;
      const L = nm.layout, vo = cp.vertexOf, key = new Float64Array(nn);
      this.midKey = new Float64Array(L.ne);
      for (let v = 0; v < L.nv; v++) key[v] = vo[v];
      for (let e = 0; e < L.ne; e++) {
        const a = vo[L.edgeVerts[2 * e]], b = vo[L.edgeVerts[2 * e + 1]];
        this.midKey[e] = edgeKey(a, b); key[L.nv + e] = midpointKey(a, b);
      }
      const rig = order2.drivenOn(nm, key);
      this.nodeRig = { driven: rig, ids: id, key };
      this.sys = new System(nm.mesh, D, thickness, geom, compactDriven(rig, id), (k, Ke) => cells.stiffness(k, Ke));
    } else {
      this.sys = new System(cp.mesh, D, thickness, geom, compactDriven(driven, co), undefined, elements ? { cache: elements, cellKey: cp.cellOf, vertexId: cp.vertexOf } : undefined);
    }
    if (local) {
      const xy = this.sys.mesh.xy, pl = geom.plus;
      this.pairCoh = Array.from(pl, (n) => atStrength(local.coh, local.ftAt(xy[2 * n], xy[2 * n + 1])));
      this.sys.pairCoh = this.pairCoh;
      this.pairFt = Float64Array.from(this.pairCoh, (k) => k.law.ft);
    }
    this.work = new NewtonWork(this.sys);
    this.uf = new Float64Array(this.sys.nFree);
    this.gather(uw, mid);
    this.kap = Float64Array.from(plus.map((v) => kappa.get(v) ?? 0));
    this.kapTrial = this.kap.slice();
  }

  get dofs(): number { return this.sys.nDof; }

  /** The interface of pair p: its own where the strength varies, else coh. */
  cohOf(p: number, coh: CohesiveParams): CohesiveParams { return this.pairCoh ? this.pairCoh[p] : coh; }

  /** Cell areas and centroids of this topology's compact mesh (from the work mesh it was built on), computed once. */
  cellGeometry(wm: WorkMesh): { areas: Float64Array; cent: Float64Array } {
    const m = this.sys.mesh;
    this.geometry ??= { areas: cellAreas(m), cent: centroidsOf(wm, m, this.compact.cellOf) };
    return this.geometry;
  }

  private geometry: { areas: Float64Array; cent: Float64Array } | null = null;

  /** uf from the displacements on stable ids (and, at order 2, the midpoints carried over). */
  gather(uw: Float64Array, mid?: MidValues | null): void { this.gatherInto(uw, this.uf, mid); }

  /**
   * Free values from displacements on stable ids, into uf. Order 2: a midpoint takes its value
   * from `mid` where its edge (the same two stable vertices) was there before, so a topology
   * rebuilt from the record starts exactly where the last one stood; a new edge starts from the
   * mean of its ends (the bulk is linear, so Newton's first iteration puts it right).
   */
  gatherInto(uw: Float64Array, uf: Float64Array, mid?: MidValues | null): void {
    const fd = this.sys.freeDofs, vo = this.compact.vertexOf, nv = vo.length, L = this.node?.layout;
    const at = L && mid ? this.midIndex(mid) : null;
    for (let i = 0; i < fd.length; i++) {
      const n = fd[i] >> 1, c = fd[i] & 1;
      if (n < nv || !L) { uf[i] = uw[2 * vo[n] + c]; continue; }
      const k = at ? at[n - nv] : -1;
      if (k >= 0) { uf[i] = mid!.u[2 * k + c]; continue; }
      const a = L.edgeVerts[2 * (n - nv)], b = L.edgeVerts[2 * (n - nv) + 1];
      uf[i] = 0.5 * (uw[2 * vo[a] + c] + uw[2 * vo[b] + c]);
    }
  }

  /** Where each edge of this topology is in `mid` (−1: a new edge). */
  private midIndex(mid: MidValues): Int32Array {
    const key = this.midKey!, ne = key.length, at = new Int32Array(ne);
    let same = mid.key.length === ne;
    for (let e = 0; same && e < ne; e++) same = mid.key[e] === key[e];
    if (same) { for (let e = 0; e < ne; e++) at[e] = e; return at; }
    const where = new Map<number, number>();
    for (let k = 0; k < mid.key.length; k++) where.set(mid.key[k], k);
    for (let e = 0; e < ne; e++) at[e] = where.get(key[e]) ?? -1;
    return at;
  }

  /** The last evaluated displacement (work.u) onto the stable ids. */
  scatter(uw: Float64Array): void {
    // order 2: the vertex nodes come first, with their compact ids
    const u = this.work.u, vo = this.compact.vertexOf;
    for (let i = 0; i < vo.length; i++) { uw[2 * vo[i]] = u[2 * i]; uw[2 * vo[i] + 1] = u[2 * i + 1]; }
  }

  /** Order 2: the midpoint values of the last evaluated displacement, by edge key (null at order 1). */
  midpoints(): MidValues | null {
    if (!this.midKey) return null;
    const nv = this.compact.vertexOf.length;
    return { key: this.midKey, u: this.work.u.slice(2 * nv, 2 * (nv + this.midKey.length)) };
  }

  /** Make the trial histories the committed ones, also on the stable ids. */
  commit(kappa: Map<number, number>): void {
    this.kap.set(this.kapTrial);
    this.pairPlus.forEach((v, i) => kappa.set(v, this.kapTrial[i]));
  }

  /** Elastic energy (bulk and intact faces) and energy dissipated on the faces (N·mm) of the last evaluated state, with the histories `kap` (default: the committed ones). */
  energies(coh: CohesiveParams, kap: Float64Array = this.kap): { elastic: number; dissipated: number } {
    const sys = this.sys, u = this.work.u, f = new Float64Array(sys.nDof);
    sys.internal(u, null, this.kap, this.kapTrial, f, false, 0);
    let e = 0;
    for (let i = 0; i < u.length; i++) e += 0.5 * u[i] * f[i];
    let d = 0;
    const P = sys.pairs;
    for (let p = 0; p < P.plus.length; p++) {
      const a = P.plus[p], b = P.minus[p];
      const dx = u[2 * a] - u[2 * b], dy = u[2 * a + 1] - u[2 * b + 1];
      const w = dx * P.nx[p] + dy * P.ny[p], s = dx * P.ny[p] - dy * P.nx[p];
      const en = interfaceEnergy(this.cohOf(p, coh), w, s, kap[p]);
      e += en.stored * P.area[p];
      d += en.dissipated * P.area[p];
    }
    return { elastic: e, dissipated: d };
  }

  /** Crack face area (mm²) whose traction has reached ft, and the part of it fully separated (no traction left). */
  faceAreas(coh: CohesiveParams): { reached_mm2: number; separated_mm2: number } {
    const P = this.sys.pairs;
    let reached = 0, separated = 0;
    for (let p = 0; p < P.plus.length; p++) {
      const q = this.cohOf(p, coh), l0 = q.law.ft / q.penalty, wc = q.law.wc;
      if (this.kap[p] > l0) reached += P.area[p];
      if (this.kap[p] >= l0 + wc) separated += P.area[p];
    }
    return { reached_mm2: reached, separated_mm2: separated };
  }

  /** The constrained bulk stiffness (free dofs only). */
  stiffnessMatrix(): CsrMatrix {
    return this.sys.stiffnessOfBulk();
  }

  /** Which value of the last equilibrium evaluation is NaN or infinite, and where (null if none). */
  nonFinitePlace(): string | null {
    const u = this.work.u, f = this.work.f, xy = this.sys.mesh.xy;
    for (let i = 0; i < u.length; i++) {
      const bad = !Number.isFinite(u[i]) ? ['displacement', u[i]] as const : !Number.isFinite(f[i]) ? ['internal force', f[i]] as const : null;
      if (!bad) continue;
      const v = i >> 1;
      return `the ${bad[0]} ${i & 1 ? 'uy' : 'ux'} became ${bad[1]} at the vertex near [${xy[2 * v].toFixed(2)}, ${xy[2 * v + 1].toFixed(2)}] mm`;
    }
    return null;
  }
}

/** Node pairs of the cohesive cracks (compact ids) with their normals and tributary face areas, and the plus vertex (stable id) of each. */
export function pairGeometry(wm: WorkMesh, cracks: readonly Crack[], co: Int32Array, thickness: number): { geom: PairGeom; plus: number[] } {
  const plus: number[] = [], minus: number[] = [], nx: number[] = [], ny: number[] = [], area: number[] = [], keys: number[] = [];
  const { x, y } = wm;
  for (const k of cracks) {
    if (k.kind !== 'cohesive') continue;
    const P = k.path, n = P.length;
    for (let i = 0; i < n; i++) {
      if (k.twins[i] < 0) continue;
      const a = i > 0 ? P[i - 1] : P[i], b = i + 1 < n ? P[i + 1] : P[i];
      const tx = x[b] - x[a], ty = y[b] - y[a], L = Math.hypot(tx, ty);
      const before = i > 0 ? 0.5 * Math.hypot(x[P[i]] - x[P[i - 1]], y[P[i]] - y[P[i - 1]]) : 0;
      const after = i + 1 < n ? 0.5 * Math.hypot(x[P[i + 1]] - x[P[i]], y[P[i + 1]] - y[P[i]]) : 0;
      // plus = left face; its normal points from the minus (right) face to it
      const j = k.joins?.find((q) => q.v === P[i] || q.v === k.twins[i]);
      plus.push(co[P[i]]); minus.push(co[k.twins[i]]); keys.push(P[i]);
      nx.push(-ty / L); ny.push(tx / L); area.push((j ? (j.after ? before : after) : before + after) * thickness);
      if (!j) continue;
      // a crack ended on this face here: the copy of the met vertex pairs with the other face
      // over the half segment its cells border (history keyed by the copy)
      const onPlus = j.v === P[i];
      plus.push(co[onPlus ? j.copy : P[i]]); minus.push(co[onPlus ? k.twins[i] : j.copy]); keys.push(j.copy);
      nx.push(-ty / L); ny.push(tx / L); area.push((j.after ? after : before) * thickness);
    }
  }
  return {
    geom: { plus: Int32Array.from(plus), minus: Int32Array.from(minus), nx: Float64Array.from(nx), ny: Float64Array.from(ny), area: Float64Array.from(area) },
    plus: keys,
  };
}

/** Cell centroids of a compact mesh taken from the work mesh (the same formula as everywhere the loop uses them). */
export function centroidsOf(wm: WorkMesh, m: PolyMesh, cellOf: Int32Array | number[]): Float64Array {
  const nc = m.cellStart.length - 1, cent = new Float64Array(2 * nc);
  for (let c = 0; c < nc; c++) {
    const cc = wm.centroid(cellOf[c]);
    cent[2 * c] = cc[0]; cent[2 * c + 1] = cc[1];
  }
  return cent;
}
