// One mesh topology's equations: bulk stiffness assembled once, cohesive pairs added per
// iteration, supports eliminated, the load points driven by one load factor λ.
// u_full = u_free (scattered) + λ·w on the load dofs + 0 on the supports.
import type { PolyMesh } from '../mesh/polymesh.js';
import { ElementWork, elementStiffness, DEFAULT_STABILISATION, type Stabilisation } from '../vem/element.js';
import {
  patternFromBlocks, assemblyMap, findEntry, blockMapOffsets, matrixOnPattern, matVec, submatrix, submatrixInto,
  analyze, factorize, factorizeTrailing, fillReducingOrder, type CsrMatrix, type SubMatrix, type Symbolic, type Factor,
} from '../linalg/index.js';
import { cohesivePoint, dissipationPoint, type CohesiveParams } from '../cohesive/interface.js';
import { reducedMatrix, refill, type Reduced, type Slaves } from './reduce.js';
import { carryBulk, compactOfStable, type BulkRecord } from './carry.js';

/** Crack-face node pair carrying the cohesive law (vertex ids are compact mesh indices here). */
export interface PairGeom {
  plus: Int32Array; minus: Int32Array;
  /** Unit normal (pointing from the minus face to the plus face) and face area (mm²). */
  nx: Float64Array; ny: Float64Array; area: Float64Array;
}

export interface DrivenDofs {
  /** Constrained to zero (supports). */
  fixed: Int32Array;
  /** Driven by the load factor: u[dof] = λ·weight. */
  load: Int32Array; loadW: Float64Array;
  /** Linear gauge reading g = Σ coef·u[dof] (CMOD). */
  gauge: Int32Array; gaugeW: Float64Array;
  /** Platen and spreader points that follow masters (and λ); absent when there are none. */
  slaves?: Slaves;
}

/**
 * Element stiffnesses kept between topologies, by a key of the caller's (the work mesh's cell
 * id): a cell whose vertices (stable ids) and coordinates are unchanged reuses its matrix.
 */
export class ElementCache<E extends CellIdentity = CellIdentity & { Ke: Float64Array }> {
  entries = new Map<number, E>();
  /** The bulk matrix of the last System built on these entries (order 1), and its face vertices (stable ids). */
  last: (BulkRecord & { faces: Int32Array }) | null = null;
  /** The order-1 stabilisation its matrices are built with (vem/element.ts). */
  constructor(readonly stabilisation: Stabilisation = DEFAULT_STABILISATION) {}
}

/** What a cached cell is known by: its vertices' stable ids and coordinates, in cell order. */
export interface CellIdentity { verts: Int32Array; xy: Float64Array }

/** Where a System finds and keeps element matrices: the cache, each cell's key and each vertex's stable id. */
export interface ElementReuse<E extends CellIdentity = CellIdentity & { Ke: Float64Array }> { cache: ElementCache<E>; cellKey: Int32Array; vertexId: Int32Array }

/**
 * Stiffness block of cell c, (2n)² values for its n vertices in cell order, into Ke; absent: the
 * first-order element. Order 2 passes its condensed cells on the node mesh (vem/dofs2.ts).
 */
export type CellStiffness = (c: number, Ke: Float64Array) => void;

export class System {
  readonly nDof: number;
  readonly nFree: number;
  /** Full dof → free index, −1 for fixed and driven dofs. */
  readonly freeOf: Int32Array;
  readonly freeDofs: Int32Array;
  readonly kBulk: CsrMatrix;
  readonly kT: CsrMatrix;
  /** The tangent on the unknowns: a plain submatrix, or Tᵀ kT T when dofs are slaved. */
  readonly kff: CsrMatrix;
  private readonly sub: SubMatrix | null = null;
  private readonly reduced: Reduced | null = null;
  /** Full dof → slave index (−1 when not slaved). */
  private readonly slaveOf: Int32Array;
  private symbolic: Symbolic | null = null;
  factor: Factor | null = null;
  private readonly pairMap: Int32Array;
  private readonly pairOff: Int32Array;
  private readonly nCellBlocks: number;
  private readonly tr = new Float64Array(6);
  /** Each pair's own interface where the strength varies over the specimen (set by the caller); null: the one passed in. */
  pairCoh: readonly CohesiveParams[] | null = null;
  /** The 2×2 tangent of the last pairResponse. */
  readonly m4 = new Float64Array(4);
  readonly zLoad: Float64Array;

  constructor(readonly mesh: PolyMesh, D: Float64Array, t: number, readonly pairs: PairGeom, readonly driven: DrivenDofs, cells?: CellStiffness, reuse?: ElementReuse) {
    const nv = mesh.xy.length >> 1, nc = mesh.cellStart.length - 1, np = pairs.plus.length;
    this.nDof = 2 * nv;
    this.nCellBlocks = nc;
    // blocks: one per cell (2n dofs), one per pair (4 dofs)
    const blockStart = new Int32Array(nc + np + 1);
    for (let c = 0; c < nc; c++) blockStart[c + 1] = blockStart[c] + 2 * (mesh.cellStart[c + 1] - mesh.cellStart[c]);
    for (let p = 0; p < np; p++) blockStart[nc + p + 1] = blockStart[nc + p] + 4;
    const blockDofs = new Int32Array(blockStart[nc + np]);
    let maxn = 3;
    for (let c = 0; c < nc; c++) {
      const s = mesh.cellStart[c], e = mesh.cellStart[c + 1];
      maxn = Math.max(maxn, e - s);
      for (let k = s; k < e; k++) { const o = blockStart[c] + 2 * (k - s); blockDofs[o] = 2 * mesh.cellVerts[k]; blockDofs[o + 1] = 2 * mesh.cellVerts[k] + 1; }
    }
    for (let p = 0; p < np; p++) {
      const o = blockStart[nc + p];
      blockDofs[o] = 2 * pairs.plus[p]; blockDofs[o + 1] = 2 * pairs.plus[p] + 1;
      blockDofs[o + 2] = 2 * pairs.minus[p]; blockDofs[o + 3] = 2 * pairs.minus[p] + 1;
    }
    const carried = reuse && !cells && reuse.cache.last ? carryFrom(reuse as ElementReuse, mesh, D, t, pairs, maxn) : null;
    if (carried) {
      this.kBulk = carried.matrix;
      this.pairMap = carried.pairMap;
      this.pairOff = carried.pairOff;
    } else {
      const pattern = patternFromBlocks(this.nDof, blockStart, blockDofs);
      const map = assemblyMap(pattern, blockStart, blockDofs);
      const off = blockMapOffsets(blockStart);
      this.kBulk = matrixOnPattern(pattern);
      const Ke = new Float64Array(4 * maxn * maxn), work = new ElementWork(maxn), stab = reuse?.cache.stabilisation ?? DEFAULT_STABILISATION;
      const vals = this.kBulk.values;
      const kept = reuse ? new Map<number, CellIdentity & { Ke: Float64Array }>() : null;
      for (let c = 0; c < nc; c++) {
        const s = mesh.cellStart[c], e = mesh.cellStart[c + 1], m = 2 * (e - s);
        const o = off[c];
        let K: Float64Array = Ke;
        if (cells) cells(c, Ke);
        else if (reuse) {
          const key = reuse.cellKey[c], hit = reuse.cache.entries.get(key);
          if (hit && sameCell(hit, mesh, reuse.vertexId, s, e)) {
            for (let k = 0; k < m * m; k++) vals[map[o + k]] += hit.Ke[k];
            kept!.set(key, hit);
            continue;
          }
          elementStiffness(mesh.xy, mesh.cellVerts, s, e, D, t, Ke, work, stab);
          K = Ke.slice(0, m * m);
          kept!.set(key, cachedCell(mesh, reuse.vertexId, s, e, K));
        } else elementStiffness(mesh.xy, mesh.cellVerts, s, e, D, t, Ke, work, stab);
        for (let k = 0; k < m * m; k++) vals[map[o + k]] += K[k];
      }
      if (reuse) reuse.cache.entries = kept!;
      this.pairMap = map;
      this.pairOff = off.subarray(nc);
    }
    // the next topology copies the rows its growth leaves alone
    if (reuse && !cells) reuse.cache.last = { matrix: this.kBulk, vertexOf: reuse.vertexId, faces: faceIds(pairs, reuse.vertexId) };
    this.kT = matrixOnPattern(this.kBulk);

    const freeOf = new Int32Array(this.nDof).fill(0);
    for (const d of driven.fixed) freeOf[d] = -1;
    for (const d of driven.load) freeOf[d] = -1;
    const S = driven.slaves;
    this.slaveOf = new Int32Array(this.nDof).fill(-1);
    if (S) for (let k = 0; k < S.slave.length; k++) { freeOf[S.slave[k]] = -1; this.slaveOf[S.slave[k]] = k; }
    let nf = 0;
    const freeDofs: number[] = [];
    for (let d = 0; d < this.nDof; d++) if (freeOf[d] === 0) { freeOf[d] = nf++; freeDofs.push(d); } else freeOf[d] = -1;
    this.freeOf = freeOf; this.nFree = nf; this.freeDofs = Int32Array.from(freeDofs);
    if (S && S.slave.length > 0) {
      for (let j = 0; j < S.masterDof.length; j++) {
        if (freeOf[S.masterDof[j]] < 0) throw new Error(`platen master dof ${S.masterDof[j]} is itself held or slaved`);
      }
      this.reduced = reducedMatrix(this.kT, freeOf, this.slaveOf, S, nf);
      this.kff = this.reduced.matrix;
    } else {
      this.sub = submatrix(this.kT, freeOf, nf);
      this.kff = this.sub;
    }
    this.zLoad = new Float64Array(this.nDof);
    for (let i = 0; i < driven.load.length; i++) this.zLoad[driven.load[i]] = driven.loadW[i];
  }

  /**
   * Two dofs that are not unknowns and move alike in every state: both held, both driven with
   * the same weight, or both slaved with the same λ-coefficient to the same masters (a rig point
   * and its twin on a crack face). Their difference is zero whatever λ and the unknowns are.
   */
  boundAlike(a: number, b: number): boolean {
    if (this.freeOf[a] >= 0 || this.freeOf[b] >= 0) return false;
    const { load, loadW } = this.driven, S = this.driven.slaves;
    const ka = this.slaveOf[a], kb = this.slaveOf[b];
    if (ka >= 0 || kb >= 0) {
      if (ka < 0 || kb < 0 || !S || S.slaveZ[ka] !== S.slaveZ[kb]) return false;
      const sa = S.slaveStart[ka], sb = S.slaveStart[kb], len = S.slaveStart[ka + 1] - sa;
      if (S.slaveStart[kb + 1] - sb !== len) return false;
      for (let j = 0; j < len; j++) if (S.masterDof[sa + j] !== S.masterDof[sb + j] || S.masterW[sa + j] !== S.masterW[sb + j]) return false;
      return true;
    }
    let wa = 0, wb = 0;
    for (let i = 0; i < load.length; i++) { if (load[i] === a) wa += loadW[i]; if (load[i] === b) wb += loadW[i]; }
    return wa === wb;
  }

  /**
   * A dof that is not an unknown as λ·z + Σ w·q over free unknowns q: a support (z = 0, no
   * terms), a load point (its weight) or a rig's point (its λ-coefficient and masters).
   */
  boundForm(d: number): { z: number; free: number[]; w: number[] } {
    const k = this.slaveOf[d], S = this.driven.slaves;
    if (k >= 0 && S) {
      const free: number[] = [], w: number[] = [];
      for (let j = S.slaveStart[k]; j < S.slaveStart[k + 1]; j++) { free.push(this.freeOf[S.masterDof[j]]); w.push(S.masterW[j]); }
      return { z: S.slaveZ[k], free, w };
    }
    const { load, loadW } = this.driven;
    let z = 0;
    for (let i = 0; i < load.length; i++) if (load[i] === d) z += loadW[i];
    return { z, free: [], w: [] };
  }

  /** Full displacement from free values and the load factor. */
  expand(uf: Float64Array, lambda: number, u: Float64Array): void {
    u.fill(0);
    const fd = this.freeDofs;
    for (let i = 0; i < fd.length; i++) u[fd[i]] = uf[i];
    const { load, loadW } = this.driven;
    for (let i = 0; i < load.length; i++) u[load[i]] = lambda * loadW[i];
    const S = this.driven.slaves;
    if (!S) return;
    for (let k = 0; k < S.slave.length; k++) {
      let v = lambda * S.slaveZ[k];
      for (let j = S.slaveStart[k]; j < S.slaveStart[k + 1]; j++) v += S.masterW[j] * u[S.masterDof[j]];
      u[S.slave[k]] = v;
    }
  }

  /** Forces on the unknowns, Tᵀ f (full-length f). */
  restrict(f: Float64Array, r: Float64Array): void {
    const fd = this.freeDofs;
    for (let i = 0; i < fd.length; i++) r[i] = f[fd[i]];
    const S = this.driven.slaves;
    if (!S) return;
    for (let k = 0; k < S.slave.length; k++) {
      const fk = f[S.slave[k]];
      for (let j = S.slaveStart[k]; j < S.slaveStart[k + 1]; j++) r[this.freeOf[S.masterDof[j]]] += S.masterW[j] * fk;
    }
  }

  /** Gradient of a gauge reading Σ w·u: adds ∂g/∂q to gf and returns ∂g/∂λ (z is the load pattern). */
  gaugeGradient(gf: Float64Array, z: Float64Array, gauge: Int32Array, gaugeW: Float64Array): number {
    const S = this.driven.slaves;
    let gl = 0;
    for (let i = 0; i < gauge.length; i++) {
      const d = gauge[i], fi = this.freeOf[d];
      if (fi >= 0) { gf[fi] += gaugeW[i]; continue; }
      gl += gaugeW[i] * z[d];
      const k = this.slaveOf[d];
      if (k >= 0 && S) for (let j = S.slaveStart[k]; j < S.slaveStart[k + 1]; j++) gf[this.freeOf[S.masterDof[j]]] += gaugeW[i] * S.masterW[j];
    }
    return gl;
  }

  /** The bulk stiffness on the unknowns (kT and kff are overwritten; the next evaluation refills them). */
  stiffnessOfBulk(): CsrMatrix {
    this.kT.values.set(this.kBulk.values);
    return this.reduceTangent();
  }

  /** Refill the tangent on the unknowns from kT. */
  reduceTangent(): CsrMatrix {
    return this.reduced ? refill(this.kT, this.reduced) : submatrixInto(this.kT, this.sub!);
  }

  /**
   * Internal force f = K u + f_coh(u) and the tangent kT (when wanted); trial histories
   * go to kappaTrial. Returns nothing; f has the full dof length.
   */
  internal(u: Float64Array, coh: CohesiveParams | null, kappa: Float64Array, kappaTrial: Float64Array,
    f: Float64Array, wantTangent: boolean, floor: number, secant = false): void {
    matVec(this.kBulk, u, f);
    if (wantTangent) this.kT.values.set(this.kBulk.values);
    if (!coh) return;
    const P = this.pairs, np = P.plus.length, vals = this.kT.values, map = this.pairMap, M = this.m4;
    for (let p = 0; p < np; p++) {
      const a = P.plus[p], b = P.minus[p];
      const fx = this.pairResponse(p, u[2 * a] - u[2 * b], u[2 * a + 1] - u[2 * b + 1], coh, kappa, kappaTrial, wantTangent, floor, secant);
      const fy = this.pairFy;
      f[2 * a] += fx; f[2 * a + 1] += fy; f[2 * b] -= fx; f[2 * b + 1] -= fy;
      if (!wantTangent) continue;
      const o = this.pairOff[p];
      for (let i = 0; i < 4; i++) for (let j = 0; j < 4; j++) {
        const sgn = (i < 2) === (j < 2) ? 1 : -1;
        vals[map[o + 4 * i + j]] += sgn * M[2 * (i & 1) + (j & 1)];
      }
    }
  }

  /** y component of the force of the last pairResponse. */
  pairFy = 0;

  /**
   * The cohesive force of pair p on its plus face for the jump (dx, dy) = u⁺ − u⁻: returns its
   * x component (y in pairFy), puts the trial history in kappaTrial[p] and, with a tangent, the
   * 2×2 stiffness of the force against the jump in m4 (row-major).
   */
  pairResponse(p: number, dx: number, dy: number, coh: CohesiveParams, kappa: Float64Array, kappaTrial: Float64Array,
    wantTangent: boolean, floor: number, secant: boolean): number {
    const P = this.pairs, tr = this.tr;
    const nx = P.nx[p], ny = P.ny[p], A = P.area[p];
    // local frame: n and t = (ny, −nx)
    const w = dx * nx + dy * ny, s = dx * ny - dy * nx;
    kappaTrial[p] = cohesivePoint(this.pairCoh ? this.pairCoh[p] : coh, w, s, kappa[p], tr);
    const fx = A * (tr[0] * nx + tr[1] * ny);
    this.pairFy = A * (tr[0] * ny - tr[1] * nx);
    if (!wantTangent) return fx;
    if (secant) {
      // secant stiffness of the current state: positive, so Newton cannot cycle on it
      const bs = coh.beta * s, den = w * (w > 0 ? w : 0) + bs * s;
      const Dsec = den > 1e-30 ? (tr[0] * (w > 0 ? w : 0) + tr[1] * s) / den : tr[5] / coh.beta;
      tr[2] = w < 0 ? tr[2] : Dsec; tr[3] = 0; tr[4] = 0; tr[5] = Dsec * coh.beta;
    }
    // M = A·R C Rᵀ with R = [n t]; a small floor keeps fully open faces from a singular matrix
    const c00 = tr[2], c01 = tr[3], c10 = tr[4], c11 = tr[5], M = this.m4;
    M[0] = A * (nx * nx * c00 + nx * ny * (c01 + c10) + ny * ny * c11) + floor * A;
    M[1] = A * (nx * ny * c00 - nx * nx * c01 + ny * ny * c10 - nx * ny * c11);
    M[2] = A * (nx * ny * c00 + ny * ny * c01 - nx * nx * c10 - nx * ny * c11);
    M[3] = A * (ny * ny * c00 - nx * ny * (c01 + c10) + nx * nx * c11) + floor * A;
    return fx;
  }

  /** ∂D/∂(dx, dy) of the last pairDissipation. */
  readonly dg = new Float64Array(2);

  /**
   * Energy pair p dissipates (N·mm) from its history kappa[p] at the jump (dx, dy) = u⁺ − u⁻,
   * A·d(max(κ, λ)) (cohesive/interface.ts `dissipationPoint`); its gradient on the jump in dg.
   */
  pairDissipation(p: number, dx: number, dy: number, coh: CohesiveParams, kappa: Float64Array): number {
    const P = this.pairs, nx = P.nx[p], ny = P.ny[p], A = P.area[p], g = this.dg;
    const w = dx * nx + dy * ny, s = dx * ny - dy * nx;
    const d = A * dissipationPoint(this.pairCoh ? this.pairCoh[p] : coh, w, s, kappa[p], g);
    const gw = A * g[0], gs = A * g[1];
    g[0] = gw * nx + gs * ny; g[1] = gw * ny - gs * nx;
    return d;
  }

  /**
   * The energy the faces dissipate at displacement u from the histories kappa, D(u) = Σ A·d
   * (N·mm): the constraint of the dissipation-driven steps. With `weights` (the length of
   * openingGauge's dofs) its gradient on those dofs, for gaugeGradient; zero on every pair
   * that is intact or unloading.
   */
  dissipation(u: Float64Array, coh: CohesiveParams, kappa: Float64Array, weights?: Float64Array): number {
    const P = this.pairs, g = this.dg;
    let D = 0;
    for (let p = 0; p < P.plus.length; p++) {
      const a = P.plus[p], b = P.minus[p];
      D += this.pairDissipation(p, u[2 * a] - u[2 * b], u[2 * a + 1] - u[2 * b + 1], coh, kappa);
      if (!weights) continue;
      weights[4 * p] = g[0]; weights[4 * p + 1] = g[1]; weights[4 * p + 2] = -g[0]; weights[4 * p + 3] = -g[1];
    }
    return D;
  }

  /** Scratch weights of the dissipation's gradient on openingGauge's dofs (allocated once per topology). */
  get dissipationWeights(): Float64Array {
    return this.dissW ??= new Float64Array(4 * this.pairs.plus.length);
  }

  private dissW: Float64Array | null = null;

  /**
   * Ordering and symbolic factorization of the free–free block, once per topology. The free
   * dofs of the face pairs are eliminated last: only they change between Newton iterations
   * (the bulk is linear), so each refactorization redoes only the trailing supernodes.
   */
  get sym(): Symbolic {
    if (this.symbolic) return this.symbolic;
    const P = this.pairs, np = P.plus.length;
    if (np === 0) { this.symbolic = analyze(this.kff); this.firstPairCol = this.nFree; return this.symbolic; }
    const last = new Uint8Array(this.nFree);
    const S = this.driven.slaves;
    for (let p = 0; p < np; p++) for (const v of [P.plus[p], P.minus[p]]) for (let c = 0; c < 2; c++) {
      const d = 2 * v + c, i = this.freeOf[d], k = this.slaveOf[d];
      if (i >= 0) last[i] = 1;
      // a slaved face dof changes the tangent on its masters
      else if (k >= 0 && S) for (let j = S.slaveStart[k]; j < S.slaveStart[k + 1]; j++) last[this.freeOf[S.masterDof[j]]] = 1;
    }
    const order = fillReducingOrder(this.kff, 'auto', {}, last);
    let lastFrom = this.nFree;
    for (let k = 0; k < this.nFree; k++) if (last[order[k]]) { lastFrom = k; break; }
    this.symbolic = analyze(this.kff, { ordering: order, lastFrom });
    let first = this.nFree;
    for (let i = 0; i < this.nFree; i++) if (last[i] && this.symbolic.iperm[i] < first) first = this.symbolic.iperm[i];
    this.firstPairCol = first;
    return this.symbolic;
  }

  /** First column (elimination order) of a face-pair dof: the factor's columns before it never change within a topology. */
  private firstPairCol = 0;

  /** Factorize the free–free block of the current tangent kT. */
  factorTangent(): Factor {
    this.reduceTangent();
    // an unchanged tangent (elastic bulk, intact or unloading interfaces) keeps its factor
    const v = this.kff.values, last = this.factoredValues;
    if (this.factor && last) {
      let same = true;
      for (let i = 0; i < v.length; i++) if (v[i] !== last[i]) { same = false; break; }
      if (same) return this.factor;
    }
    try {
      const sym = this.sym;
      this.factor = this.firstPairCol < this.nFree ? factorizeTrailing(this.kff, sym, this.firstPairCol, this.factor ?? undefined)
        : factorize(this.kff, sym, this.factor ?? undefined);
    } catch (e) {
      this.factoredValues = null; // the reused storage is spoilt
      throw e;
    }
    if (!last) this.factoredValues = v.slice(); else last.set(v);
    return this.factor;
  }

  /** The free–free values the current factor was made from. */
  private factoredValues: Float64Array | null = null;

  /** Machine force along the load direction: Σ w·f over the driven dofs. */
  loadForce(f: Float64Array): number {
    const { load, loadW } = this.driven;
    let F = 0;
    for (let i = 0; i < load.length; i++) F += loadW[i] * f[load[i]];
    // slaved points carry the share of the machine force their λ-coefficient gives them
    const S = this.driven.slaves;
    if (S) for (let k = 0; k < S.slave.length; k++) F += S.slaveZ[k] * f[S.slave[k]];
    return F;
  }

  gaugeReading(u: Float64Array): number {
    const { gauge, gaugeW } = this.driven;
    let g = 0;
    for (let i = 0; i < gauge.length; i++) g += gaugeW[i] * u[gauge[i]];
    return g;
  }

  /**
   * The crack opening summed over all face pairs, Σ A·w (mm³), as a gauge: it grows while
   * the cracks open even where the load and the mouth opening both turn back (snap-back).
   * Built on first use; the pairs only change with the topology.
   */
  get openingGauge(): { gauge: Int32Array; gaugeW: Float64Array } {
    if (this.opening) return this.opening;
    const P = this.pairs, n = P.plus.length;
    const gauge = new Int32Array(4 * n), gaugeW = new Float64Array(4 * n);
    for (let p = 0; p < n; p++) {
      const a = P.plus[p], b = P.minus[p], A = P.area[p];
      gauge.set([2 * a, 2 * a + 1, 2 * b, 2 * b + 1], 4 * p);
      gaugeW.set([A * P.nx[p], A * P.ny[p], -A * P.nx[p], -A * P.ny[p]], 4 * p);
    }
    this.opening = { gauge, gaugeW };
    return this.opening;
  }

  private opening: { gauge: Int32Array; gaugeW: Float64Array } | null = null;

  /** Σ A·w of displacement u (mm³). */
  openingReading(u: Float64Array): number {
    const { gauge, gaugeW } = this.openingGauge;
    let g = 0;
    for (let i = 0; i < gauge.length; i++) g += gaugeW[i] * u[gauge[i]];
    return g;
  }

  get cellBlocks(): number { return this.nCellBlocks; }
}

/** The cached cell has the same vertices, in the same order, at the same places. */
/** Stable vertex ids and coordinates of the cell cellVerts[s..e) of mesh, as a cache keeps them. */
export function cellIdentity(mesh: PolyMesh, vertexId: Int32Array, s: number, e: number): CellIdentity {
  const verts = new Int32Array(e - s), xy = new Float64Array(2 * (e - s));
  for (let k = s; k < e; k++) {
    const v = mesh.cellVerts[k];
    verts[k - s] = vertexId[v]; xy[2 * (k - s)] = mesh.xy[2 * v]; xy[2 * (k - s) + 1] = mesh.xy[2 * v + 1];
  }
  return { verts, xy };
}

/** The cached cell is the cell cellVerts[s..e) of mesh: same stable vertex ids, same coordinates. */
export function sameCell(hit: CellIdentity, mesh: PolyMesh, vertexId: Int32Array, s: number, e: number): boolean {
  if (hit.verts.length !== e - s) return false;
  for (let k = s; k < e; k++) {
    const v = mesh.cellVerts[k], i = k - s;
    if (hit.verts[i] !== vertexId[v] || hit.xy[2 * i] !== mesh.xy[2 * v] || hit.xy[2 * i + 1] !== mesh.xy[2 * v + 1]) return false;
  }
  return true;
}

/** A cache entry as one object literal (one shape for all entries, which the identity checks read often). */
function cachedCell(mesh: PolyMesh, vertexId: Int32Array, s: number, e: number, Ke: Float64Array): CellIdentity & { Ke: Float64Array } {
  const { verts, xy } = cellIdentity(mesh, vertexId, s, e);
  return { verts, xy, Ke };
}

/** Stable ids of the face-pair vertices. */
function faceIds(pairs: PairGeom, vertexId: Int32Array): Int32Array {
  const f = new Int32Array(2 * pairs.plus.length);
  for (let p = 0; p < pairs.plus.length; p++) { f[2 * p] = vertexId[pairs.plus[p]]; f[2 * p + 1] = vertexId[pairs.minus[p]]; }
  return f;
}

/** Rows assembled afresh and rows in all, summed over the carried assemblies of this process (tests read them). */
export const carryStats = { fresh: 0, rows: 0 };

/**
 * The bulk matrix assembled from the cache's last one (carry.ts): element matrices from the
 * cache where the cell is unchanged, rows afresh around every changed, new or removed cell and
 * every face pair of either topology; the positions of the face pairs' 4×4 blocks.
 */
function carryFrom(reuse: ElementReuse, mesh: PolyMesh, D: Float64Array, t: number, pairs: PairGeom, maxn: number): { matrix: CsrMatrix; pairMap: Int32Array; pairOff: Int32Array } {
  const last = reuse.cache.last!, nv = mesh.xy.length >> 1, nc = mesh.cellStart.length - 1, np = pairs.plus.length;
  const vid = reuse.vertexId, old = reuse.cache.entries;
  const Kc: Float64Array[] = new Array(nc), dirty = new Uint8Array(nv);
  let maxId = 0, maxKey = 0;
  for (let i = 0; i < nv; i++) if (vid[i] > maxId) maxId = vid[i];
  for (let c = 0; c < nc; c++) if (reuse.cellKey[c] > maxKey) maxKey = reuse.cellKey[c];
  const co = compactOfStable(vid, maxId + 1), at = (id: number) => (id <= maxId ? co[id] : -1);
  const gone = (e: CellIdentity) => { for (let k = 0; k < e.verts.length; k++) { const v = at(e.verts[k]); if (v >= 0) dirty[v] = 1; } };
  // the cache is updated in place (a new map per topology costs more than the few changes)
  const fresh = new Map<number, CellIdentity & { Ke: Float64Array }>(), present = new Uint8Array(maxKey + 1);
  const Ke = new Float64Array(4 * maxn * maxn), work = new ElementWork(maxn), stab = reuse?.cache.stabilisation ?? DEFAULT_STABILISATION;
  for (let c = 0; c < nc; c++) {
    const s = mesh.cellStart[c], e = mesh.cellStart[c + 1], m = 2 * (e - s);
    const key = reuse.cellKey[c], hit = old.get(key);
    present[key] = 1;
    if (hit && sameCell(hit, mesh, vid, s, e)) { Kc[c] = hit.Ke; continue; }
    elementStiffness(mesh.xy, mesh.cellVerts, s, e, D, t, Ke, work, stab);
    Kc[c] = Ke.slice(0, m * m);
    fresh.set(key, cachedCell(mesh, vid, s, e, Kc[c]));
    for (let k = s; k < e; k++) dirty[mesh.cellVerts[k]] = 1;
  }
  // vertices of cells gone (or changed) since the last topology, and the faces of both
  for (const [key, e] of old) if (key > maxKey || !present[key] || fresh.has(key)) gone(e);
  for (let k = 0; k < last.faces.length; k++) { const v = at(last.faces[k]); if (v >= 0) dirty[v] = 1; }
  for (let p = 0; p < np; p++) { dirty[pairs.plus[p]] = 1; dirty[pairs.minus[p]] = 1; }
  const matrix = carryBulk(last, mesh, vid, Kc, dirty, pairs);
  for (const key of old.keys()) if (key > maxKey || !present[key]) old.delete(key);
  for (const [key, e] of fresh) old.set(key, e);
  let nd = 0;
  for (let v = 0; v < nv; v++) nd += dirty[v];
  carryStats.fresh += 2 * nd; carryStats.rows += 2 * nv;
  const pairMap = new Int32Array(16 * np), pairOff = new Int32Array(np);
  for (let p = 0; p < np; p++) {
    pairOff[p] = 16 * p;
    const d = [2 * pairs.plus[p], 2 * pairs.plus[p] + 1, 2 * pairs.minus[p], 2 * pairs.minus[p] + 1];
    for (let i = 0; i < 4; i++) for (let j = 0; j < 4; j++) pairMap[16 * p + 4 * i + j] = findEntry(matrix, d[i], d[j]);
  }
  return { matrix, pairMap, pairOff };
}
