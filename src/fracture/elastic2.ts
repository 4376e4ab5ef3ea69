// Elastic runs of order 2 (mesh.order 2, no crack block): one solve at the control target on
// the node mesh of second-order virtual elements (vertices and edge midpoints as nodes, the
// cell means condensed; vem/dofs2.ts). Supports, loads, strips and gauges act on the nodes as
// on an order-1 mesh; probes and pictures take their stresses from each cell's projection,
// which varies linearly inside the cell. Slits (width-0 notches) are cut before meshing the
// nodes, and their tips get K from the interaction integral on the projected field.
import type { CaseModel } from '../case/model.js';
import type { PolyMesh } from '../mesh/polymesh.js';
import { elasticMatrix } from '../vem/material.js';
import { nodeMesh, Order2Cells, centroidStresses2, nodeStresses2, type NodeMesh } from '../vem/dofs2.js';
import { System } from '../solver/system.js';
import { NewtonWork, solveStep } from '../solver/newton.js';
import { selectDriven, compactDriven, readDofs, releaseFrom, bearings, type Driven } from '../solver/driven.js';
import { contactUpdate2 } from '../solver/contact2.js';
import { RunStopped } from '../errors.js';
import type { CsrMatrix } from '../linalg/index.js';
import { WorkMesh } from './workmesh.js';
import { insertNotchSlits } from './growth.js';
import { emptyState, type CrackState } from './state.js';
import { crackPolylines } from './record.js';
import { tipRows, type TipMeasure } from './tips.js';
import { measureTips2 } from './sif2.js';
import { CONTACT_ROUNDS, type AnalysisOptions, type AnalysisResult, type ProbeRow, type Snapshot, type StepEvent, type StepRow } from './analysis.js';

const NO_PAIRS = { plus: new Int32Array(0), minus: new Int32Array(0), nx: new Float64Array(0), ny: new Float64Array(0), area: new Float64Array(0) };

export class Elastic2Analysis {
  readonly wm: WorkMesh;
  readonly rows: StepRow[] = [];
  readonly dofs = { initial: 0, final: 0, max: 0 };
  stopRequested: (() => boolean) | null = null;
  private readonly D: Float64Array;
  private readonly s: CrackState;
  private built: { nm: NodeMesh; cells: Order2Cells; sys: System; work: NewtonWork; driven: Driven; released: number[]; compact: ReturnType<WorkMesh['toPolyMesh']> } | null = null;
  /** Geometric tolerance (mm) of the rig's selection. */
  private readonly tol: number;
  private solveTime = 0;

  constructor(readonly c: CaseModel, private readonly initial: PolyMesh, private readonly opt: AnalysisOptions = {}) {
    this.wm = WorkMesh.fromPolyMesh(initial);
    for (let v = 0; v < this.wm.vertexCount; v++) this.wm.pinned[v] = 1;
    this.D = elasticMatrix(c.material.E, c.material.nu, c.model);
    this.tol = 1e-6 * extent(initial);
    this.s = emptyState(this.wm.vertexCount);
    insertNotchSlits(c, this.wm, this.s, initial);
  }

  /** The node mesh, its System and the driven nodes, built once (the mesh does not change; the System again when strip points lift off). */
  private equations(): NonNullable<Elastic2Analysis['built']> {
    if (this.built) return this.built;
    const compact = this.wm.toPolyMesh(), nm = nodeMesh(compact.mesh), nn = nm.mesh.xy.length >> 1;
    if (this.opt.maxDofs && 2 * nn > this.opt.maxDofs) throw new RunStopped(`the mesh has ${2 * nn} dofs, above the limit of ${this.opt.maxDofs}`);
    const driven = selectDriven(this.c, nm.mesh, this.tol, nm.mid);
    const cells = new Order2Cells(nm, this.D, this.c.thickness);
    this.dofs.initial = this.dofs.final = this.dofs.max = 2 * nn;
    this.built = { nm, cells, driven, compact, ...this.holding(nm, cells, driven, []) };
    return this.built;
  }

  /** The System with the strip points in `released` (node ids) let go. */
  private holding(nm: NodeMesh, cells: Order2Cells, driven: Driven, released: number[]): { sys: System; work: NewtonWork; released: number[] } {
    const sys = new System(nm.mesh, this.D, this.c.thickness, NO_PAIRS, compactDriven(releaseFrom(driven, released, this.tol), identity(nm.mesh.xy.length >> 1)), (k, Ke) => cells.stiffness(k, Ke));
    return { sys, work: new NewtonWork(sys), released };
  }

  /** One solve at the control target with the contact set as built; the load factor reached. */
  private solve(): number {
    const { sys, work } = this.equations(), ctl = this.c.control, fScale = this.c.material.ft * this.c.thickness * extent(this.initial);
    const st = { uf: new Float64Array(sys.nFree), lambda: 0 };
    const tolG = ctl.by === 'force' ? 1e-8 * fScale : 1e-9 * Math.max(Math.abs(ctl.target), 1e-3);
    const r = solveStep(sys, null, new Float64Array(0), new Float64Array(0), ctl.by, ctl.target, st, { maxIter: 3, tolF: 1e-7 * fScale, tolG, floor: 0 }, work);
    if (!r.converged) throw new RunStopped(`the elastic solve did not converge at ${ctl.by} ${ctl.target.toPrecision(4)}: ${r.reason}`);
    return st.lambda;
  }

  /**
   * Solve, then let the bearing strips push but never pull (the active set of the staggered
   * loop, decided at the vertices: solver/contact2.ts): solve again while the set changes, at
   * most CONTACT_ROUNDS times; a set that does not solve leaves the last one standing.
   */
  private solveWithContact(): number {
    let lambda = this.solve();
    const b = this.equations(), fScale = this.c.material.ft * this.c.thickness * extent(this.initial);
    for (let round = 0; b.driven.strips.length > 0 && round < CONTACT_ROUNDS; round++) {
      const all = bearings(b.driven, b.released, identity(b.nm.mesh.xy.length >> 1), b.work.u, b.work.f, lambda, this.tol);
      let umax = Math.abs(lambda);
      for (const x of all) umax = Math.max(umax, Math.abs(x.gap));
      const next = contactUpdate2(all, b.released, b.nm.layout, 1e-6 * fScale, 1e-6 * umax + 1e-9 * this.tol);
      if (!next) break;
      const keep = b.released;
      Object.assign(b, this.holding(b.nm, b.cells, b.driven, next));
      try { lambda = this.solve(); } catch (e) {
        if (!(e instanceof RunStopped)) throw e;
        Object.assign(b, this.holding(b.nm, b.cells, b.driven, keep));
        return this.solve();
      }
    }
    return lambda;
  }

  /** Free dofs of the order-2 system (vertex and midpoint unknowns; the cell means are condensed). */
  get freeDofs(): number { return this.equations().sys.nFree; }

  stiffnessMatrix(): CsrMatrix {
    const { sys } = this.equations();
    sys.kT.values.set(sys.kBulk.values);
    return sys.reduceTangent();
  }

  private record(step: number, control: number, lambda: number): StepEvent {
    const { nm, cells, sys, work, driven, compact } = this.equations(), c = this.c, u = work.u.slice();
    const F = step === 0 ? 0 : sys.loadForce(work.f);
    let elastic = 0;
    if (step > 0) for (let i = 0; i < u.length; i++) elastic += 0.5 * u[i] * work.f[i];
    const nn = nm.mesh.xy.length >> 1;
    const row: StepRow = {
      step, control, load_N: F, displacement_mm: lambda,
      cmod_mm: driven.gaugeVerts ? readDofs(driven.opening, u, identity(nn)) : null,
      crack_length_mm: 0, tip_x_mm: null, tip_y_mm: null,
      // one linear step from the unloaded state: the work is ½ F d, all of it stored
      external_work_Nmm: 0.5 * F * lambda, elastic_energy_Nmm: elastic, dissipated_Nmm: 0, iterations: step === 0 ? 0 : 1,
    };
    for (const [k, v] of Object.entries(row)) {
      if (typeof v === 'number' && !Number.isFinite(v)) throw new RunStopped(`step ${step}: the ${k} came out as ${v} at ${c.control.by} ${control.toPrecision(4)}`);
    }
    this.rows.push(row);
    const field = cells.field(u), ns = nodeStresses2(nm, field, this.D), xy = nm.mesh.xy;
    const probes: ProbeRow[] = c.probes.map((p) => {
      const v = nearestNode(xy, p.at[0], p.at[1]);
      const sxx = ns[3 * v], syy = ns[3 * v + 1], sxy = ns[3 * v + 2];
      return {
        step, probe: p.name, x_mm: xy[2 * v], y_mm: xy[2 * v + 1], ux_mm: u[2 * v], uy_mm: u[2 * v + 1],
        sxx_MPa: sxx, syy_MPa: syy, sxy_MPa: sxy, s1_MPa: (sxx + syy) / 2 + Math.hypot((sxx - syy) / 2, sxy),
      };
    });
    const tips: TipMeasure[] = measureTips2(this.wm, this.s.cracks, compact, field, { E: c.material.E, nu: c.material.nu, model: c.model, D: this.D }, c);
    const cs = centroidStresses2(field, this.D), cracks = crackPolylines(this.s.cracks, this.wm);
    const snapshot = (): Snapshot => ({ step, mesh: nm.mesh, u, cellStress: cs, row, cracks, cohesive: [] });
    return { row, probes, tips: tipRows(step, step === 0 ? tips.map((t) => ({ ...t, KI: t.KI === null ? null : 0, KII: t.KII === null ? null : 0, kink: null })) : tips, this.s.cracks), snapshot };
  }

  async run(onStep: (e: StepEvent) => void | Promise<void>): Promise<AnalysisResult> {
    const ctl = this.c.control, peak = { load_N: 0, displacement_mm: 0, cmod_mm: null as number | null, step: 0 };
    let status: AnalysisResult['status'] = 'complete', reason = 'elastic analysis at the control target', failure: unknown;
    let probes: ProbeRow[] = [];
    try {
      this.equations();
      let ev = this.record(0, 0, 0);
      await onStep(ev);
      if (this.stopRequested) await new Promise<void>((r) => setImmediate(r));
      if (this.stopRequested?.()) {
        status = 'interrupted'; reason = 'interrupted by a signal after step 0';
      } else {
        const t0 = performance.now(), lambda = this.solveWithContact();
        this.solveTime += performance.now() - t0;
        ev = this.record(1, ctl.target, lambda);
        Object.assign(peak, { load_N: ev.row.load_N, displacement_mm: ev.row.displacement_mm, cmod_mm: ev.row.cmod_mm, step: 1 });
        await onStep(ev);
      }
      probes = ev.probes;
    } catch (e) {
      if (e instanceof RunStopped) { status = 'stopped'; reason = e.message; } else { status = 'failed'; reason = `internal error: ${e instanceof Error ? e.message : String(e)}`; failure = e; }
    }
    const m = this.built?.compact;
    return {
      status, reason, rows: this.rows, peak, crackPaths: [], dofs: this.dofs,
      mesh: { polygons: m ? m.mesh.cellStart.length - 1 : 0, vertices: m ? m.vertexOf.length : 0 },
      probes, timings_s: { solve: this.solveTime / 1000 },
      ...(status === 'failed' ? { error: failure } : {}),
    };
  }
}

function identity(n: number): Int32Array {
  const a = new Int32Array(n);
  for (let i = 0; i < n; i++) a[i] = i;
  return a;
}

function nearestNode(xy: Float64Array, x: number, y: number): number {
  let best = 0, bd = Infinity;
  for (let v = 0; v < xy.length >> 1; v++) { const d = Math.hypot(xy[2 * v] - x, xy[2 * v + 1] - y); if (d < bd) { bd = d; best = v; } }
  return best;
}

function extent(m: PolyMesh): number {
  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
  for (let i = 0; i < m.xy.length; i += 2) { x0 = Math.min(x0, m.xy[i]); x1 = Math.max(x1, m.xy[i]); y0 = Math.min(y0, m.xy[i + 1]); y1 = Math.max(y1, m.xy[i + 1]); }
  return Math.max(x1 - x0, y1 - y0);
}
