// The brittle mode (crack.model lefm): traction-free cracks in a linear elastic body. For each
// crack length one solve at unit load gives K_I and K_II at every tip (interaction integral);
// the bulk is linear, so the critical state of that length is the unit state scaled until the
// largest equivalent K of the maximum tangential stress criterion (Erdogan & Sih 1963) reaches
// KIc. The tip (or tips) at that K then grows one step in the MTS direction, and so on until
// the specimen comes apart. The load–opening curve is the sequence of critical states, so an
// unstable crack shows as a snap-back, drawn as it is.
import type { CaseModel } from '../case/model.js';
import type { PolyMesh } from '../mesh/polymesh.js';
import { elasticMatrix } from '../vem/material.js';
import { cellAreas, cellStresses, vertexStresses } from '../vem/stress.js';
import type { System } from '../solver/system.js';
import { NewtonWork, solveStep } from '../solver/newton.js';
import { selectDriven, boundaryVertices, type Driven } from '../solver/driven.js';
import { InputError, RunStopped } from '../errors.js';
import type { CsrMatrix } from '../linalg/index.js';
import { Equations } from './equations.js';
import { WorkMesh } from './workmesh.js';
import { cutRay, twinAlong } from './cut.js';
import { SLIT_CUT } from './growth.js';
import { refineAround, coarsenAway } from './adapt.js';
import { measureTips, tipRows, type CrackLine, type TipMeasure } from './tips.js';
import { mtsEquivalent } from './sif.js';
import type { AnalysisOptions, AnalysisResult, ProbeRow, Snapshot, StepEvent, StepRow } from './analysis.js';

/** Tips whose equivalent K is within this fraction of the largest grow together: the two rings of
 * the interaction integral agree to about 1 %, so closer K cannot tell the tips of a symmetric problem apart. */
const TIE = 0.02;

export class LefmAnalysis {
  readonly wm: WorkMesh;
  /** Slits first (in case order), then the cracks grown; all traction-free. */
  readonly cracks: (CrackLine & { grown: boolean })[] = [];
  readonly rows: StepRow[] = [];
  readonly dofs = { initial: 0, final: 0, max: 0 };
  /** Every growth: tip position, direction, and K_I, K_II (MPa√mm) of the critical state. */
  readonly growthLog: { crack: number; x: number; y: number; dx: number; dy: number; KI: number; KII: number }[] = [];
  stopRequested: (() => boolean) | null = null;
  /** Tips whose equivalent K is within this fraction of the largest grow with it (TIE). At 1 every
   * opened tip grows at each critical state: the path of the criterion with the tips advancing
   * together, as in a point-symmetric problem, whichever tip the mesh makes critical first. */
  tie = TIE;
  private readonly D: Float64Array;
  private readonly driven: Driven;
  private readonly probeVerts: number[] = [];
  private readonly dead = new Set<number>();
  private sys!: System;
  private work!: NewtonWork;
  private compact!: ReturnType<WorkMesh['toPolyMesh']>;
  private eq!: Equations;
  private dirty = true;
  private solveTime = 0;

  constructor(readonly c: CaseModel, initial: PolyMesh, private readonly opt: AnalysisOptions = {}) {
    if (c.material.KIc === undefined) throw new InputError('material.KIc must be a positive number in MPa√m for crack.model lefm (found none)');
    if (c.geometry.notches.length === 0) {
      throw new InputError('geometry.notches must hold a notch for crack.model lefm, where K is defined at a crack tip (found none)');
    }
    this.wm = WorkMesh.fromPolyMesh(initial);
    for (let v = 0; v < this.wm.vertexCount; v++) this.wm.pinned[v] = 1;
    this.D = elasticMatrix(c.material.E, c.material.nu, c.model);
    let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity;
    for (let i = 0; i < initial.xy.length; i += 2) { x0 = Math.min(x0, initial.xy[i]); x1 = Math.max(x1, initial.xy[i]); y0 = Math.min(y0, initial.xy[i + 1]); y1 = Math.max(y1, initial.xy[i + 1]); }
    this.driven = selectDriven(c, initial, 1e-6 * Math.max(x1 - x0, y1 - y0));
    for (const p of c.probes) this.probeVerts.push(nearest(initial.xy, p.at[0], p.at[1]));
    const on = boundaryVertices(initial);
    for (const n of c.geometry.notches) {
      if (n.width > 0) continue;
      const a = nearest(initial.xy, n.from[0], n.from[1]);
      const L = Math.hypot(n.to[0] - n.from[0], n.to[1] - n.from[1]);
      const cut = cutRay(this.wm, a, (n.to[0] - n.from[0]) / L, (n.to[1] - n.from[1]) / L, L, SLIT_CUT);
      const tw = twinAlong(this.wm, cut.path, null, on[a] === 1, cut.end === 'boundary');
      this.cracks.push({ kind: 'notch', path: cut.path, twins: tw.map((t) => t[1]), grown: false });
    }
    // A notch of finite width has no crack tip: a short slit is started at the centre of its
    // root, along the notch, as the flaw the brittle crack grows from. Beyond about the root
    // radius (half the width) the notch and the slit act as one edge crack of their summed
    // depth (common practice); the slit reaches one width and at least six tip cells, so
    // that the interaction integral has its two rings of cells around the tip (half the
    // straight crack behind it, at least two cells).
    for (const n of c.geometry.notches) {
      if (n.width === 0) continue;
      const L = Math.hypot(n.to[0] - n.from[0], n.to[1] - n.from[1]);
      const dx = (n.to[0] - n.from[0]) / L, dy = (n.to[1] - n.from[1]) / L;
      const a = nearestOn(initial.xy, on, n.to[0], n.to[1]);
      const cut = cutRay(this.wm, a, dx, dy, rootSlitLength(n.width, c.mesh.tipSize), SLIT_CUT);
      if (cut.path.length < 2) continue;
      const tw = twinAlong(this.wm, cut.path, null, true, cut.end === 'boundary');
      this.cracks.push({ kind: 'notch', path: cut.path, twins: tw.map((t) => t[1]), grown: false });
    }
    for (const k of this.cracks) {
      const n = k.path.length;
      if (k.twins[0] < 0) refineAround(this.wm, this.wm.x[k.path[0]], this.wm.y[k.path[0]], c.mesh.refineRadius, c.mesh.tipSize);
      if (k.twins[n - 1] < 0) refineAround(this.wm, this.wm.x[k.path[n - 1]], this.wm.y[k.path[n - 1]], c.mesh.refineRadius, c.mesh.tipSize);
    }
  }

  /** The equations of the mesh as it is (no face pairs: every crack here is traction-free). */
  private rebuild(): void {
    const eq = new Equations(this.wm, [], this.driven, this.D, this.c.thickness, new Map(), new Float64Array(2 * this.wm.vertexCount), this.opt.maxDofs);
    this.compact = eq.compact; this.sys = eq.sys; this.work = eq.work; this.eq = eq;
    const nd = eq.dofs;
    if (this.dofs.initial === 0) this.dofs.initial = nd;
    this.dofs.max = Math.max(this.dofs.max, nd);
    this.dofs.final = nd;
    this.dirty = false;
  }

  /** The state at unit load-point displacement: machine force and gauge reading. */
  private solveUnit(): { F: number; gauge: number | null } {
    if (this.dirty) this.rebuild();
    const t0 = performance.now();
    const st = { uf: new Float64Array(this.sys.nFree), lambda: 0 };
    const r = solveStep(this.sys, null, new Float64Array(0), new Float64Array(0), 'displacement', 1, st,
      { maxIter: 3, tolF: 1e-9 * this.c.material.E * this.c.thickness, tolG: 1e-12, floor: 0 }, this.work);
    this.solveTime += performance.now() - t0;
    if (!r.converged) throw new RunStopped(`the elastic solve did not converge: ${r.reason}`);
    return { F: this.sys.loadForce(this.work.f), gauge: this.driven.gaugeVerts ? this.sys.gaugeReading(this.work.u) : null };
  }

  private measure(): TipMeasure[] {
    return measureTips(this.wm, this.cracks, this.compact, this.work.u, { E: this.c.material.E, nu: this.c.material.nu, model: this.c.model, D: this.D }, this.c)
      .filter((t) => !this.dead.has(t.v));
  }

  /** Widest load or support strip (mm). */
  private get maxWidth(): number { return Math.max(0, ...[...this.c.supports, ...this.c.loads].map((q) => q.width)); }

  /** Distance from (x, y) to the nearest load or support. */
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

  /**
   * Grow tip t one step in its MTS direction; 'through' when the crack has left the material.
   * Within a growth step and a tip cell of a load or support the cut runs on to the outline
   * (through the loaded face, as a cohesive crack runs through to its rig point): the ligament
   * left there is the compressed zone that the critical state before already broke through.
   */
  private growTip(t: TipMeasure, gx = Math.cos(t.kink!), gy = Math.sin(t.kink!)): 'grown' | 'through' | 'stopped' {
    const crack = this.c.crack!, wm = this.wm, h = this.c.mesh.tipSize;
    const room = this.contactRoom(t.x, t.y);
    const len = room < crack.growthStep + h ? room + this.maxWidth / 2 + 2 * h : crack.growthStep;
    const cut = cutRay(wm, t.v, gx, gy, len);
    if (cut.path.length < 2) { this.dead.add(t.v); return 'stopped'; }
    const k = this.cracks[t.crack];
    const through = cut.end !== 'length';
    const back: [number, number] = [wm.x[t.v] - t.dx, wm.y[t.v] - t.dy];
    const tw = twinAlong(wm, cut.path, back, true, through);
    if (k.grown && t.end === 1) {
      k.twins[k.twins.length - 1] = tw[0][1];
      for (let i = 1; i < cut.path.length; i++) { k.path.push(cut.path[i]); k.twins.push(tw[i][1]); }
    } else {
      // out of a slit (or the start end of a crack): a new crack from the tip
      this.cracks.push({ kind: 'notch', path: cut.path.slice(), twins: tw.map((q) => q[1]), grown: true });
    }
    const end = cut.path[cut.path.length - 1];
    if (!through) refineAround(wm, wm.x[end], wm.y[end], this.c.mesh.refineRadius, this.c.mesh.tipSize);
    this.dirty = true;
    return through ? 'through' : 'grown';
  }

  /** The picture of this state, drawn later: the mesh and cracks are taken now, before the next growth. */
  private snapshotOf(step: number, row: StepRow, u: Float64Array): () => Snapshot {
    const m = this.compact.mesh;
    const cracks = this.cracks.map((k) => ({ kind: k.grown ? 'crack' as const : 'notch' as const, points: k.path.map((v) => [this.wm.x[v], this.wm.y[v]] as [number, number]) }));
    return () => ({ step, mesh: m, u, cellStress: cellStresses(m, u, this.D), row, cohesive: [], cracks });
  }

  private probes(step: number, u: Float64Array): ProbeRow[] {
    const m = this.compact.mesh;
    const vs = vertexStresses(m, cellStresses(m, u, this.D), cellAreas(m));
    return this.c.probes.map((p, i) => {
      const v = this.compact.compactOf[this.probeVerts[i]];
      const sxx = vs[3 * v], syy = vs[3 * v + 1], sxy = vs[3 * v + 2];
      return { step, probe: p.name, x_mm: m.xy[2 * v], y_mm: m.xy[2 * v + 1], ux_mm: u[2 * v], uy_mm: u[2 * v + 1], sxx_MPa: sxx, syy_MPa: syy, sxy_MPa: sxy, s1_MPa: (sxx + syy) / 2 + Math.hypot((sxx - syy) / 2, sxy) };
    });
  }

  private grownLength(): number {
    let L = 0;
    for (const k of this.cracks) if (k.grown) for (let i = 1; i < k.path.length; i++) L += Math.hypot(this.wm.x[k.path[i]] - this.wm.x[k.path[i - 1]], this.wm.y[k.path[i]] - this.wm.y[k.path[i - 1]]);
    return L;
  }

  /** The constrained bulk stiffness of the current mesh (free dofs only). */
  stiffnessMatrix(): CsrMatrix {
    if (this.dirty) this.rebuild();
    return this.eq.stiffnessMatrix();
  }

  async run(onStep: (e: StepEvent) => void | Promise<void>): Promise<AnalysisResult> {
    const c = this.c, ctl = c.control, KIc = c.material.KIc! * Math.sqrt(1000); // MPa√mm
    let status: AnalysisResult['status'] = 'complete', reason = '', failure: unknown;
    const peak = { load_N: 0, displacement_mm: 0, cmod_mm: null as number | null, step: 0 };
    let W = 0, last = { F: 0, d: 0 }, step = 0, probes: ProbeRow[] = [];
    const maxSteps = Math.max(ctl.increments, 1000);
    try {
      this.rebuild();
      // the unloaded state
      const zero = new Float64Array(this.sys.nDof);
      const row0: StepRow = { step: 0, control: 0, load_N: 0, displacement_mm: 0, cmod_mm: this.driven.gaugeVerts ? 0 : null, crack_length_mm: 0, tip_x_mm: null, tip_y_mm: null, external_work_Nmm: 0, elastic_energy_Nmm: 0, dissipated_Nmm: 0, iterations: 0 };
      this.rows.push(row0);
      this.solveUnit();
      const tips0 = this.measure();
      probes = this.probes(0, zero);
      await onStep({ row: row0, probes, tips: tipRows(0, tips0.map((t) => ({ ...t, KI: t.KI === null ? null : 0, KII: t.KII === null ? null : 0, kink: null })), this.cracks), snapshot: this.snapshotOf(0, row0, zero) });
      while (step < maxSteps) {
        if (this.stopRequested) await new Promise<void>((r) => setImmediate(r));
        if (this.stopRequested?.()) { status = 'interrupted'; reason = `interrupted by a signal after step ${step}`; break; }
        const unit = this.solveUnit();
        const tips = this.measure();
        let best = 0;
        const keq = tips.map((t) => (t.KI === null || t.KII === null ? -Infinity : mtsEquivalent(t.KI, t.KII)));
        for (const k of keq) best = Math.max(best, k);
        if (!(best > 0)) {
          const near = tips.find((t) => t.KI === null);
          // a tip too near the rig for K to be read: its ligament there is the compressed zone
          // under the load, which the last critical state already broke through
          if (near && this.contactRoom(near.x, near.y) < c.crack!.growthStep + c.mesh.tipSize && this.growTip(near, near.dx, near.dy) === 'through') {
            reason = 'a crack has run through the specimen, which has come apart'; break;
          }
          reason = near ? `the crack tip at [${near.x.toFixed(3)}, ${near.y.toFixed(3)}] mm has no room left before the outline, a load or a support: the ligament is cut through`
            : 'no crack tip is opened by the load';
          break;
        }
        // critical state of this crack length: the unit state scaled until max K_eq = KIc
        const s = KIc / best;
        const F = s * unit.F, d = s, g = unit.gauge === null ? null : s * unit.gauge;
        W += 0.5 * (F + last.F) * (d - last.d);
        last = { F, d };
        step++;
        const u = this.work.u.slice();
        for (let i = 0; i < u.length; i++) u[i] *= s;
        const lead = tips[keq.indexOf(best)];
        const elastic = 0.5 * F * d;
        const control = ctl.by === 'force' ? F : ctl.by === 'cmod' && g !== null ? g : d;
        const row: StepRow = {
          step, control, load_N: F, displacement_mm: d, cmod_mm: g, crack_length_mm: this.grownLength(),
          tip_x_mm: lead.x, tip_y_mm: lead.y, external_work_Nmm: W, elastic_energy_Nmm: elastic, dissipated_Nmm: W - elastic, iterations: 1,
        };
        this.rows.push(row);
        if (Math.abs(F) > Math.abs(peak.load_N)) Object.assign(peak, { load_N: F, displacement_mm: d, cmod_mm: g, step });
        probes = this.probes(step, u);
        const scaled = tips.map((t) => ({ ...t, KI: t.KI === null ? null : s * t.KI, KII: t.KII === null ? null : s * t.KII }));
        await onStep({ row, probes, tips: tipRows(step, scaled, this.cracks), snapshot: this.snapshotOf(step, row, u) });
        if (ctl.by !== 'force' && control >= ctl.target) { reason = 'control target reached'; break; }
        if (ctl.stopAtLoadFraction > 0 && step > peak.step && Math.abs(F) <= ctl.stopAtLoadFraction * Math.abs(peak.load_N)) {
          reason = `the load fell to ${(100 * ctl.stopAtLoadFraction).toFixed(1)} % of the peak`; break;
        }
        // grow every tip at the critical K (ties: symmetric problems grow both tips)
        let through = false, grown = 0;
        for (let i = 0; i < tips.length; i++) {
          if (!(keq[i] > 0) || keq[i] < (1 - this.tie) * best) continue;
          const t = tips[i];
          this.growthLog.push({ crack: t.crack, x: t.x, y: t.y, dx: Math.cos(t.kink!), dy: Math.sin(t.kink!), KI: s * t.KI!, KII: s * t.KII! });
          const r = this.growTip(t);
          if (r === 'through') through = true;
          if (r !== 'stopped') grown++;
        }
        if (through) { reason = 'a crack has run through the specimen, which has come apart'; break; }
        if (grown === 0) { reason = 'no crack tip can grow further (a tip reached a load or support)'; break; }
        const at = this.measureFree();
        if (c.mesh.coarsen && at.length > 0) coarsenAway(this.wm, at.map(([x, y]) => [x, y, x, y]), 2 * c.mesh.refineRadius + 2 * c.mesh.size);
      }
      if (!reason) reason = `stopped after ${maxSteps} growth steps`;
    } catch (e) {
      if (e instanceof RunStopped) { status = 'stopped'; reason = e.message; } else { status = 'failed'; reason = `internal error after step ${step}: ${e instanceof Error ? e.message : String(e)}`; failure = e; }
    }
    return {
      status, reason, rows: this.rows, peak,
      crackPaths: this.cracks.filter((k) => k.grown).map((k) => k.path.map((v) => [this.wm.x[v], this.wm.y[v]] as [number, number])),
      dofs: this.dofs,
      mesh: { polygons: this.compact.mesh.cellStart.length - 1, vertices: this.compact.vertexOf.length },
      probes,
      timings_s: { solve: this.solveTime / 1000 },
      ...(status === 'failed' ? { error: failure } : {}),
    };
  }

  /** Positions of the crack ends inside the material. */
  private measureFree(): [number, number][] {
    const out: [number, number][] = [];
    for (const k of this.cracks) {
      const n = k.path.length;
      if (k.twins[n - 1] < 0) out.push([this.wm.x[k.path[n - 1]], this.wm.y[k.path[n - 1]]]);
      if (k.twins[0] < 0) out.push([this.wm.x[k.path[0]], this.wm.y[k.path[0]]]);
    }
    return out;
  }
}

function nearest(xy: Float64Array, x: number, y: number): number {
  let best = 0, bd = Infinity;
  for (let v = 0; v < xy.length >> 1; v++) { const d = Math.hypot(xy[2 * v] - x, xy[2 * v + 1] - y); if (d < bd) { bd = d; best = v; } }
  return best;
}

/** Length (mm) of the slit started at the root of a notch of width w (mm) on tip cells of size h. */
export function rootSlitLength(w: number, h: number): number { return Math.max(w, 6 * h); }

/** The boundary vertex nearest to (x, y). */
function nearestOn(xy: Float64Array, on: Uint8Array | ArrayLike<number>, x: number, y: number): number {
  let best = -1, bd = Infinity;
  for (let v = 0; v < xy.length >> 1; v++) {
    if (on[v] !== 1) continue;
    const d = Math.hypot(xy[2 * v] - x, xy[2 * v + 1] - y);
    if (d < bd) { bd = d; best = v; }
  }
  return best;
}
