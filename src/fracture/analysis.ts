// The staggered loop: solve equilibrium at the control level, check the tips, grow and
// re-solve at the same level until no tip meets the criterion, then advance the control.
import type { CaseModel } from '../case/model.js';
import type { PolyMesh } from '../mesh/polymesh.js';
import { makeLaw } from '../cohesive/laws.js';
import { interfaceEnergy, penaltyFor, type CohesiveParams } from '../cohesive/interface.js';
import { elasticMatrix } from '../vem/material.js';
import { cellAreas, cellStresses, vertexStresses } from '../vem/stress.js';
import { System, type PairGeom, type DrivenDofs } from '../solver/system.js';
import { NewtonWork, solveStep, type StepState, type NewtonOptions } from '../solver/newton.js';
import { selectDriven, boundaryVertices, type Driven } from '../solver/driven.js';
import { RunStopped } from '../errors.js';
import { submatrixInto, type CsrMatrix } from '../linalg/index.js';
import { WorkMesh } from './workmesh.js';
import { cutRay, twinAlong, defaultCut } from './cut.js';
import { refineAround, coarsenAway } from './adapt.js';
import { tipStress, growthDirection, hoopDirection } from './criterion.js';
import { meshState, restoreMesh, type AnalysisState, type LoopState, type Peak } from './checkpoint.js';
import { measureTips, tipRows, type TipMeasure, type TipRow } from './tips.js';

export interface StepRow {
  step: number; control: number; load_N: number; displacement_mm: number; cmod_mm: number | null;
  crack_length_mm: number; tip_x_mm: number | null; tip_y_mm: number | null;
  external_work_Nmm: number; elastic_energy_Nmm: number; dissipated_Nmm: number; iterations: number;
}

export interface ProbeRow { step: number; probe: string; x_mm: number; y_mm: number; ux_mm: number; uy_mm: number; sxx_MPa: number; syy_MPa: number; sxy_MPa: number; s1_MPa: number }

export interface CohesiveSegment { x1: number; y1: number; x2: number; y2: number; damage: number }

/** What a picture of one state needs. */
export interface Snapshot {
  step: number; mesh: PolyMesh; u: Float64Array; cellStress: Float64Array;
  cracks: { points: [number, number][]; kind: 'notch' | 'crack' }[];
  cohesive: CohesiveSegment[];
  row: StepRow;
}

export interface StepEvent { row: StepRow; probes: ProbeRow[]; tips: TipRow[]; snapshot: () => Snapshot }

export interface Crack { kind: 'notch' | 'cohesive'; path: number[]; twins: number[] }
/** A crack tip; `slit` is the traction-free slit it starts from (index into cracks, −1 if none). */
export interface Tip { crack: number; v: number; dx: number; dy: number; back: [number, number] | null; active: boolean; slit?: number; partner?: number }

export interface AnalysisOptions {
  /** Refuse meshes above this many dofs. */
  maxDofs?: number;
  /** Growth events allowed at one control level before the load advances anyway. */
  maxGrowthPerStep?: number;
  /** Hand the state to run()'s onCheckpoint after every this many converged steps (0: only when interrupted). */
  checkpointEvery?: number;
}

export interface AnalysisResult {
  status: 'complete' | 'stopped' | 'interrupted' | 'failed';
  reason: string;
  /** With status failed: what went wrong inside (a fault of the program, not of the case). */
  error?: unknown;
  rows: StepRow[];
  peak: Peak;
  crackPaths: [number, number][][];
  dofs: { initial: number; final: number; max: number };
  mesh: { polygons: number; vertices: number };
  probes: ProbeRow[];
  timings_s: { solve: number };
}

export class Analysis {
  readonly wm: WorkMesh;
  readonly cracks: Crack[] = [];
  readonly tips: Tip[] = [];
  private readonly D: Float64Array;
  private readonly coh: CohesiveParams;
  private readonly driven: Driven;
  private readonly kappa = new Map<number, number>();
  private uw: Float64Array;
  private lambda = 0;
  private sys!: System;
  private work!: NewtonWork;
  private compact!: ReturnType<WorkMesh['toPolyMesh']>;
  private pairPlus: number[] = [];
  private pairOf = new Map<number, number>();
  /** While set, steps are driven by the total crack opening instead of the case's control (see run()). */
  private opening = false;
  private openingOf: System | null = null;
  private openingCache: { dofs: Int32Array; w: Float64Array } | null = null;
  /** Largest |load| of the converged steps so far (N), for the secant's last-resort tolerance. */
  private peakLoad = 0;
  private kap = new Float64Array(0);
  private kapTrial = new Float64Array(0);
  private uf = new Float64Array(0);
  private dirty = true;
  readonly rows: StepRow[] = [];
  private W = 0;
  private lastF = 0;
  private lastLambda = 0;
  private iterations = 0;
  readonly dofs = { initial: 0, final: 0, max: 0 };
  private probeVerts: number[] = [];
  private solveTime = 0;
  private lastProbes: ProbeRow[] = [];
  private readonly fScale: number;
  stopRequested: (() => boolean) | null = null;
  /** Set by restore(): the loop goes on from here instead of from the unloaded state. */
  private resumeAt: LoopState | null = null;
  /** Every growth event: tip index, position, chosen direction and whether it was the kink out of the start. */
  readonly growthLog: { tip: number; x: number; y: number; dx: number; dy: number; first: boolean; sxx: number; syy: number; sxy: number }[] = [];

  constructor(readonly c: CaseModel, initial: PolyMesh, private readonly opt: AnalysisOptions = {}) {
    this.wm = WorkMesh.fromPolyMesh(initial);
    for (let v = 0; v < this.wm.vertexCount; v++) this.wm.pinned[v] = 1;
    this.D = elasticMatrix(c.material.E, c.material.nu, c.model);
    this.coh = { law: makeLaw(c.material.softening, c.material.ft, c.material.GF), penalty: penaltyFor(c.material.E, c.mesh.tipSize), beta: c.material.shearWeight };
    const ext = extent(initial);
    this.driven = selectDriven(c, initial, 1e-6 * ext);
    this.fScale = c.material.ft * c.thickness * ext;
    this.uw = new Float64Array(2 * this.wm.vertexCount);
    for (const p of c.probes) this.probeVerts.push(nearestVertex(initial, p.at[0], p.at[1]));
    this.insertNotchSlits(initial);
    this.placeTips();
  }

  /** Width-0 notches are cut into the mesh as traction-free cracks. */
  private insertNotchSlits(initial: PolyMesh): void {
    const on = boundaryVertices(initial);
    for (const n of this.c.geometry.notches) {
      if (n.width > 0) continue;
      const a = nearestVertex(initial, n.from[0], n.from[1]);
      const L = Math.hypot(n.to[0] - n.from[0], n.to[1] - n.from[1]);
      const dx = (n.to[0] - n.from[0]) / L, dy = (n.to[1] - n.from[1]) / L;
      const cut = cutRay(this.wm, a, dx, dy, L, { snapFraction: 0.02, snapAngle: 0.02 });
      const startOnBoundary = on[a] === 1;
      const tw = twinAlong(this.wm, cut.path, null, startOnBoundary, cut.end === 'boundary');
      this.cracks.push({ kind: 'notch', path: cut.path, twins: tw.map((t) => t[1]) });
    }
  }

  /** A cohesive crack cut in before loading, from a boundary point straight to another (tests, pre-cracked specimens). */
  addCohesiveCut(from: [number, number], to: [number, number]): void {
    const a = this.nearestLive(from[0], from[1]);
    const L = Math.hypot(to[0] - from[0], to[1] - from[1]);
    const cut = cutRay(this.wm, a, (to[0] - from[0]) / L, (to[1] - from[1]) / L, L, { ...defaultCut, snapFraction: 0.1 });
    const tw = twinAlong(this.wm, cut.path, null, true, cut.end === 'boundary');
    this.cracks.push({ kind: 'cohesive', path: cut.path, twins: tw.map((t) => t[1]) });
    this.dirty = true;
  }

  private placeTips(): void {
    const c = this.c, crack = c.crack;
    if (!crack) return;
    if (crack.start === 'notch-tips') {
      let slit = 0;
      for (const n of c.geometry.notches) {
        const L = Math.hypot(n.to[0] - n.from[0], n.to[1] - n.from[1]);
        const dx = (n.to[0] - n.from[0]) / L, dy = (n.to[1] - n.from[1]) / L;
        if (n.width > 0) {
          this.tips.push({ crack: -1, v: this.nearestLive(n.to[0], n.to[1]), dx, dy, back: null, active: true });
        } else {
          const k = this.cracks.filter((q) => q.kind === 'notch')[slit++];
          const ki = this.cracks.indexOf(k);
          const end = k.path[k.path.length - 1];
          if (k.twins[k.twins.length - 1] < 0) {
            const prev = k.path[k.path.length - 2];
            this.tips.push({ crack: -1, v: end, dx, dy, back: [this.wm.x[prev], this.wm.y[prev]], active: true, slit: ki });
          }
          if (k.twins[0] < 0) {
            const next = k.path[1];
            this.tips.push({ crack: -1, v: k.path[0], dx: -dx, dy: -dy, back: [this.wm.x[next], this.wm.y[next]], active: true, slit: ki });
          }
        }
      }
    } else if (Array.isArray(crack.start)) {
      for (const p of crack.start) this.tips.push({ crack: -1, v: this.nearestLive(p[0], p[1]), dx: 0, dy: 0, back: null, active: true });
    }
    for (const t of this.tips) refineAround(this.wm, this.wm.x[t.v], this.wm.y[t.v], c.mesh.refineRadius, c.mesh.tipSize);
  }

  private nearestLive(x: number, y: number): number {
    let best = -1, bd = Infinity;
    for (let v = 0; v < this.wm.vertexCount; v++) {
      if (this.wm.cellsOf(v).length === 0) continue;
      const d = Math.hypot(this.wm.x[v] - x, this.wm.y[v] - y);
      if (d < bd) { bd = d; best = v; }
    }
    return best;
  }

  /** Rebuild the equations after a mesh change; displacements and histories carry over. */
  private rebuild(): void {
    this.uw = this.wm.extendField(this.uw, 2);
    const cp = this.wm.toPolyMesh();
    this.compact = cp;
    const co = cp.compactOf;
    const nd = 2 * cp.vertexOf.length;
    if (this.opt.maxDofs && nd > this.opt.maxDofs) throw new RunStopped(`the mesh grew to ${nd} dofs, above the limit of ${this.opt.maxDofs}`);
    const dof = (d: { v: number; comp: number }) => 2 * co[d.v] + d.comp;
    const dd: DrivenDofs = {
      fixed: Int32Array.from(this.driven.fixed.filter((d) => co[d.v] >= 0).map(dof)),
      load: Int32Array.from(this.driven.load.filter((d) => co[d.v] >= 0).map(dof)),
      loadW: Float64Array.from(this.driven.load.filter((d) => co[d.v] >= 0).map((d) => d.w)),
      gauge: Int32Array.from(this.driven.gauge.filter((d) => co[d.v] >= 0).map(dof)),
      gaugeW: Float64Array.from(this.driven.gauge.filter((d) => co[d.v] >= 0).map((d) => d.w)),
    };
    const pg = this.pairGeometry(co);
    this.sys = new System(cp.mesh, this.D, this.c.thickness, pg, dd);
    this.work = new NewtonWork(this.sys);
    this.uf = new Float64Array(this.sys.nFree);
    const fd = this.sys.freeDofs, vo = cp.vertexOf;
    for (let i = 0; i < fd.length; i++) this.uf[i] = this.uw[2 * vo[fd[i] >> 1] + (fd[i] & 1)];
    this.kap = Float64Array.from(this.pairPlus.map((v) => this.kappa.get(v) ?? 0));
    this.kapTrial = this.kap.slice();
    if (this.dofs.initial === 0) this.dofs.initial = nd;
    this.dofs.max = Math.max(this.dofs.max, nd);
    this.dofs.final = nd;
    this.dirty = false;
  }

  /** Node pairs of the cohesive cracks with their normals and tributary face areas. */
  private pairGeometry(co: Int32Array): PairGeom {
    const plus: number[] = [], minus: number[] = [], nx: number[] = [], ny: number[] = [], area: number[] = [];
    const { x, y } = this.wm;
    for (const k of this.cracks) {
      if (k.kind !== 'cohesive') continue;
      const P = k.path, n = P.length;
      for (let i = 0; i < n; i++) {
        if (k.twins[i] < 0) continue;
        const a = i > 0 ? P[i - 1] : P[i], b = i + 1 < n ? P[i + 1] : P[i];
        const tx = x[b] - x[a], ty = y[b] - y[a], L = Math.hypot(tx, ty);
        const len = 0.5 * ((i > 0 ? Math.hypot(x[P[i]] - x[P[i - 1]], y[P[i]] - y[P[i - 1]]) : 0)
          + (i + 1 < n ? Math.hypot(x[P[i + 1]] - x[P[i]], y[P[i + 1]] - y[P[i]]) : 0));
        plus.push(co[P[i]]); minus.push(co[k.twins[i]]);
        // plus = left face; its normal points from the minus (right) face to it
        nx.push(-ty / L); ny.push(tx / L); area.push(len * this.c.thickness);
      }
    }
    this.pairPlus = [];
    for (const k of this.cracks) if (k.kind === 'cohesive') k.path.forEach((v, i) => { if (k.twins[i] >= 0) this.pairPlus.push(v); });
    this.pairOf = new Map(this.pairPlus.map((v, i) => [v, i]));
    return { plus: Int32Array.from(plus), minus: Int32Array.from(minus), nx: Float64Array.from(nx), ny: Float64Array.from(ny), area: Float64Array.from(area) };
  }

  private newtonOptions(target: number): NewtonOptions {
    const kind = this.opening ? 'cmod' : this.c.control.by;
    const tolG = kind === 'force' ? 1e-8 * this.fScale : 1e-9 * Math.max(Math.abs(target), 1e-3);
    return { maxIter: 25, tolF: 1e-7 * this.fScale, tolG, floor: 1e-9 * this.coh.penalty };
  }

  /** Solve at one control level from the current state; false (state restored) on failure. */
  private solveAt(target: number): { ok: boolean; reason: string } {
    if (this.dirty) this.rebuild();
    let st: StepState = { uf: this.uf.slice(), lambda: this.lambda };
    const t0 = performance.now();
    const kind = this.opening ? 'cmod' : this.c.control.by;
    const gauge = this.sys.driven.gauge, gaugeW = this.sys.driven.gaugeW;
    if (this.opening) { const g = this.openingGauge(); this.sys.driven.gauge = g.dofs; this.sys.driven.gaugeW = g.w; }
    try {
      return this.solveWith(kind, target, st, t0);
    } finally {
      this.sys.driven.gauge = gauge; this.sys.driven.gaugeW = gaugeW;
    }
  }

  /**
   * The crack opening summed over all face pairs, Σ A·w (mm³), as a gauge: it grows while
   * the cracks open even where the load and the mouth opening both turn back (snap-back).
   */
  private openingGauge(): { dofs: Int32Array; w: Float64Array } {
    if (this.openingOf === this.sys) return this.openingCache!;
    const P = this.sys.pairs, n = P.plus.length;
    const dofs = new Int32Array(4 * n), w = new Float64Array(4 * n);
    for (let p = 0; p < n; p++) {
      const a = P.plus[p], b = P.minus[p], A = P.area[p];
      dofs.set([2 * a, 2 * a + 1, 2 * b, 2 * b + 1], 4 * p);
      w.set([A * P.nx[p], A * P.ny[p], -A * P.nx[p], -A * P.ny[p]], 4 * p);
    }
    // once per topology: the pairs only change with the mesh
    this.openingOf = this.sys; this.openingCache = { dofs, w };
    return this.openingCache;
  }

  /** Σ A·w of the current state (mm³). */
  private openingVolume(): number {
    const g = this.openingGauge(), u = this.work.u;
    let v = 0;
    for (let i = 0; i < g.dofs.length; i++) v += g.w[i] * u[g.dofs[i]];
    return v;
  }

  private solveWith(kind: 'displacement' | 'cmod' | 'force', target: number, st: StepState, t0: number): { ok: boolean; reason: string } {
    let r = solveStep(this.sys, this.coh, this.kap, this.kapTrial, kind, target, st, this.newtonOptions(target), this.work);
    if (!r.converged && this.sys.pairs.plus.length > 0) {
      // points switching between loading and unloading can make Newton cycle: fall back to the secant
      this.iterations += r.iterations;
      st = { uf: this.uf.slice(), lambda: this.lambda };
      r = solveStep(this.sys, this.coh, this.kap, this.kapTrial, kind, target, st, { ...this.newtonOptions(target), maxIter: 300, secant: true, tolFEnd: Math.max(this.newtonOptions(target).tolF, 1e-3 * this.peakLoad) }, this.work);
    }
    this.solveTime += performance.now() - t0;
    this.iterations += r.iterations;
    if (!r.converged) return { ok: false, reason: r.reason === 'non-finite residual' ? this.nonFinitePlace() : r.reason };
    this.uf.set(st.uf); this.lambda = st.lambda;
    // carry the solution to the stable vertex ids
    const u = this.work.u, vo = this.compact.vertexOf;
    for (let i = 0; i < vo.length; i++) { this.uw[2 * vo[i]] = u[2 * i]; this.uw[2 * vo[i] + 1] = u[2 * i + 1]; }
    const F = this.sys.loadForce(this.work.f);
    this.W += 0.5 * (F + this.lastF) * (this.lambda - this.lastLambda);
    this.lastF = F; this.lastLambda = this.lambda;
    return { ok: true, reason: '' };
  }

  /** Which value of the last equilibrium evaluation is NaN or infinite, and where. */
  private nonFinitePlace(): string {
    const u = this.work.u, f = this.work.f, xy = this.sys.mesh.xy;
    for (let i = 0; i < u.length; i++) {
      const bad = !Number.isFinite(u[i]) ? ['displacement', u[i]] as const : !Number.isFinite(f[i]) ? ['internal force', f[i]] as const : null;
      if (!bad) continue;
      const v = i >> 1;
      return `the ${bad[0]} ${i & 1 ? 'uy' : 'ux'} became ${bad[1]} at the vertex near [${xy[2 * v].toFixed(2)}, ${xy[2 * v + 1].toFixed(2)}] mm`;
    }
    return `the control equation (${this.c.control.by}) became NaN or infinite`;
  }

  /** Largest softening of any cohesive point in the trial state, as a fraction of ft; the
   * step that takes a point over its peak counts five times, so the peak load is caught. */
  private softeningJump(): number {
    const law = this.coh.law, l0 = law.ft / this.coh.penalty;
    const tau = (k: number) => (k <= l0 ? this.coh.penalty * k : law.stress(k - l0));
    let worst = 0;
    for (let p = 0; p < this.kap.length; p++) {
      const k0 = this.kap[p], k1 = this.kapTrial[p];
      if (k1 <= l0 || k1 <= k0) continue;
      const drop = k0 <= l0 ? 10 * (law.ft - tau(k1)) : tau(k0) - tau(k1);
      if (drop > worst) worst = drop;
    }
    return worst / law.ft;
  }

  /**
   * One step driven by the total crack opening Σ A·w, 2 % more than in the last converged
   * state (less while the cohesive stresses would fall too far in one step). Returns the
   * opening reached, or null (state as saved) when there are no open faces or no step
   * converges.
   */
  private openingStep(saved: ReturnType<Analysis['saveState']>): number | null {
    if (this.sys.pairs.plus.length === 0) return null;
    this.sys.expand(this.uf, this.lambda, this.work.u);
    const V0 = this.openingVolume();
    if (!(V0 > 0)) return null;
    let dV = 0.02 * V0;
    for (let k = 0; k < 6; k++) {
      this.opening = true;
      const r = this.solveAt(V0 + dV);
      this.opening = false;
      if (r.ok && (k === 5 || this.softeningJump() <= 0.05)) return V0 + dV;
      this.restoreState(saved);
      dV /= 2;
    }
    return null;
  }

  /** The mesh, cracks and tips as they are, for undoing a growth that did not converge. */
  private geometryState() {
    return { mesh: meshState(this.wm), cracks: structuredClone(this.cracks), tips: structuredClone(this.tips), log: this.growthLog.length };
  }

  private restoreGeometry(g: ReturnType<Analysis['geometryState']>): void {
    restoreMesh(this.wm, g.mesh);
    this.cracks.splice(0, this.cracks.length, ...g.cracks);
    this.tips.splice(0, this.tips.length, ...g.tips);
    this.growthLog.length = g.log;
    this.dirty = true;
  }

  private saveState() {
    return { uf: this.uf.slice(), lambda: this.lambda, W: this.W, lastF: this.lastF, lastLambda: this.lastLambda, uw: this.uw.slice() };
  }

  private restoreState(s: ReturnType<Analysis['saveState']>): void {
    this.uf.set(s.uf); this.lambda = s.lambda; this.W = s.W; this.lastF = s.lastF; this.lastLambda = s.lastLambda;
    this.uw = s.uw; this.kapTrial.set(this.kap);
  }

  /** Check every active tip; grow those that meet the criterion. Returns how many grew. */
  /** Cell stresses, areas and centroids of the current state, for the tip checks. */
  private fields() {
    const m = this.sys.mesh;
    const stress = cellStresses(m, this.work.u, this.D);
    const areas = cellAreas(m);
    const nc = m.cellStart.length - 1, cent = new Float64Array(2 * nc);
    for (let c = 0; c < nc; c++) {
      const cc = this.wm.centroid(this.compact.cellOf[c]);
      cent[2 * c] = cc[0]; cent[2 * c + 1] = cc[1];
    }
    return { m, stress, areas, cent };
  }

  /** The fraction of ft at which the next segment is laid ahead of a tip. */
  private get insertAt(): number { return this.c.crack?.insertAt ?? 1; }

  /**
   * How close tip t is to laying its next segment (≥ 1: lay it). The segment is laid intact
   * (the penalty branch of the law), so it changes the response very little until its
   * traction reaches ft; laying it before that keeps the faces from taking more than ft at
   * insertion, where the energy above the law would be lost. A tip without faces lays its
   * first segment as soon as the stress ahead of it is tensile (the bulk is linear, so the
   * direction does not depend on the load level). A grown tip lays the next one when either
   *  - the averaged stress ahead reaches insertAt·ft while the laid interface is short (the
   *    crack's front, the nearest face pair whose traction has reached insertAt·ft, lies
   *    within one growth step of the tip), or
   *  - the face pair next to the tip reaches insertAt·ft: the cohesive zone has caught up
   *    with the end of the interface (an average that takes in a compressed zone ahead, a
   *    beam near its top, would otherwise hold the tip back while its faces are overloaded).
   */
  private readiness(t: Tip, s1: number): number {
    if (t.crack < 0) return s1 > 0 ? Infinity : 0;
    const a = this.insertAt, crack = this.c.crack!, ft = this.c.material.ft;
    const byStress = this.frontDistance(t, a) <= crack.growthStep * (1 + 1e-9) ? s1 / (a * ft) : 0;
    return Math.max(byStress, this.endPairLoad(t) / a);
  }

  /** Traction of the face pair next to a grown tip over ft, in the trial state (past the peak: more than 1). */
  private endPairLoad(t: Tip): number {
    if (t.crack < 0) return 0;
    const k = this.cracks[t.crack], P = k.path, n = P.length, fromEnd = P[n - 1] === t.v;
    for (let j = 0; j < n; j++) {
      const i = fromEnd ? n - 1 - j : j;
      if (k.twins[i] < 0) continue;
      const p = this.pairOf.get(P[i]);
      return p === undefined ? 0 : this.kapTrial[p] * this.coh.penalty / this.coh.law.ft;
    }
    return 0;
  }

  /** Length along the crack from tip t back to the nearest face pair whose traction has reached a·ft (Infinity if none). */
  private frontDistance(t: Tip, a: number): number {
    const k = this.cracks[t.crack], P = k.path, n = P.length, fromEnd = P[n - 1] === t.v;
    const { x, y } = this.wm, reach = a * this.coh.law.ft / this.coh.penalty;
    let d = 0;
    for (let j = 0; j < n; j++) {
      const i = fromEnd ? n - 1 - j : j;
      if (j > 0) { const q = fromEnd ? P[i + 1] : P[i - 1]; d += Math.hypot(x[P[i]] - x[q], y[P[i]] - y[q]); }
      if (k.twins[i] < 0) continue;
      const p = this.pairOf.get(P[i]);
      if (p !== undefined && this.kapTrial[p] >= reach) return d;
    }
    return Infinity;
  }

  /** Largest readiness among the active tips (0 without tips): more than a little over 1 and the step was too long. */
  private tipOvershoot(): number {
    if (!this.c.crack || !this.tips.some((t) => t.active)) return 0;
    const { m, stress, areas, cent } = this.fields();
    let worst = 0;
    for (const t of this.tips) {
      // a tip without faces lays its first segment at any load
      if (!t.active || t.crack < 0) continue;
      const ts = tipStress(m, stress, cent, areas, this.wm.x[t.v], this.wm.y[t.v], t.dx, t.dy, this.c.crack.averagingRadius, 2);
      // past its peak the end pair's ratio grows fast; any value over the limit only cuts the step
      worst = Math.max(worst, Math.min(10, this.readiness(t, ts.s1)));
    }
    return worst;
  }

  /**
   * `crack.start: anywhere`: once the major principal stress of some cell, away from the
   * supports and load points, reaches ft, a crack starts at the vertex nearest to it,
   * perpendicular to that stress; inside the material it gets two tips running apart.
   */
  private initiate(): number {
    const c = this.c, crack = c.crack!;
    if (crack.start !== 'anywhere' || this.tips.length > 0) return 0;
    const { m, stress, cent } = this.fields();
    const keep = Math.max(2 * c.mesh.tipSize, crack.averagingRadius);
    const away: { x: number; y: number; r: number }[] = [];
    for (const q of [...c.supports, ...c.loads]) {
      const pts = q.at ? [q.at] : q.along ? [q.along[0], q.along[1], [(q.along[0][0] + q.along[1][0]) / 2, (q.along[0][1] + q.along[1][1]) / 2]] : [];
      for (const p of pts) away.push({ x: p[0], y: p[1], r: q.width / 2 + keep + (q.along ? Math.hypot(q.along[1][0] - q.along[0][0], q.along[1][1] - q.along[0][1]) / 2 : 0) });
    }
    let best = -1, bestS = -Infinity;
    for (let k = 0; k < m.cellStart.length - 1; k++) {
      const x = cent[2 * k], y = cent[2 * k + 1];
      if (away.some((a) => Math.hypot(x - a.x, y - a.y) < a.r)) continue;
      const sxx = stress[3 * k], syy = stress[3 * k + 1], sxy = stress[3 * k + 2];
      const s1 = (sxx + syy) / 2 + Math.hypot((sxx - syy) / 2, sxy);
      if (s1 > bestS) { bestS = s1; best = k; }
    }
    if (best < 0 || bestS < c.material.ft) return 0;
    const x = cent[2 * best], y = cent[2 * best + 1];
    const v = this.nearestLive(x, y);
    const ts = tipStress(m, stress, cent, cellAreas(m), this.wm.x[v], this.wm.y[v], 0, 0, crack.averagingRadius, 0);
    const [dx, dy] = growthDirection(ts, 1, 0);
    const onEdge = this.onOutline(v);
    if (onEdge) {
      // from the boundary the crack runs into the material
      const sgn = dx * (x - this.wm.x[v]) + dy * (y - this.wm.y[v]) >= 0 ? 1 : -1;
      this.tips.push({ crack: -1, v, dx: sgn * dx, dy: sgn * dy, back: null, active: true });
    } else {
      const a = this.tips.length;
      this.tips.push({ crack: -1, v, dx, dy, back: null, active: true, partner: a + 1 });
      this.tips.push({ crack: -1, v, dx: -dx, dy: -dy, back: null, active: true, partner: a });
    }
    refineAround(this.wm, this.wm.x[v], this.wm.y[v], c.mesh.refineRadius, c.mesh.tipSize);
    this.dirty = true;
    return 1;
  }

  /** Distance from (x, y) to the nearest load or support (a point, a bearing strip or a segment). */
  private contactRoom(x: number, y: number): number {
    let room = Infinity;
    for (const q of [...this.c.supports, ...this.c.loads]) {
      const [p0, p1] = q.along ?? [q.at!, q.at!];
      const ex = p1[0] - p0[0], ey = p1[1] - p0[1], L2 = ex * ex + ey * ey;
      const s = L2 > 0 ? Math.max(0, Math.min(1, ((x - p0[0]) * ex + (y - p0[1]) * ey) / L2)) : 0;
      room = Math.min(room, Math.hypot(x - p0[0] - s * ex, y - p0[1] - s * ey) - q.width / 2);
    }
    return room;
  }

  /** Vertex v lies on the outline (an edge of it has one cell only). */
  private onOutline(v: number): boolean {
    for (const c of this.wm.cellsOf(v)) {
      const vs = this.wm.cells[c]!, n = vs.length, k = vs.indexOf(v);
      if (this.wm.neighbourAcross(c, v, vs[(k + 1) % n]) < 0 || this.wm.neighbourAcross(c, vs[(k + n - 1) % n], v) < 0) return true;
    }
    return false;
  }

  private grow(): number {
    const crack = this.c.crack!;
    if (this.initiate() > 0) return 1;
    const { m, stress, areas, cent } = this.fields();
    // K at the slit tips of the state before any cut of this round (the mesh changes as tips grow)
    let measured: TipMeasure[] | null = null;
    let grown = 0;
    for (const t of this.tips) {
      if (!t.active) continue;
      const tx = this.wm.x[t.v], ty = this.wm.y[t.v];
      const ts = tipStress(m, stress, cent, areas, tx, ty, t.dx, t.dy, crack.averagingRadius, 2);
      if (this.readiness(t, ts.s1) < 1) continue;
      // The stress at a cohesive tip is nearly isotropic (on faces carrying a uniform traction
      // the stress along the crack equals the traction across it), so its principal axes say
      // little about the path. The mode mixity does: sliding over opening of the faces behind
      // the tip gives K_II/K_I, and the kink follows the maximum tangential stress. A tip with
      // no faces yet (a blunt notch) follows the largest hoop stress around it; a fresh start
      // point with no direction grows perpendicular to the major principal stress.
      // Out of a sharp slit the first segment follows the maximum tangential stress criterion
      // with K_I and K_II from the interaction integral.
      let slitDir: [number, number] | null = null;
      if ((t.crack < 0 && t.slit !== undefined && t.slit >= 0) ) {
        measured ??= this.tipFactors();
        const k = measured.find((q) => q.v === t.v);
        if (k && k.kink !== null && k.KI !== null && k.KI > 0) slitDir = [Math.cos(k.kink), Math.sin(k.kink)];
      }
      const faces = t.crack >= 0 ? t.crack : t.slit !== undefined && t.slit >= 0 ? t.slit : -1;
      let [gx, gy] = slitDir ?? (faces >= 0 ? this.faceKink(faces, t, crack.averagingRadius) : null)
        ?? (t.dx !== 0 || t.dy !== 0
          ? hoopDirection(m, stress, cent, areas, tx, ty, t.dx, t.dy, crack.averagingRadius)
          : growthDirection(ts, t.dx, t.dy));
      // after the first segment a crack turns smoothly: at most MAX_TURN per growth step
      if (t.crack >= 0) [gx, gy] = limitTurn(t.dx, t.dy, gx, gy, MAX_TURN);
      this.growthLog.push({ tip: this.tips.indexOf(t), x: tx, y: ty, dx: gx, dy: gy, first: t.crack < 0, sxx: ts.sxx, syy: ts.syy, sxy: ts.sxy });
      // a crack stops a tip cell short of where the machine or a support touches the
      // specimen: cut through a loaded point, the halves would hang on one vertex
      const len = Math.min(crack.growthStep, this.contactRoom(tx, ty) - this.c.mesh.tipSize);
      if (len < 0.5 * this.c.mesh.tipSize) { t.active = false; continue; }
      const cut = cutRay(this.wm, t.v, gx, gy, len, GROWTH_CUT);
      if (cut.path.length < 2) { t.active = false; continue; }
      if (t.crack < 0) { this.cracks.push({ kind: 'cohesive', path: [t.v], twins: [-1] }); t.crack = this.cracks.length - 1; }
      const k = this.cracks[t.crack];
      const through = cut.end === 'boundary';
      if (cut.end === 'crack') t.active = false;
      // an interior start stays one vertex until its partner tip has cut the other way
      const partner = t.partner !== undefined ? this.tips[t.partner] : null;
      const interiorStart = t.back === null && partner !== null && partner.crack < 0;
      const tw = twinAlong(this.wm, cut.path, t.back, !interiorStart, through);
      if (interiorStart) partner!.back = [this.wm.x[cut.path[1]], this.wm.y[cut.path[1]]];
      k.twins[k.twins.length - 1] = tw[0][1];
      for (let i = 1; i < cut.path.length; i++) { k.path.push(cut.path[i]); k.twins.push(tw[i][1]); }
      const end = cut.path[cut.path.length - 1], prev = cut.path[cut.path.length - 2];
      t.back = [this.wm.x[prev], this.wm.y[prev]];
      const L = Math.hypot(this.wm.x[end] - tx, this.wm.y[end] - ty);
      t.dx = (this.wm.x[end] - tx) / L; t.dy = (this.wm.y[end] - ty) / L;
      t.v = end;
      if (through) t.active = false;
      else refineAround(this.wm, this.wm.x[end], this.wm.y[end], this.c.mesh.refineRadius, this.c.mesh.tipSize);
      grown++;
    }
    if (grown > 0) {
      const at = this.tips.filter((t) => t.active).map((t) => [this.wm.x[t.v], this.wm.y[t.v]] as [number, number]);
      if (this.c.mesh.coarsen && at.length > 0) {
        coarsenAway(this.wm, at, 2 * this.c.mesh.refineRadius + 2 * this.c.mesh.size);
      }
      this.dirty = true;
    }
    return grown;
  }

  /**
   * Kink by the maximum tangential stress criterion (Erdogan & Sih 1963) with the mode mixity
   * from the face displacements behind the tip: near a sharp tip the sliding and opening jumps
   * are both ∝ √r with the same factor (κ + 1)/G, so K_II/K_I is their ratio; on intact
   * cohesive faces the jumps are the tractions over the penalty, so the ratio is shear over
   * normal stress on the crack line. Null when the faces are not open.
   */
  private faceKink(crackIndex: number, t: Tip, R: number): [number, number] | null {
    const k = this.cracks[crackIndex], { x, y } = this.wm, u = this.uw;
    const tx = x[t.v], ty = y[t.v], nx = -t.dy, ny = t.dx;
    // the face on the left of the tip's direction
    const pathDir = (x[k.path[k.path.length - 1]] - x[k.path[0]]) * t.dx + (y[k.path[k.path.length - 1]] - y[k.path[0]]) * t.dy;
    let jn = 0, jt = 0;
    for (let i = 0; i < k.path.length; i++) {
      if (k.twins[i] < 0) continue;
      const r = Math.hypot(x[k.path[i]] - tx, y[k.path[i]] - ty);
      if (r <= 0 || r > 1.5 * R) continue;
      const [l, rr] = pathDir > 0 ? [k.path[i], k.twins[i]] : [k.twins[i], k.path[i]];
      const dux = u[2 * l] - u[2 * rr], duy = u[2 * l + 1] - u[2 * rr + 1];
      jn += dux * nx + duy * ny; jt += dux * t.dx + duy * t.dy;
    }
    if (!(jn > 0)) return null;
    // β weighs sliding in the cohesive law; on intact faces s = t_s/(β kp), so undo it there
    const ratio = (k.kind === 'cohesive' ? this.coh.beta : 1) * jt / jn; // K_II / K_I
    const th = Math.abs(ratio) < 1e-12 ? 0 : 2 * Math.atan((1 - Math.sqrt(1 + 8 * ratio * ratio)) / (4 * ratio));
    const c = Math.cos(th), s = Math.sin(th);
    return [c * t.dx - s * t.dy, s * t.dx + c * t.dy];
  }

  /** True once a crack has run from boundary to boundary (its last tip left the material). */
  private separated(): boolean {
    return this.tips.some((t) => !t.active && t.crack >= 0 && this.cracks[t.crack].twins.at(-1)! >= 0);
  }

  private commit(): void {
    this.kap.set(this.kapTrial);
    this.pairPlus.forEach((v, i) => this.kappa.set(v, this.kapTrial[i]));
  }

  private energies(): { elastic: number; dissipated: number } {
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
      const en = interfaceEnergy(this.coh, w, s, this.kap[p]);
      e += en.stored * P.area[p];
      d += en.dissipated * P.area[p];
    }
    return { elastic: e, dissipated: d };
  }

  /**
   * Before loading, every tip that has no faces yet lays its first segment, intact, in the
   * direction the elastic field gives (the bulk is linear, so that direction does not depend
   * on the load level): its faces then take up load gradually instead of starting above ft.
   * The field comes from a trial solve at a small control level, undone afterwards.
   */
  private layFirstSegments(firstIncrement: number): void {
    if (!this.tips.some((t) => t.active && t.crack < 0)) return;
    const saved = this.saveState();
    const r = this.solveAt(1e-3 * firstIncrement);
    if (r.ok) this.grow();
    this.restoreState(saved);
    this.uw.fill(0);
    if (this.dirty) this.rebuild();
    this.uf.fill(0);
  }

  /** Reached ft: the face pair of path vertex v has a history beyond the intact branch. */
  private reached(v: number): boolean {
    const p = this.pairOf.get(v);
    return p !== undefined && this.kap[p] > this.coh.law.ft / this.coh.penalty;
  }

  /**
   * Length of the cohesive cracks, counting only the parts whose faces have reached ft (the
   * segments laid ahead and still intact are not a crack yet). A segment counts when both
   * ends have reached ft, or one end has and the other is the crack's start.
   */
  private crackLength(): number {
    let L = 0;
    const { x, y } = this.wm;
    for (const k of this.cracks) {
      if (k.kind !== 'cohesive') continue;
      const P = k.path, n = P.length;
      const ok = (i: number) => this.reached(P[i]) || (i === 0 && k.twins[0] < 0);
      for (let i = 1; i < n; i++) if (ok(i - 1) && ok(i)) L += Math.hypot(x[P[i]] - x[P[i - 1]], y[P[i]] - y[P[i - 1]]);
    }
    return L;
  }

  /** Where the crack of tip t has reached ft nearest to t (its front): a path vertex, or its start. */
  private frontVertex(t: Tip): number {
    if (t.crack < 0) return t.v;
    const P = this.cracks[t.crack].path, n = P.length, fromEnd = P[n - 1] === t.v;
    for (let j = 0; j < n; j++) { const v = P[fromEnd ? n - 1 - j : j]; if (this.reached(v)) return v; }
    return P[fromEnd ? 0 : n - 1];
  }

  private record(step: number, control: number): StepEvent {
    const en = this.energies();
    const F = this.sys.loadForce(this.work.f);
    const gauge = this.driven.gaugeVerts ? this.sys.gaugeReading(this.work.u) : null;
    const tip = this.tips.find((t) => this.cracks[t.crack]?.kind === 'cohesive') ?? this.tips[0];
    const row: StepRow = {
      step, control, load_N: F, displacement_mm: this.lambda, cmod_mm: gauge,
      crack_length_mm: this.crackLength(),
      tip_x_mm: tip ? this.wm.x[this.frontVertex(tip)] : null, tip_y_mm: tip ? this.wm.y[this.frontVertex(tip)] : null,
      external_work_Nmm: this.W, elastic_energy_Nmm: en.elastic, dissipated_Nmm: en.dissipated,
      iterations: this.iterations,
    };
    // a NaN is stopped where it first shows, before it reaches a file
    for (const [k, v] of Object.entries(row)) {
      if (typeof v === 'number' && !Number.isFinite(v)) throw new RunStopped(`step ${step}: the ${k} came out as ${v} at ${this.c.control.by} ${control.toPrecision(4)}`);
    }
    this.iterations = 0;
    this.rows.push(row);
    const m = this.sys.mesh, u = this.work.u.slice();
    const cs = cellStresses(m, u, this.D);
    const vs = vertexStresses(m, cs, cellAreas(m));
    const probes: ProbeRow[] = this.c.probes.map((p, i) => {
      const v = this.compact.compactOf[this.probeVerts[i]];
      const sxx = vs[3 * v], syy = vs[3 * v + 1], sxy = vs[3 * v + 2];
      return {
        step, probe: p.name, x_mm: m.xy[2 * v], y_mm: m.xy[2 * v + 1], ux_mm: u[2 * v], uy_mm: u[2 * v + 1],
        sxx_MPa: sxx, syy_MPa: syy, sxy_MPa: sxy, s1_MPa: (sxx + syy) / 2 + Math.hypot((sxx - syy) / 2, sxy),
      };
    });
    this.lastProbes = probes;
    const kap = this.kap.slice();
    const snapshot = (): Snapshot => ({
      step, mesh: m, u, cellStress: cs, row,
      cracks: this.crackPolylines(),
      cohesive: this.cohesiveSegments(m, kap),
    });
    return { row, probes, tips: tipRows(step, this.tipDirections(), this.cracks), snapshot };
  }

  /**
   * K and directions at every tip for tips.csv: at a slit the MTS kink of its K; at the end of a
   * cohesive crack the direction the growth criterion takes there (null once the tip has stopped).
   */
  private tipDirections(): TipMeasure[] {
    const out = this.tipFactors();
    for (const m of out) {
      if (this.cracks[m.crack].kind !== 'cohesive') continue;
      const t = this.tips.find((q) => q.active && q.crack === m.crack && q.v === m.v);
      if (!t) { m.kink = null; continue; }
      const [fx, fy] = this.faceKink(t.crack, t, this.c.crack?.averagingRadius ?? 0) ?? [t.dx, t.dy];
      const [gx, gy] = limitTurn(t.dx, t.dy, fx, fy, MAX_TURN);
      m.kink = Math.atan2(gy, gx);
    }
    return out;
  }

  crackPolylines(): { points: [number, number][]; kind: 'notch' | 'crack' }[] {
    return this.cracks.map((k) => ({ kind: k.kind === 'notch' ? 'notch' as const : 'crack' as const, points: k.path.map((v) => [this.wm.x[v], this.wm.y[v]] as [number, number]) }));
  }

  private cohesiveSegments(m: PolyMesh, kap: Float64Array): CohesiveSegment[] {
    const out: CohesiveSegment[] = [];
    const l0 = this.coh.law.ft / this.coh.penalty, wc = this.coh.law.wc;
    const dmg = new Map<number, number>();
    this.pairPlus.forEach((v, i) => dmg.set(v, Math.min(1, Math.max(0, (kap[i] - l0) / wc))));
    for (const k of this.cracks) {
      if (k.kind !== 'cohesive') continue;
      for (let i = 1; i < k.path.length; i++) {
        const a = k.path[i - 1], b = k.path[i];
        out.push({ x1: this.wm.x[a], y1: this.wm.y[a], x2: this.wm.x[b], y2: this.wm.y[b], damage: ((dmg.get(a) ?? 0) + (dmg.get(b) ?? 0)) / 2 });
      }
    }
    void m;
    return out;
  }

  /** Crack face area (mm²) whose traction has reached ft, and the part of it fully separated (no traction left). */
  faceAreas(): { reached_mm2: number; separated_mm2: number } {
    if (this.dirty) this.rebuild();
    const P = this.sys.pairs, l0 = this.coh.law.ft / this.coh.penalty, wc = this.coh.law.wc;
    let reached = 0, separated = 0;
    for (let p = 0; p < P.plus.length; p++) {
      if (this.kap[p] > l0) reached += P.area[p];
      if (this.kap[p] >= l0 + wc) separated += P.area[p];
    }
    return { reached_mm2: reached, separated_mm2: separated };
  }

  /** The constrained bulk stiffness of the current mesh (free dofs only), e.g. for export. */
  stiffnessMatrix(): CsrMatrix {
    if (this.dirty) this.rebuild();
    this.sys.kT.values.set(this.sys.kBulk.values);
    return submatrixInto(this.sys.kT, this.sys.kff);
  }

  /** Stress intensity factors and MTS directions at every slit and crack tip of the last solved state. */
  tipFactors(): TipMeasure[] {
    if (this.dirty) this.rebuild();
    return measureTips(this.wm, this.cracks, this.compact, this.work.u, { E: this.c.material.E, nu: this.c.material.nu, model: this.c.model, D: this.D }, this.c);
  }

  /** Free dofs of the current mesh. */
  get freeDofs(): number { if (this.dirty) this.rebuild(); return this.sys.nFree; }

  /** Everything the loop needs to go on from `at` (deep copies: the run may go on at once). */
  state(at: LoopState): AnalysisState {
    const copy = <T>(v: T): T => structuredClone(v);
    return {
      mesh: meshState(this.wm), cracks: copy(this.cracks), tips: copy(this.tips),
      kappa: [...this.kappa.entries()],
      uw: this.uw.slice(), lambda: this.lambda, W: this.W, lastF: this.lastF, lastLambda: this.lastLambda,
      loop: copy(at), rows: copy(this.rows), lastProbes: copy(this.lastProbes), dofs: { ...this.dofs },
      growthLog: copy(this.growthLog), solveTime: this.solveTime,
    };
  }

  /** Take over a saved state; run() then goes on from its step without recording step 0 again. */
  restore(s: AnalysisState): void {
    restoreMesh(this.wm, s.mesh);
    this.cracks.splice(0, this.cracks.length, ...s.cracks);
    this.tips.splice(0, this.tips.length, ...s.tips);
    this.kappa.clear();
    for (const [v, k] of s.kappa) this.kappa.set(v, k);
    this.uw = s.uw; this.lambda = s.lambda; this.W = s.W; this.lastF = s.lastF; this.lastLambda = s.lastLambda;
    this.rows.splice(0, this.rows.length, ...s.rows);
    this.lastProbes = s.lastProbes;
    Object.assign(this.dofs, s.dofs);
    this.growthLog.splice(0, this.growthLog.length, ...s.growthLog);
    this.solveTime = s.solveTime;
    this.iterations = 0;
    this.resumeAt = structuredClone(s.loop);
    this.peakLoad = Math.abs(s.loop.peak.load_N);
    this.dirty = true;
  }

  /**
   * Run the whole analysis; onStep sees every converged step (step 0 is the unloaded state),
   * onCheckpoint the state every `checkpointEvery` steps and when a stop is requested. The
   * loop position is explicit (LoopState) and only changes between steps, so a run restored
   * from a checkpoint repeats exactly what the uninterrupted run did after it.
   */
  async run(onStep: (e: StepEvent) => void | Promise<void>, onCheckpoint?: (s: AnalysisState) => void | Promise<void>): Promise<AnalysisResult> {
    const c = this.c, ctl = c.control;
    const elastic = !c.crack;
    let status: AnalysisResult['status'] = 'complete', reason = '', failure: unknown;
    const nInc = elastic ? 1 : ctl.increments;
    const full = ctl.target;
    const maxGrowth = this.opt.maxGrowthPerStep ?? 60;
    const every = this.opt.checkpointEvery ?? 0;
    const at: LoopState = this.resumeAt ?? { inc: 1, frac: 1, done: 0, step: 0, peak: { load_N: 0, displacement_mm: 0, cmod_mm: null, step: 0 } };
    // the state after the last converged step: attempts since then have all been undone
    let mark: LoopState = structuredClone(at);
    try {
      this.rebuild();
      if (!this.resumeAt) {
        if (!elastic) this.layFirstSegments(ctl.target / nInc);
        await onStep(this.record(0, 0));
      }
      this.resumeAt = null;
      outer: while (at.inc <= nInc) {
        const goal = full * at.inc / nInc;
        if (!(at.done < goal - 1e-12 * Math.abs(full))) { at.inc++; at.frac = 1; continue; }
        // let signal handlers run between attempts
        if (this.stopRequested) await new Promise<void>((r) => setImmediate(r));
        if (this.stopRequested?.()) {
          status = 'interrupted'; reason = `interrupted by a signal after step ${mark.step}`;
          await onCheckpoint?.(this.state(mark));
          break;
        }
        let target = at.done + Math.min(at.frac * (goal - at.done), goal - at.done);
        if (this.dirty) this.rebuild();
        const saved = this.saveState();
        // while the case's control value still falls back, go on with the crack opening at once
        const skipped = at.opening === true;
        let r = skipped ? { ok: false, reason: '' } : this.solveAt(target);
        this.opening = false;
        if (skipped) at.frac = 1 / 128;
        // the cohesive stress may fall by at most 5 % of ft in one step (0.5 % past a peak),
        // and a tip may not be taken past the point where the segment it lays would start above ft
        if (r.ok && !elastic && at.frac > 1 / 64 && !at.opening && (this.softeningJump() > 0.05 || this.tipOvershoot() > Math.max(1.05, 1 / this.insertAt))) {
          this.restoreState(saved);
          at.frac /= 2;
          continue;
        }
        if (!r.ok) {
          at.frac /= 2;
          if (at.frac < 1 / 64) {
            if (ctl.by === 'force' && at.peak.load_N > 0) { reason = `the load cannot be raised above ${at.peak.load_N.toFixed(1)} N under force control (peak reached)`; break outer; }
            // where the load and the gauge both turn back (snap-back), the total crack opening
            // still grows: let it drive this step
            const V = ctl.by === 'force' ? null : this.openingStep(saved);
            // no opening step either: the case's control has one more go before the run stops
            if (V === null && skipped) { at.opening = false; at.frac = 1 / 32; continue; }
            if (V === null) throw new RunStopped(`step ${at.step + 1} did not converge at ${ctl.by} ${target.toPrecision(4)} after cutting the increment 6 times: ${r.reason}`);
            target = V;
            this.opening = true;
            r = { ok: true, reason: '' };
          } else continue;
        }
        // staggered growth at this control level (or at this crack opening)
        if (!elastic) {
          const before = this.geometryState();
          let failed = '';
          for (let g = 0; g < maxGrowth; g++) {
            if (this.grow() === 0) break;
            const rr = this.solveAt(target);
            // a crack through to the boundary with little load left: the specimen has come apart
            if (!rr.ok && this.separated() && Math.abs(this.lastF) <= 0.25 * Math.abs(at.peak.load_N)) {
              reason = 'a crack has run through the specimen, which has come apart'; break outer;
            }
            if (!rr.ok) { failed = rr.reason; break; }
          }
          if (failed) {
            // undo the growth and the step, and come at it again in a shorter one
            if (this.opening) { this.opening = false; throw new RunStopped(`step ${at.step + 1} did not converge after the crack grew while the crack opening drove the step: ${failed}`); }
            this.restoreGeometry(before);
            // the equations are rebuilt for the old mesh from these (rebuild() sizes uf and the histories)
            this.lambda = saved.lambda; this.W = saved.W; this.lastF = saved.lastF; this.lastLambda = saved.lastLambda;
            this.uw = saved.uw;
            at.frac /= 2;
            if (at.frac < 1 / 64) throw new RunStopped(`step ${at.step + 1} did not converge after the crack grew at ${ctl.by} ${target.toPrecision(4)}, also in shorter steps: ${failed}`);
            continue;
          }
        }
        this.commit();
        let level = target;
        if (this.opening) {
          // the case's control value reached: the gauge reading or the load-point travel
          level = ctl.by === 'cmod' ? this.sys.gaugeReading(this.work.u) : this.lambda;
          this.opening = false;
          at.frac = 1 / 32;
          at.opening = level <= at.done;
          at.done = Math.max(at.done, level);
        } else { at.done = target; at.opening = false; }
        at.step++;
        const ev = this.record(at.step, level);
        this.peakLoad = Math.max(this.peakLoad, Math.abs(ev.row.load_N));
        if (Math.abs(ev.row.load_N) > Math.abs(at.peak.load_N)) at.peak = { load_N: ev.row.load_N, displacement_mm: ev.row.displacement_mm, cmod_mm: ev.row.cmod_mm, step: at.step };
        await onStep(ev);
        if (at.frac < 1) at.frac = Math.min(1, at.frac * 2);
        if (!elastic && ctl.stopAtLoadFraction > 0 && at.step > at.peak.step && Math.abs(ev.row.load_N) <= ctl.stopAtLoadFraction * Math.abs(at.peak.load_N)) {
          reason = `the load fell to ${(100 * ctl.stopAtLoadFraction).toFixed(1)} % of the peak`;
          break outer;
        }
        mark = structuredClone(at);
        if (every > 0 && at.step % every === 0) await onCheckpoint?.(this.state(at));
      }
      if (!reason) reason = elastic ? 'elastic analysis at the control target' : 'control target reached';
    } catch (e) {
      if (e instanceof RunStopped) { status = 'stopped'; reason = e.message; }
      else {
        // the steps so far are sound; the caller writes them up as failed and reports the fault
        status = 'failed'; reason = `internal error after step ${at.step}: ${e instanceof Error ? e.message : String(e)}`; failure = e;
      }
    }
    return {
      status, reason, rows: this.rows, peak: at.peak,
      crackPaths: this.cracks.filter((k) => k.kind === 'cohesive').map((k) => k.path.map((v) => [this.wm.x[v], this.wm.y[v]] as [number, number])),
      dofs: this.dofs,
      mesh: { polygons: this.compact.mesh.cellStart.length - 1, vertices: this.compact.vertexOf.length },
      probes: this.lastProbes,
      timings_s: { solve: this.solveTime / 1000 },
      ...(status === 'failed' ? { error: failure } : {}),
    };
  }
}

/**
 * Cuts of growing cracks keep to the chosen direction: snapping to a vertex within 20 % of an
 * edge or along an edge within 7° turned segments by several degrees, differently at the two
 * tips of a point-symmetric problem and from one mesh seed to the next.
 */
const GROWTH_CUT = { snapFraction: 0.1, snapAngle: 0.03 };

/** Largest turn of a grown crack per growth step (rad). */
const MAX_TURN = Math.PI / 12;

/** Direction (gx, gy) turned back toward (dx, dy) so that it deviates by at most maxTurn. */
function limitTurn(dx: number, dy: number, gx: number, gy: number, maxTurn: number): [number, number] {
  const a = Math.atan2(dx * gy - dy * gx, dx * gx + dy * gy);
  if (Math.abs(a) <= maxTurn) return [gx, gy];
  const b = Math.atan2(dy, dx) + Math.sign(a) * maxTurn;
  return [Math.cos(b), Math.sin(b)];
}

function extent(m: PolyMesh): number {
  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
  for (let i = 0; i < m.xy.length; i += 2) { x0 = Math.min(x0, m.xy[i]); x1 = Math.max(x1, m.xy[i]); y0 = Math.min(y0, m.xy[i + 1]); y1 = Math.max(y1, m.xy[i + 1]); }
  return Math.max(x1 - x0, y1 - y0);
}

function nearestVertex(m: PolyMesh, x: number, y: number): number {
  let best = 0, bd = Infinity;
  for (let v = 0; v < m.xy.length >> 1; v++) { const d = Math.hypot(m.xy[2 * v] - x, m.xy[2 * v + 1] - y); if (d < bd) { bd = d; best = v; } }
  return best;
}
