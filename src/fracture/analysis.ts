// The staggered loop: solve equilibrium at the control level, check the tips, grow and
// re-solve at the same level until no tip meets the criterion, then advance the control.
// Its data live in one plain record (state.ts); the rooms it orchestrates: equations of one
// topology (equations.ts), the growth criterion (criterion.ts), growth (growth.ts),
// recording (record.ts) and step control (steps.ts).
import type { CaseModel } from '../case/model.js';
import type { PolyMesh } from '../mesh/polymesh.js';
import { makeLaw } from '../cohesive/laws.js';
import { penaltyFor, type CohesiveParams } from '../cohesive/interface.js';
import { elasticMatrix } from '../vem/material.js';
import { solveStep, type StepState, type NewtonOptions, type ControlKind } from '../solver/newton.js';
import { selectDriven, withTwins, rigVertices, releaseFrom, bearings, contactUpdate, type Bearing, type Driven } from '../solver/driven.js';
import { ElementCache } from '../solver/system.js';
import type { Stabilisation } from '../vem/element.js';
import { vertexBearings, contactUpdate2 } from '../solver/contact2.js';
import { RunStopped } from '../errors.js';
import type { Cell2, Cell2Cache } from '../vem/dofs2.js';
import type { CsrMatrix } from '../linalg/index.js';
import { WorkMesh } from './workmesh.js';
import { buildDomain, type Domain } from '../geometry/domain.js';
import { strengthOf } from '../cohesive/strength.js';
import { softeningJump, overshootLimit, SOFTENING_LIMIT } from './criterion.js';
import { Equations, type Order2Setup } from './equations.js';
import { insertNotchSlits, placeTips, refineNotchLines, cohesiveCut, grow, tipOvershoot, separated, nearestVertex, tipMeasures, tipDirections, type GrowthRoom } from './growth.js';
import { tipRows, type TipMeasure } from './tips.js';
import { recordStep, crackPolylines, type StepEvent } from './record.js';
import { startState, propose, cut, accept, settle, MIN_FRACTION, WHILE_OPENING, AFTER_OPENING, type StepMode, type StepMeasure, energyJump, ENERGY_STEP, energyCreated, softeningWeights, released, lost, DISSIPATION_STEP, REDO_KEEP } from './steps.js';
import {
  emptyState, save, restore, checkpointState, fromCheckpoint, SOLUTION, GEOMETRY,
  type CrackState, type AnalysisState, type LoopState, type Peak, type Saved,
} from './state.js';

export type { StepRow, ProbeRow, Crack, Tip, GrowthEvent, AnalysisState, LoopState, Peak } from './state.js';
export type { CohesiveSegment, Snapshot, StepEvent } from './record.js';

export interface AnalysisOptions {
  /** Refuse meshes above this many dofs. */
  maxDofs?: number;
  /** Growth events allowed at one control level before the load advances anyway. */
  maxGrowthPerStep?: number;
  /** Hand the state to run()'s onCheckpoint after every this many converged steps (0: only when interrupted). */
  checkpointEvery?: number;
  /** Newton on the bulk condensed onto the crack faces (default true); false iterates on all free unknowns (tests compare the two). */
  condense?: boolean;
  /** Step lengths, over the case's `control.steps`: 'fixed' on the case's increments, 'adaptive' from Newton's iterations, the softening, the tips' readiness and the curve near a peak (tests and benchmarks compare the two). */
  steps?: StepMode;
  /** Order-1 stabilisation (vem/element.ts; default the vertex form): measurements compare the two. */
  stabilisation?: Stabilisation;
  /** A new topology copies the bulk rows its growth left alone (default true); false assembles every topology in full (tests compare the two). */
  carryRows?: boolean;
  /**
   * What drives a step where the case's control cannot (snap-back): 'dissipation' (default),
   * the energy the faces dissipate, with the growth re-solves that would release energy at a
   * fixed control level redone at the dissipation before them; 'opening', the total crack
   * opening Σ A·w alone (tests and measurements compare the two).
   */
  pathDrive?: 'dissipation' | 'opening';
}

export interface AnalysisResult {
  status: 'complete' | 'stopped' | 'interrupted' | 'failed';
  reason: string;
  /** With status failed: what went wrong inside (a fault of the program, not of the case). */
  error?: unknown;
  rows: CrackState['rows'];
  peak: Peak;
  crackPaths: [number, number][][];
  dofs: { initial: number; final: number; max: number };
  mesh: { polygons: number; vertices: number };
  probes: CrackState['lastProbes'];
  timings_s: { solve: number };
}

type Solution = Saved<typeof SOLUTION[number]>;

/** Contact updates tried at one control level before its last solve is taken as it stands. */
export const CONTACT_ROUNDS = 8;

export class Analysis {
  readonly wm: WorkMesh;
  /** Everything the loop keeps between steps (see state.ts). */
  private s: CrackState;
  private readonly D: Float64Array;
  private readonly coh: CohesiveParams;
  private readonly driven: Driven;
  /** Vertices the supports and loads hold (where a crack reaching a loaded face ends). */
  private readonly rig: number[];
  /** Geometric tolerance (mm) the rig was picked with. */
  private readonly tol: number;
  /** The lifted-off strip points the equations were built with. */
  private eqReleased = '';
  private eq!: Equations;
  /** Element stiffnesses of the cells a growth left unchanged, reused by the next topology. */
  private readonly elements: ElementCache;
  /** The same for order 2 (condensed cells on the node mesh and their projections). */
  private readonly cells2: Cell2Cache = new ElementCache<Cell2>();
  /** The mesh or the cracks changed since the equations were built. */
  private dirty = true;
  /** Largest |load| of the converged steps so far (N), for the secant's last-resort tolerance. */
  private peakLoad = 0;
  /** Newton iterations since the last recorded step. */
  private iterations = 0;
  /** What the step controller reads of the step just converged (set by advance, read by converged). */
  private measure: StepMeasure = { iterations: 0, softening: 0, readiness: NaN, grew: false, byOpening: false };
  private readonly probeVerts: number[] = [];
  private readonly fScale: number;
  stopRequested: (() => boolean) | null = null;
  /** Step attempts of this run (since a restore): all, and those cut back (benchmarks report them). */
  readonly attempts = { tried: 0, cut: 0 };
  /** ft at a point when the case has a random strength field, else null. */
  private readonly ftAt: ((x: number, y: number) => number) | null;
  /** Set by restore(): the loop goes on from here instead of from the unloaded state. */
  private resumeAt: LoopState | null = null;
  /** Rings of the domain's holes: a crack that reaches one joins it. */
  private readonly holes: Float64Array[];
  private readonly domain: Domain;

  constructor(readonly c: CaseModel, initial: PolyMesh, private readonly opt: AnalysisOptions = {}) {
    this.wm = WorkMesh.fromPolyMesh(initial);
    this.elements = new ElementCache(opt.stabilisation);
    for (let v = 0; v < this.wm.vertexCount; v++) this.wm.pinned[v] = 1;
    this.D = elasticMatrix(c.material.E, c.material.nu, c.model);
    this.ftAt = strengthOf(c);
    this.domain = buildDomain(c);
    this.holes = this.domain.holes;
    this.coh = { law: makeLaw(c.material.softening, c.material.ft, c.material.GF), penalty: penaltyFor(c.material.E, c.mesh.tipSize), beta: c.material.shearWeight };
    const ext = extent(initial);
    this.tol = 1e-6 * ext;
    this.driven = selectDriven(c, initial, this.tol);
    this.rig = rigVertices(this.driven);
    this.fScale = c.material.ft * c.thickness * ext;
    this.s = emptyState(this.wm.vertexCount);
    for (const p of c.probes) this.probeVerts.push(nearestVertex(initial, p.at[0], p.at[1]));
    insertNotchSlits(c, this.wm, this.s, initial);
    placeTips(c, this.wm, this.s);
  }

  get cracks(): CrackState['cracks'] { return this.s.cracks; }
  get tips(): CrackState['tips'] { return this.s.tips; }
  /** Every growth event: tip index, position, chosen direction and whether it was the kink out of the start. */
  get growthLog(): CrackState['growthLog'] { return this.s.growthLog; }
  get rows(): CrackState['rows'] { return this.s.rows; }
  get dofs(): CrackState['dofs'] { return this.s.dofs; }

  /** A cohesive crack cut in before loading, from a boundary point straight to another (tests, pre-cracked specimens). */
  addCohesiveCut(from: [number, number], to: [number, number]): void {
    cohesiveCut(this.wm, this.s, from, to);
    this.dirty = true;
  }

  /** The rig as it stands: holds shared with the twins of cut rig points, lifted-off strip points let go. */
  private rigNow(): Driven {
    return releaseFrom(withTwins(this.driven, this.s.cracks), this.s.released ?? [], this.tol);
  }

  /** Rebuild the equations after a mesh change; displacements and histories carry over. */
  private rebuild(): void {
    const s = this.s;
    s.uw = this.wm.extendField(s.uw, 2);
    this.eqReleased = (s.released ?? []).join(',');
    if (this.opt.carryRows === false) this.elements.last = null;
    // with a strength field each face pair softens with the ft at its place
    const local = this.ftAt ? { coh: this.coh, ftAt: this.ftAt } : null;
    this.eq = new Equations(this.wm, s.cracks, this.rigNow(), this.D, this.c.thickness, s.kappa, s.uw, this.opt.maxDofs, this.elements, this.order2(), s.mid, local);
    const nd = this.eq.dofs;
    if (s.dofs.initial === 0) s.dofs.initial = nd;
    s.dofs.max = Math.max(s.dofs.max, nd);
    s.dofs.final = nd;
    this.dirty = false;
  }

  /**
   * Order 2: the equations of each topology are built on its node mesh (vertices and edge
   * midpoints, vem/dofs2.ts), rebuilt from the work mesh after every cut, refinement and
   * coarsening; supports and loads are selected on it, so they hold and drive the midpoints too,
   * and a bearing strip lets go of the nodes (vertices and midpoints) lifted off it.
   */
  private order2(): Order2Setup | undefined {
    if (this.c.mesh.order !== 2) return undefined;
    return {
      drivenOn: (nm, key) => releaseFrom(selectDriven(this.c, nm.mesh, 1e-6 * extent(nm.mesh), nm.mid), nodesOf(key, this.s.released ?? []), this.tol),
      cells: this.cells2,
    };
  }

  private equations(): Equations {
    if (this.dirty || this.eqReleased !== (this.s.released ?? []).join(',')) this.rebuild();
    return this.eq;
  }

  private room(): GrowthRoom { return { c: this.c, wm: this.wm, s: this.s, coh: this.coh, eq: this.eq, D: this.D, ftAt: this.ftAt, rig: this.c.mesh.order === 2 ? [] : this.rig, holes: this.holes, domain: this.domain }; }

  private newtonOptions(kind: ControlKind, target: number): NewtonOptions {
    const tolG = kind === 'force' ? 1e-8 * this.fScale : kind === 'dissipation' ? 1e-9 * Math.max(Math.abs(target), 1e-6 * this.fScale) : 1e-9 * Math.max(Math.abs(target), 1e-3);
    return { maxIter: 25, tolF: 1e-7 * this.fScale, tolG, floor: 1e-9 * this.coh.penalty, condense: this.opt.condense };
  }

  /**
   * Solve at one control level from the current state, with the bearing strips pushing but
   * never pulling: after each converged solve the points a platen pulls lift off and lifted
   * points that have gone into it come back, and the level is solved again from there until
   * the contact set stands (at most CONTACT_ROUNDS times; the order is fixed, so it is
   * deterministic). On failure the solution is as before.
   */
  private solveAt(kind: ControlKind, target: number, from?: StepState, reject?: () => boolean): { ok: boolean; reason: string; rejected?: boolean } {
    const s = this.s;
    let before = s.released ?? [], r: { ok: boolean; reason: string; rejected?: boolean } = { ok: false, reason: '' };
    for (let round = 0; ; round++) {
      r = this.solveOnce(kind, target, round === 0 ? from : undefined, round === 0 ? reject : undefined);
      if (r.rejected) return r;
      if (!r.ok && round > 0) {
        // the new contact set does not converge: the last one that did stands
        s.released = before;
        r = this.solveOnce(kind, target);
        break;
      }
      if (!r.ok || this.driven.strips.length === 0 || round >= CONTACT_ROUNDS) break;
      const eq = this.eq, v = this.contactView(), L = eq.node?.layout;
      const b = bearings(v.rig, v.released, v.co, eq.work.u, eq.work.f, s.lambda, this.tol);
      let umax = Math.abs(s.lambda);
      for (const x of b) umax = Math.max(umax, Math.abs(x.gap));
      const tolF = 1e-6 * this.fScale, tolU = 1e-6 * umax + 1e-9 * this.tol;
      // order 2 decides at the vertices (solver/contact2.ts), its midpoints follow their edges
      const next = L ? contactUpdate2(b, v.released, L, tolF, tolU) : contactUpdate(b, v.released, tolF, tolU);
      if (!next) break;
      before = s.released ?? [];
      s.released = next.map(v.key).sort((p, q) => p - q);
    }
    if (!r.ok) return r;
    const F = this.eq.sys.loadForce(this.eq.work.f);
    s.W += 0.5 * (F + s.lastF) * (s.lambda - s.lastLambda);
    s.lastF = F; s.lastLambda = s.lambda;
    return r;
  }

  /**
   * One solve at a control level with the contact set as it stands; on failure the solution is
   * as before, and so when `reject` turns the converged state down (condensed iterations only).
   */
  private solveOnce(kind: ControlKind, target: number, from?: StepState, reject?: () => boolean): { ok: boolean; reason: string; rejected?: boolean } {
    const eq = this.equations(), s = this.s;
    const t0 = performance.now();
    const opt = { ...this.newtonOptions(kind, target), reject };
    let st: StepState = from ?? { uf: eq.uf.slice(), lambda: s.lambda };
    let r = solveStep(eq.sys, this.coh, eq.kap, eq.kapTrial, kind, target, st, opt, eq.work);
    if (!r.converged && !r.rejected && from) {
      // the predictor may have led Newton astray: once more from the converged state
      this.iterations += r.iterations;
      st = { uf: eq.uf.slice(), lambda: s.lambda };
      r = solveStep(eq.sys, this.coh, eq.kap, eq.kapTrial, kind, target, st, opt, eq.work);
    }
    if (!r.converged && !r.rejected && eq.sys.pairs.plus.length > 0) {
      // points switching between loading and unloading can make Newton cycle: fall back to the secant
      this.iterations += r.iterations;
      st = { uf: eq.uf.slice(), lambda: s.lambda };
      r = solveStep(eq.sys, this.coh, eq.kap, eq.kapTrial, kind, target, st, { ...opt, maxIter: 300, secant: true, tolFEnd: Math.max(opt.tolF, 1e-3 * this.peakLoad) }, eq.work);
    }
    s.solveTime += performance.now() - t0;
    this.iterations += r.iterations;
    if (r.rejected) return { ok: false, reason: '', rejected: true };
    if (!r.converged) {
      const where = r.reason === 'non-finite residual' ? eq.nonFinitePlace() ?? `the control equation (${this.c.control.by}) became NaN or infinite` : r.reason;
      return { ok: false, reason: where };
    }
    eq.uf.set(st.uf); s.lambda = st.lambda;
    eq.scatter(s.uw);
    s.mid = eq.midpoints();
    return { ok: true, reason: '' };
  }

  /** Largest softening of any cohesive point in the trial state, as a fraction of ft. */
  private softening(): number {
    const law = this.coh.law;
    return softeningJump(this.eq.kap, this.eq.kapTrial, law.ft, this.coh.penalty, (w) => law.stress(w), this.eq.pairCoh, softeningWeights(this.stepMode(), this.s.rows, this.peakLoad));
  }

  private stepMode(): StepMode { return this.opt.steps ?? this.c.control.steps ?? 'fixed'; }

  /** Adaptive steps: the step's solution moved the energy balance by more than ENERGY_STEP of the work (steps.ts `energyJump`). */
  private balanceMoved(): boolean {
    const last = this.s.rows[this.s.rows.length - 1];
    if (this.stepMode() === 'fixed' || !last) return false;
    const en = this.eq.energies(this.coh, this.eq.kapTrial);
    return energyJump(last, this.s.W, en.elastic, en.dissipated) > ENERGY_STEP;
  }

  /** The step's solution holds more energy than the machine's work since `saved` supplies (steps.ts `energyCreated`). */
  private gainedEnergy(saved: Solution): boolean {
    const last = this.s.rows[this.s.rows.length - 1];
    if (!last) return false;
    const en = this.eq.energies(this.coh, this.eq.kapTrial), s = this.s;
    return energyCreated(last, s.W, en.elastic, en.dissipated, s.lastF - saved.lastF, s.lastLambda - saved.lastLambda);
  }

  /** The solution released energy since the last row (steps.ts `released`), where the dissipation may drive instead. */
  private snapped(): boolean {
    const last = this.s.rows[this.s.rows.length - 1];
    if (!last || this.opt.pathDrive === 'opening' || this.c.control.by === 'force') return false;
    return released({ W: last.external_work_Nmm, elastic: last.elastic_energy_Nmm, dissipated: last.dissipated_Nmm }, this.balanceNow(this.eq.kapTrial));
  }

  /** Work done, energy stored and dissipated (N·mm) in the last solved state with the histories kap. */
  private balanceNow(kap: Float64Array): { W: number; elastic: number; dissipated: number } {
    const en = this.eq.energies(this.coh, kap);
    return { W: this.s.W, elastic: en.elastic, dissipated: en.dissipated };
  }

  /** Undo a step attempt: the solution as saved, the trial histories as committed. */
  private undo(saved: Solution): void {
    restore(this.s, saved);
    if (!this.dirty) { this.eq.gather(this.s.uw, this.s.mid); this.eq.kapTrial.set(this.eq.kap); }
  }

  /**
   * One step driven by the total crack opening Σ A·w, 2 % more than in the last converged
   * state (less while the cohesive stresses would fall too far in one step). Returns the
   * opening reached, or null (state as saved) when there are no open faces or no step
   * converges.
   */
  private openingStep(saved: Solution): number | null {
    const eq = this.equations();
    if (eq.sys.pairs.plus.length === 0) return null;
    eq.sys.expand(eq.uf, this.s.lambda, eq.work.u);
    const V0 = eq.sys.openingReading(eq.work.u);
    if (!(V0 > 0)) return null;
    let dV = 0.02 * V0;
    for (let k = 0; k < 6; k++) {
      const r = this.solveAt('opening', V0 + dV);
      if (r.ok && (k === 5 || this.softening() <= SOFTENING_LIMIT)) return V0 + dV;
      this.undo(saved);
      dV /= 2;
    }
    return null;
  }

  /**
   * One step driven by the energy the faces dissipate (dissipation-based arc-length control,
   * Gutiérrez 2004; Verhoosel, Remmers & Gutiérrez 2009): as much beyond the last converged
   * state as the last step dissipated, at least DISSIPATION_STEP of all dissipated so far, halved while the cohesive stresses
   * would fall too far in one step. Where nothing softens the constraint has no gradient and
   * does not converge: then the total crack opening drives (openingStep). Null (state as
   * saved) when neither converges.
   */
  private pathStep(saved: Solution): { kind: ControlKind; target: number } | null {
    if (this.opt.pathDrive !== 'opening') {
      const eq = this.equations();
      if (eq.sys.pairs.plus.length > 0) {
        eq.sys.expand(eq.uf, this.s.lambda, eq.work.u);
        const D0 = eq.sys.dissipation(eq.work.u, this.coh, eq.kap);
        // as much as the last step dissipated, at least DISSIPATION_STEP of all so far
        const n = this.s.rows.length, last = n >= 2 ? this.s.rows[n - 1].dissipated_Nmm - this.s.rows[n - 2].dissipated_Nmm : 0;
        let dD = Math.max(DISSIPATION_STEP * D0, last);
        for (let k = 0; dD > 0 && k < 6; k++) {
          const r = this.solveAt('dissipation', D0 + dD);
          if (r.ok && (k === 5 || this.softening() <= SOFTENING_LIMIT)) return { kind: 'dissipation', target: D0 + dD };
          this.undo(saved);
          dD /= 2;
        }
      }
    }
    const V = this.openingStep(saved);
    return V === null ? null : { kind: 'opening', target: V };
  }

  /**
   * Before loading, every tip that has no faces yet lays its first segment, intact, in the
   * direction the elastic field gives (the bulk is linear, so that direction does not depend
   * on the load level): its faces then take up load gradually instead of starting above ft.
   * The field comes from a trial solve at a small control level, undone afterwards.
   */
  private layFirstSegments(firstIncrement: number): void {
    if (refineNotchLines(this.room())) this.dirty = true;
    if (!this.s.tips.some((t) => t.active && t.crack < 0)) return;
    const saved = save(this.s, SOLUTION);
    const r = this.solveAt(this.c.control.by, 1e-3 * firstIncrement);
    if (r.ok && grow(this.room()) > 0) this.dirty = true;
    this.undo(saved);
    this.s.uw.fill(0);
    this.s.mid = null;
    this.equations().uf.fill(0);
  }

  /**
   * Grow at this control level until no tip meets the criterion, re-solving after each
   * growth. Returns '' when done, 'apart' when the specimen has come apart, or why a
   * re-solve failed (mesh and cracks are then as they were).
   */
  private growAt(drive: { kind: ControlKind; target: number }, peak: Peak): string {
    // the undo snapshot (mesh included) is taken only once growth is about to change something
    let before: ReturnType<typeof save<typeof GEOMETRY[number]>> | null = null;
    const snap = (): void => { before ??= save(this.s, GEOMETRY, this.wm); };
    const maxGrowth = this.opt.maxGrowthPerStep ?? 60;
    // a re-solve at the case's control level that releases stored energy the faces do not
    // dissipate has snapped back: it is redone at the dissipation before it (below)
    const watch = this.opt.pathDrive !== 'opening' && this.c.control.by !== 'force';
    let en = watch ? this.balanceNow(this.eq.kapTrial) : null;
    for (let g = 0; g < maxGrowth; g++) {
      if (grow({ ...this.room(), beforeChange: snap }) === 0) break;
      this.dirty = true;
      const { kind, target } = drive;
      // the state to redo a snap from: the last solution carried onto the new mesh
      const pre = en && !byPath(kind) ? (this.equations(), save(this.s, SOLUTION)) : null;
      let r = this.solveAt(kind, target);
      if (r.ok && pre && en) {
        const now = this.balanceNow(this.eq.kapTrial);
        if (released(en, now)) {
          const fixed = save(this.s, SOLUTION);
          this.undo(pre);
          const rd = this.solveAt('dissipation', en.dissipated);
          // kept where it loses at most REDO_KEEP of what the re-solve at the fixed level lost
          // (the machine's work over such a jump is the trapezoid's guess either way)
          if (rd.ok && Math.abs(lost(en, this.balanceNow(this.eq.kapTrial))) < REDO_KEEP * Math.abs(lost(en, now))) {
            drive.kind = 'dissipation'; drive.target = en.dissipated; r = rd;
          } else { this.undo(fixed); this.solveAt(kind, target); }
        }
      }
      if (r.ok && en) en = this.balanceNow(this.eq.kapTrial);
      // a crack through to the boundary with little load left: the specimen has come apart
      if (!r.ok && separated(this.s) && Math.abs(this.s.lastF) <= 0.25 * Math.abs(peak.load_N)) return 'apart';
      if (!r.ok) {
        if (byPath(drive.kind)) return r.reason;
        restore(this.s, before!, this.wm);
        this.dirty = true;
        return r.reason;
      }
    }
    return '';
  }

  private record(step: number, control: number): StepEvent {
    const ev = recordStep({
      c: this.c, wm: this.wm, s: this.s, eq: this.eq, coh: this.coh, D: this.D,
      gauge: this.driven.gaugeVerts !== null, opening: this.driven.opening, probeVerts: this.probeVerts, iterations: this.iterations,
      tips: tipRows(step, tipDirections(this.room()), this.s.cracks),
    }, step, control);
    this.iterations = 0;
    return ev;
  }

  crackPolylines(): { points: [number, number][]; kind: 'notch' | 'crack' }[] {
    return crackPolylines(this.s.cracks, this.wm);
  }

  /**
   * The rig's forces in the last solved state: every bearing-strip point (force the platen puts
   * on it along its push, gap, in contact or lifted off; at order 2 the vertices, each with half
   * the reaction of the strip midpoints beside it), the resultant [x, y] of all support
   * reactions on the specimen (N), and the machine force along the load direction (N).
   */
  rigForces(): { bearings: Bearing[]; supports: [number, number]; machine: number } {
    const eq = this.equations(), { rig, co, released, key } = this.contactView(), f = eq.work.f;
    const keys = new Set<number>();
    for (const d of rig.fixed) if (co[d.v] >= 0) keys.add(2 * co[d.v] + d.comp);
    for (const st of rig.strips) if (st.support) for (const v of st.pts) if (co[v] >= 0) keys.add(2 * co[v] + st.comp);
    const R: [number, number] = [0, 0];
    for (const k of keys) R[k & 1] += f[k];
    const all = bearings(rig, released, co, eq.work.u, f, this.s.lambda, this.tol), L = eq.node?.layout;
    const b = (L ? vertexBearings(all, L) : all).map((x) => ({ ...x, v: key(x.v) }));
    return { bearings: b, supports: R, machine: eq.sys.loadForce(f) };
  }

  /**
   * The bearing strips as the equations hold them: the rig, the map from its point ids to the
   * equations' nodes, the lifted-off points among those ids, and each id's key in the record's
   * `released`. Order 1: stable vertex ids throughout. Order 2: node ids of the node mesh, kept
   * in the record by stable id (vertices) or midpointKey (midpoints).
   */
  private contactView(): { rig: Driven; co: Int32Array; released: number[]; key: (p: number) => number } {
    const eq = this.eq, nr = eq.nodeRig, rel = this.s.released ?? [];
    if (!nr) return { rig: this.rigNow(), co: eq.compact.compactOf, released: rel, key: (v) => v };
    return { rig: nr.driven, co: nr.ids, released: nodesOf(nr.key, rel), key: (n) => nr.key[n] };
  }

  /** Crack face area (mm²) whose traction has reached ft, and the part of it fully separated (no traction left). */
  faceAreas(): { reached_mm2: number; separated_mm2: number } { return this.equations().faceAreas(this.coh); }

  /** Stress intensity factors and MTS directions at every slit and crack tip of the last solved state. */
  tipFactors(): TipMeasure[] { this.equations(); return tipMeasures(this.room()); }

  /** The constrained bulk stiffness of the current mesh (free dofs only), e.g. for export. */
  stiffnessMatrix(): CsrMatrix { return this.equations().stiffnessMatrix(); }

  /** Free dofs of the current mesh. */
  get freeDofs(): number { return this.equations().sys.nFree; }

  /** Whether Newton runs on the bulk condensed onto the faces in the current topology (null: no cohesive solve in it yet). */
  get condensedFaces(): boolean | null { const c = this.equations().work.cond; return c === undefined ? null : c !== null; }

  /** Everything the loop needs to go on from `at` (deep copies: the run may go on at once). */
  state(at: LoopState): AnalysisState { return checkpointState(this.s, this.wm, at); }

  /** Take over a saved state; run() then goes on from its step without recording step 0 again. */
  restore(a: AnalysisState): void {
    this.s = fromCheckpoint(a, this.wm);
    this.iterations = 0;
    this.resumeAt = structuredClone(a.loop);
    this.peakLoad = Math.abs(a.loop.peak.load_N);
    this.dirty = true;
  }

  /**
   * One step from the last converged state toward `target`: solve, cut back a step that
   * failed or went too far (null: try again with the shorter step now in `at`), fall back
   * to the crack opening, then grow at the level reached. Returns the control kind and
   * level the step converged at, or why the run ends.
   */
  private advance(at: LoopState, target: number): { kind: ControlKind; target: number } | { end: string } | null {
    const ctl = this.c.control, elastic = !this.c.crack;
    this.equations();
    const saved = save(this.s, SOLUTION);
    // while the case's control value still falls back, go on with the crack opening at once
    const skipped = at.opening === true;
    let kind: ControlKind = ctl.by;
    // the cohesive stress may fall by at most 5 % of ft in one step (0.5 % past a peak),
    // and a tip may not be taken past the point where the segment it lays would start above ft;
    // the first is asked of the condensed solution already, before the bulk's solve (not with
    // bearing strips, whose contact rounds come after it)
    const checked = !skipped && !elastic && at.frac > MIN_FRACTION && !at.opening;
    const early = checked && this.driven.strips.length === 0 ? () => this.softening() > SOFTENING_LIMIT : undefined;
    const it0 = this.iterations;
    let r = skipped ? { ok: false, reason: '' } : this.solveAt(kind, target, this.predict(target - at.done), early);
    // a state holding more energy than the machine put in lies on no loading path: the step failed
    if (r.ok && !elastic && this.gainedEnergy(saved)) { this.undo(saved); r = { ok: false, reason: 'its solution held more energy than the machine\'s work supplied' }; }
    // the shortest step is not judged by its softening: one whose solution releases stored
    // energy the faces do not dissipate has snapped, and the dissipation drives it instead
    if (r.ok && !elastic && !checked && !skipped && this.snapped()) { this.undo(saved); r = { ok: false, reason: 'its solution released stored energy the faces did not dissipate' }; }
    const m: StepMeasure = this.measure = { iterations: this.iterations - it0, softening: r.ok && !elastic ? this.softening() : 0, readiness: NaN, grew: false, byOpening: false };
    if (skipped) at.frac = WHILE_OPENING;
    const tooFar = (): boolean => m.softening > SOFTENING_LIMIT || (m.readiness = tipOvershoot(this.room())) > overshootLimit(this.c.crack!.insertAt ?? 1) || this.balanceMoved();
    if (r.rejected || (r.ok && checked && tooFar())) {
      this.undo(saved);
      cut(at);
      return null;
    }
    if (!r.ok) {
      if (!cut(at)) return null;
      if (ctl.by === 'force' && at.peak.load_N > 0) return { end: `the load cannot be raised above ${at.peak.load_N.toFixed(1)} N under force control (peak reached)` };
      // where the load and the gauge both turn back (snap-back), the energy dissipated on the
      // faces (or their total opening) still grows: let it drive this step
      const V = ctl.by === 'force' ? null : this.pathStep(saved);
      // no such step either: the case's control has one more go before the run stops
      if (V === null && skipped) { at.opening = false; at.frac = AFTER_OPENING; return null; }
      if (V === null) throw new RunStopped(`step ${at.step + 1} did not converge at ${ctl.by} ${target.toPrecision(4)} after cutting the increment 6 times: ${r.reason}`);
      target = V.target; kind = V.kind;
      this.measure.byOpening = true;
    }
    if (elastic) return { kind, target };
    // staggered growth at this control level (or at this crack opening or dissipation)
    const drive = { kind, target };
    const failed = this.growAt(drive, at.peak);
    if (drive.kind !== kind) { kind = drive.kind; target = drive.target; this.measure.byOpening = true; }
    if (failed === 'apart') return { end: 'a crack has run through the specimen, which has come apart' };
    if (failed && byPath(kind)) throw new RunStopped(`step ${at.step + 1} did not converge after the crack grew while the crack ${kind === 'opening' ? 'opening' : 'faces\' dissipation'} drove the step: ${failed}`);
    if (failed) {
      // the growth is undone; undo the step too and come at it again in a shorter one
      // (the equations are rebuilt for the old mesh, with uf and the histories)
      restore(this.s, saved);
      if (cut(at)) throw new RunStopped(`step ${at.step + 1} did not converge after the crack grew at ${ctl.by} ${target.toPrecision(4)}, also in shorter steps: ${failed}`);
      return null;
    }
    return { kind, target };
  }

  /**
   * Where the next step starts Newton from: the last converged state carried on along the last
   * step's trend (a secant predictor; the trend is kept only over steps without growth, on the
   * same mesh). Undefined when there is no trend: Newton then starts from the converged state.
   */
  private predict(dLevel: number): StepState | undefined {
    const s = this.s, tr = s.trend;
    if (!tr || tr.du.length !== s.uw.length || !(tr.dLevel > 0) || this.dirty) return undefined;
    const ratio = Math.min(2, dLevel / tr.dLevel);
    if (!(ratio > 0)) return undefined;
    const uw = new Float64Array(s.uw.length);
    for (let i = 0; i < uw.length; i++) uw[i] = s.uw[i] + ratio * tr.du[i];
    // order 2: the midpoints go on along their trend too (the same topology: the same edges)
    const m = s.mid, mid = m && tr.dmid?.length === m.u.length ? { key: m.key, u: m.u.map((v, i) => v + ratio * tr.dmid![i]) } : m;
    const uf = new Float64Array(this.eq.sys.freeDofs.length);
    this.eq.gatherInto(uw, uf, mid);
    return { uf, lambda: s.lambda + ratio * tr.dLambda };
  }

  /** Commit a converged step and record it at the case's control level it reached. */
  private converged(at: LoopState, kind: ControlKind, target: number, start: { uw: Float64Array; mid: Float64Array | null; lambda: number; level: number; growth: number }): StepEvent {
    const ctl = this.c.control;
    const s = this.s;
    s.trend = !byPath(kind) && s.growthLog.length === start.growth && start.uw.length === s.uw.length
      ? { du: s.uw.map((v, i) => v - start.uw[i]), dLambda: s.lambda - start.lambda, dLevel: target - start.level } : null;
    if (s.trend && s.mid && start.mid?.length === s.mid.u.length) s.trend.dmid = s.mid.u.map((v, i) => v - start.mid![i]);
    this.eq.commit(this.s.kappa);
    // driven by the opening or the dissipation, the level reached is the gauge reading or the load-point travel
    const level = !byPath(kind) ? target : ctl.by === 'cmod' ? this.eq.sys.gaugeReading(this.eq.work.u) : this.s.lambda;
    accept(at, level, byPath(kind), kind === 'dissipation');
    this.measure.grew = s.growthLog.length !== start.growth;
    const ev = this.record(at.step, level);
    this.peakLoad = Math.max(this.peakLoad, Math.abs(ev.row.load_N));
    settle(at, ev.row, this.stepMode() === 'fixed' ? undefined : { m: this.measure, rows: this.s.rows, base: ctl.target / ctl.increments });
    return ev;
  }

  /**
   * Run the whole analysis; onStep sees every converged step (step 0 is the unloaded state),
   * onCheckpoint the state every `checkpointEvery` steps and when a stop is requested. The
   * loop position is explicit (LoopState) and only changes between steps, so a run restored
   * from a checkpoint repeats exactly what the uninterrupted run did after it.
   */
  async run(onStep: (e: StepEvent) => void | Promise<void>, onCheckpoint?: (s: AnalysisState) => void | Promise<void>): Promise<AnalysisResult> {
    const ctl = this.c.control, elastic = !this.c.crack;
    let status: AnalysisResult['status'] = 'complete', reason = '', failure: unknown;
    const nInc = elastic ? 1 : ctl.increments;
    const every = this.opt.checkpointEvery ?? 0;
    const at: LoopState = this.resumeAt ?? startState();
    // the state after the last converged step: attempts since then have all been undone
    let mark: LoopState = structuredClone(at);
    try {
      this.rebuild();
      if (!this.resumeAt) {
        if (!elastic) this.layFirstSegments(ctl.target / nInc);
        await onStep(this.record(0, 0));
      }
      this.resumeAt = null;
      while (at.inc <= nInc) {
        const target = propose(at, ctl.target, nInc, elastic ? 'fixed' : this.stepMode());
        if (target === null) continue;
        // let signal handlers run between attempts
        if (this.stopRequested) await new Promise<void>((r) => setImmediate(r));
        if (this.stopRequested?.()) {
          status = 'interrupted'; reason = `interrupted by a signal after step ${mark.step}`;
          await onCheckpoint?.(this.state(mark));
          break;
        }
        const start = { uw: this.s.uw.slice(), mid: this.s.mid?.u.slice() ?? null, lambda: this.s.lambda, level: at.done, growth: this.s.growthLog.length };
        this.attempts.tried++;
        const step = this.advance(at, target);
        if (step === null) this.attempts.cut++;
        if (step === null) continue;
        if ('end' in step) { reason = step.end; break; }
        const ev = this.converged(at, step.kind, step.target, start);
        await onStep(ev);
        if (!elastic && ctl.stopAtLoadFraction > 0 && at.step > at.peak.step && Math.abs(ev.row.load_N) <= ctl.stopAtLoadFraction * Math.abs(at.peak.load_N)) {
          reason = `the load fell to ${(100 * ctl.stopAtLoadFraction).toFixed(1)} % of the peak`;
          break;
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
    return this.result(status, reason, at.peak, failure);
  }

  private result(status: AnalysisResult['status'], reason: string, peak: Peak, failure: unknown): AnalysisResult {
    const s = this.s;
    return {
      status, reason, rows: s.rows, peak,
      crackPaths: s.cracks.filter((k) => k.kind === 'cohesive').map((k) => k.path.map((v) => [this.wm.x[v], this.wm.y[v]] as [number, number])),
      dofs: s.dofs,
      mesh: { polygons: this.eq.compact.mesh.cellStart.length - 1, vertices: this.eq.compact.vertexOf.length },
      probes: s.lastProbes,
      timings_s: { solve: s.solveTime / 1000 },
      ...(status === 'failed' ? { error: failure } : {}),
    };
  }
}

/** The step is driven by a measure of the cracks (a snap-back path), not by the case's control. */
function byPath(kind: ControlKind): boolean { return kind === 'opening' || kind === 'dissipation'; }

/** The nodes whose key is among the released ones (order 2: vertex stable ids and midpoint keys). */
function nodesOf(key: Float64Array, released: readonly number[]): number[] {
  if (released.length === 0) return [];
  const off = new Set(released), out: number[] = [];
  for (let n = 0; n < key.length; n++) if (off.has(key[n])) out.push(n);
  return out;
}

function extent(m: PolyMesh): number {
  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
  for (let i = 0; i < m.xy.length; i += 2) { x0 = Math.min(x0, m.xy[i]); x1 = Math.max(x1, m.xy[i]); y0 = Math.min(y0, m.xy[i + 1]); y1 = Math.max(y1, m.xy[i + 1]); }
  return Math.max(x1 - x0, y1 - y0);
}
