// Recording: a converged state as a curve row, probe rows and (on demand) a snapshot for
// pictures. Only faces that have reached ft count as crack here; the laid path is drawn whole.
import type { CaseModel } from '../case/model.js';
import type { PolyMesh } from '../mesh/polymesh.js';
import type { CohesiveParams } from '../cohesive/interface.js';
import { RunStopped } from '../errors.js';
import { readDofs, type VertexDof } from '../solver/driven.js';
import type { WorkMesh } from './workmesh.js';
import type { Equations } from './equations.js';
import type { Crack, CrackState, ProbeRow, StepRow, Tip } from './state.js';
import type { TipRow } from './tips.js';

export interface CohesiveSegment { x1: number; y1: number; x2: number; y2: number; damage: number }

/** What a picture of one state needs. */
export interface Snapshot {
  step: number; mesh: PolyMesh; u: Float64Array; cellStress: Float64Array;
  cracks: { points: [number, number][]; kind: 'notch' | 'crack' }[];
  cohesive: CohesiveSegment[];
  row: StepRow;
}

export interface StepEvent { row: StepRow; probes: ProbeRow[]; tips: TipRow[]; snapshot: () => Snapshot }

/** Whether the face pair of path vertex v has reached ft (a history beyond the intact branch). */
export type Reached = (v: number) => boolean;

export function reachedFt(eq: Equations, coh: CohesiveParams): Reached {
  const l0 = coh.law.ft / coh.penalty, own = eq.pairCoh;
  return (v) => {
    const p = eq.pairOf.get(v);
    return p !== undefined && eq.kap[p] > (own ? own[p].law.ft / own[p].penalty : l0);
  };
}

/**
 * Length of the cohesive cracks, counting only the parts whose faces have reached ft (the
 * segments laid ahead and still intact are not a crack yet). A segment counts when both
 * ends have reached ft, or one end has and the other is the crack's start.
 */
export function crackLength(cracks: readonly Crack[], x: ArrayLike<number>, y: ArrayLike<number>, reached: Reached): number {
  let L = 0;
  for (const k of cracks) {
    if (k.kind !== 'cohesive') continue;
    const P = k.path, n = P.length;
    const ok = (i: number) => reached(P[i]) || (i === 0 && k.twins[0] < 0);
    for (let i = 1; i < n; i++) if (ok(i - 1) && ok(i)) L += Math.hypot(x[P[i]] - x[P[i - 1]], y[P[i]] - y[P[i - 1]]);
  }
  return L;
}

/** Where the crack of tip t has reached ft nearest to t (its front): a path vertex, or its start. */
export function frontVertex(cracks: readonly Crack[], t: Tip, reached: Reached): number {
  if (t.crack < 0) return t.v;
  const P = cracks[t.crack].path, n = P.length, fromEnd = P[n - 1] === t.v;
  for (let j = 0; j < n; j++) { const v = P[fromEnd ? n - 1 - j : j]; if (reached(v)) return v; }
  return P[fromEnd ? 0 : n - 1];
}

export function crackPolylines(cracks: readonly Crack[], wm: WorkMesh): { points: [number, number][]; kind: 'notch' | 'crack' }[] {
  return cracks.map((k) => ({ kind: k.kind === 'notch' ? 'notch' as const : 'crack' as const, points: k.path.map((v) => [wm.x[v], wm.y[v]] as [number, number]) }));
}

/**
 * Segments of the cohesive cracks with the mean damage of their two face pairs (histories kap,
 * per pair of pairPlus; each pair's own interface in pairCoh where the strength varies).
 */
export function cohesiveSegments(cracks: readonly Crack[], wm: WorkMesh, coh: CohesiveParams, pairPlus: readonly number[], kap: Float64Array,
  pairCoh: readonly CohesiveParams[] | null = null): CohesiveSegment[] {
  const out: CohesiveSegment[] = [];
  const dmg = new Map<number, number>();
  pairPlus.forEach((v, i) => {
    const q = pairCoh ? pairCoh[i] : coh, l0 = q.law.ft / q.penalty;
    dmg.set(v, Math.min(1, Math.max(0, (kap[i] - l0) / q.law.wc)));
  });
  for (const k of cracks) {
    if (k.kind !== 'cohesive') continue;
    for (let i = 1; i < k.path.length; i++) {
      const a = k.path[i - 1], b = k.path[i];
      out.push({ x1: wm.x[a], y1: wm.y[a], x2: wm.x[b], y2: wm.y[b], damage: ((dmg.get(a) ?? 0) + (dmg.get(b) ?? 0)) / 2 });
    }
  }
  return out;
}

/** What recording reads besides the equations of the converged state. */
export interface RecordRoom {
  c: CaseModel; wm: WorkMesh; s: CrackState; eq: Equations; coh: CohesiveParams; D: Float64Array;
  /** The case has a gauge to read (its mouth opening goes into cmod_mm). */
  gauge: boolean;
  /** The control gauge's opening weights (stable vertex ids). */
  opening: readonly VertexDof[];
  /** Probe vertices (stable ids), in the order of c.probes. */
  probeVerts: readonly number[];
  /** Newton iterations since the last recorded step. */
  iterations: number;
  /** The rows of tips.csv for this step (K and direction at every tip). */
  tips: TipRow[];
}

/** The row, probes and snapshot of a converged step; the row goes into s.rows. Throws RunStopped on a non-finite value. */
export function recordStep(r: RecordRoom, step: number, control: number): StepEvent {
  const { c, wm, s, eq, coh } = r, sys = eq.sys;
  const en = eq.energies(coh);
  const F = sys.loadForce(eq.work.f);
  // the CMOD column is the control gauge's opening, also when the control reads its sliding
  const gauge = r.gauge ? readDofs(r.opening, eq.work.u, eq.compact.compactOf) : null;
  const reached = reachedFt(eq, coh);
  const tip = s.tips.find((t) => s.cracks[t.crack]?.kind === 'cohesive') ?? s.tips[0];
  const front = tip ? frontVertex(s.cracks, tip, reached) : -1;
  const row: StepRow = {
    step, control, load_N: F, displacement_mm: s.lambda, cmod_mm: gauge,
    crack_length_mm: crackLength(s.cracks, wm.x, wm.y, reached),
    tip_x_mm: tip ? wm.x[front] : null, tip_y_mm: tip ? wm.y[front] : null,
    external_work_Nmm: s.W, elastic_energy_Nmm: en.elastic, dissipated_Nmm: en.dissipated,
    iterations: r.iterations,
  };
  // a NaN is stopped where it first shows, before it reaches a file
  for (const [k, v] of Object.entries(row)) {
    if (typeof v === 'number' && !Number.isFinite(v)) throw new RunStopped(`step ${step}: the ${k} came out as ${v} at ${c.control.by} ${control.toPrecision(4)}`);
  }
  s.rows.push(row);
  const m = sys.mesh, u = eq.work.u.slice();
  const st = eq.stresses(r.D, true), cs = st.cell, vs = st.node!;
  const probes: ProbeRow[] = c.probes.map((p, i) => {
    const v = eq.compact.compactOf[r.probeVerts[i]];
    const sxx = vs[3 * v], syy = vs[3 * v + 1], sxy = vs[3 * v + 2];
    return {
      step, probe: p.name, x_mm: m.xy[2 * v], y_mm: m.xy[2 * v + 1], ux_mm: u[2 * v], uy_mm: u[2 * v + 1],
      sxx_MPa: sxx, syy_MPa: syy, sxy_MPa: sxy, s1_MPa: (sxx + syy) / 2 + Math.hypot((sxx - syy) / 2, sxy),
    };
  });
  s.lastProbes = probes;
  const kap = eq.kap.slice(), pairPlus = eq.pairPlus, pairCoh = eq.pairCoh;
  const snapshot = (): Snapshot => ({
    step, mesh: m, u, cellStress: cs, row,
    cracks: crackPolylines(s.cracks, wm),
    cohesive: cohesiveSegments(s.cracks, wm, coh, pairPlus, kap, pairCoh),
  });
  return { row, probes, tips: r.tips, snapshot };
}
