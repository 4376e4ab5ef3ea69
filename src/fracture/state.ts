// Everything the staggered loop keeps between steps, as one plain record (typed arrays,
// arrays, plain objects): a snapshot is a structured clone, undoing is putting one back,
// and a checkpoint is a snapshot with the loop position, written out as JSON.
import type { MeshState, WorkMesh } from './workmesh.js';

export interface StepRow {
  step: number; control: number; load_N: number; displacement_mm: number; cmod_mm: number | null;
  crack_length_mm: number; tip_x_mm: number | null; tip_y_mm: number | null;
  external_work_Nmm: number; elastic_energy_Nmm: number; dissipated_Nmm: number; iterations: number;
}

export interface ProbeRow { step: number; probe: string; x_mm: number; y_mm: number; ux_mm: number; uy_mm: number; sxx_MPa: number; syy_MPa: number; sxy_MPa: number; s1_MPa: number }

export interface Crack {
  kind: 'notch' | 'cohesive'; path: number[]; twins: number[];
  /**
   * Where other cracks ended on this one's faces: the face vertex met (`v`, in path or twins),
   * its copy on the far side of the joining crack, and whether the copy's cells border this
   * crack's segment toward the next path index (`after`) or the previous one.
   */
  joins?: { v: number; copy: number; after: boolean }[];
}
/** A crack tip; `slit` is the traction-free slit it starts from (index into cracks, −1 if none). */
export interface Tip {
  crack: number; v: number; dx: number; dy: number; back: [number, number] | null; active: boolean; slit?: number; partner?: number;
  /** Where a stopped tip ended: on the outline, on a hole (`hole`: its index among the domain's holes), on another crack's face, on a point of a load or support it ran through to (`rig`), or a tip cell short of one (`contact`). */
  end?: 'outline' | 'hole' | 'crack' | 'rig' | 'contact'; hole?: number;
}

/** One growth event: tip index, position, chosen direction, whether it was the kink out of the start, and the averaged stress there. */
export interface GrowthEvent { tip: number; x: number; y: number; dx: number; dy: number; first: boolean; sxx: number; syy: number; sxy: number }

export interface Peak { load_N: number; displacement_mm: number; cmod_mm: number | null; step: number }

/** Where the loop stands between two steps: increment, fraction of it tried next, control level reached, steps done. */
export interface LoopState {
  inc: number; frac: number; done: number; step: number; peak: Peak;
  /** The last step was driven by the crack opening and the case's control value fell: drive the next one so too. */
  opening?: boolean;
  /** The step under way has been cut at least once (the next one then does not grow). */
  cut?: boolean;
  /** Adaptive steps: the largest tip readiness at the end of the last step, before growth (null after a growth or when not measured). */
  ready?: number | null;
}

/** The loop's data besides the mesh, keyed by stable vertex ids (never by one topology's numbering). */
export interface CrackState {
  cracks: Crack[]; tips: Tip[];
  /** Cohesive history (largest equivalent opening, mm) by the plus-face vertex of each pair. */
  kappa: Map<number, number>;
  /** Displacements on the stable vertex ids (2 per vertex), the control level λ, and the external work W with the last load and λ it was summed to. */
  uw: Float64Array; lambda: number; W: number; lastF: number; lastLambda: number;
  rows: StepRow[]; lastProbes: ProbeRow[];
  dofs: { initial: number; final: number; max: number };
  growthLog: GrowthEvent[];
  /**
   * What the last converged step did, for the predictor of the next one: the change of the
   * displacements (stable ids; at order 2 also of the midpoints, `dmid`, in the order of
   * `mid`) and of λ over its change of the case's control level; null
   * when that step grew a crack or was driven by the crack opening.
   */
  trend?: { du: Float64Array; dLambda: number; dLevel: number; dmid?: Float64Array } | null;
  /**
   * Order 2: the edge-midpoint displacements of the last solved state (2 per edge, as `u`), by
   * the key of each edge's two stable vertex ids (`edgeKey`); the next topology starts every
   * edge that survives from them. Null at order 1 and before the first solve.
   */
  mid?: MidValues | null;
  /** Wall time spent in the equilibrium solves (ms). */
  solveTime: number;
  /** Points of the bearing strips lifted off their platens (stable ids, sorted; order 2 adds edge midpoints by their negative midpointKey). */
  released?: number[];
}

/** Displacements of edge midpoints: edge keys, and 2 values per edge in the same order. */
export interface MidValues { key: Float64Array; u: Float64Array }

/** The parts a step attempt changes (undone when the attempt is cut). */
export const SOLUTION = ['uw', 'mid', 'lambda', 'W', 'lastF', 'lastLambda', 'released'] as const;
/** The parts a growth event changes besides the mesh (undone with it when the re-solve fails). */
export const GEOMETRY = ['cracks', 'tips', 'growthLog'] as const;

export type Part = keyof CrackState;
/** A snapshot of some parts of the record, and of the mesh when it was taken too. */
export type Saved<K extends Part> = Pick<CrackState, K> & { mesh?: MeshState };

export function emptyState(vertices: number): CrackState {
  return {
    cracks: [], tips: [], kappa: new Map(),
    uw: new Float64Array(2 * vertices), lambda: 0, W: 0, lastF: 0, lastLambda: 0,
    rows: [], lastProbes: [], dofs: { initial: 0, final: 0, max: 0 }, growthLog: [], trend: null, mid: null, solveTime: 0, released: [],
  };
}

/** Deep copies of the named parts (and of the mesh when given). */
export function save<K extends Part>(s: CrackState, parts: readonly K[], wm?: WorkMesh): Saved<K> {
  const out = {} as Saved<K>;
  for (const k of parts) out[k] = structuredClone(s[k]) as Saved<K>[K];
  if (wm) out.mesh = wm.state();
  return out;
}

/** Put saved parts back (copies, so one snapshot can be put back more than once); the mesh too when it was saved. */
export function restore<K extends Part>(s: CrackState, saved: Saved<K>, wm?: WorkMesh): void {
  for (const k of Object.keys(saved) as (K | 'mesh')[]) {
    if (k === 'mesh') continue;
    (s as unknown as Record<string, unknown>)[k] = structuredClone(saved[k]);
  }
  if (saved.mesh && wm) wm.restore(structuredClone(saved.mesh));
}

/** What a checkpoint holds: the whole record (histories as [vertex, κ] pairs), the mesh and the loop position. */
export interface AnalysisState extends Omit<CrackState, 'kappa'> {
  mesh: MeshState;
  kappa: [number, number][];
  loop: LoopState;
}

/** Everything the loop needs to go on from `at` (deep copies: the run may go on at once). */
export function checkpointState(s: CrackState, wm: WorkMesh, at: LoopState): AnalysisState {
  const { kappa, ...rest } = structuredClone(s);
  return { ...rest, kappa: [...kappa.entries()], mesh: wm.state(), loop: structuredClone(at) };
}

/** The record of a checkpoint, taken over (its arrays are not copied); the mesh goes into wm. */
export function fromCheckpoint(a: AnalysisState, wm: WorkMesh): CrackState {
  wm.restore(a.mesh);
  const { mesh: _m, loop: _l, kappa, ...rest } = a;
  return { ...rest, kappa: new Map(kappa) };
}
