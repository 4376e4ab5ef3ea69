// The validated case, with defaults filled in and directions normalised.
// Units throughout: mm, N, MPa (so fracture energy GF is in N/mm).

export type Vec2 = [number, number];

export type Hole =
  | { kind: 'circle'; center: Vec2; radius: number }
  | { kind: 'polygon'; points: Vec2[] };

/** A notch from the specimen edge (or interior) with a width; width 0 is a sharp slit. */
export interface Notch { from: Vec2; to: Vec2; width: number }

export type Fix = 'x' | 'y' | 'xy';

/**
 * How a strip of width > 0 meets the specimen: `rocker`, a rigid platen on a pivot at its
 * centre (its points share one displacement along the held or loaded axis and it may rotate);
 * `clamped`, every point of the strip held (or driven) alike, with no rotation; `pressure` (loads
 * only), a uniform pressure over the strip, its points free to move apart. Absent: rocker.
 */
export type Platen = 'rocker' | 'clamped' | 'pressure';

/** A support at a point or along a segment of the boundary; width spreads a point over a bearing strip. */
export interface Support { at?: Vec2; along?: [Vec2, Vec2]; width: number; fix: Fix; platen?: Platen }

/** Where the machine moves the specimen; direction is a unit vector. */
export interface Load {
  at?: Vec2; along?: [Vec2, Vec2]; width: number; direction: Vec2; platen?: Platen;
  /** Share of the one machine force this load point takes through a spreader (all loads have one, or none). */
  share?: number;
}

export type ControlKind = 'displacement' | 'cmod' | 'force';

/** Two points of the specimen's face; opening is the change of distance along from→to, sliding the relative motion across it (to the left of from→to). */
export interface Gauge { from: Vec2; to: Vec2 }

/** An extra gauge written to gauges.csv every step (test rigs). */
export interface NamedGauge extends Gauge { name: string }

export interface Control {
  by: ControlKind;
  gauge?: Gauge;
  /** Name of the gauge in `gauges` the control reads, when it was given by name. */
  gaugeName?: string;
  /** What cmod control drives: the control gauge's opening (the CMOD, also when absent) or its sliding. */
  reading?: 'opening' | 'sliding';
  /** mm for displacement and cmod control, N for force control. */
  target: number;
  increments: number;
  stopAtLoadFraction: number;
  /** Step lengths: fixed on the increments (when absent) or adaptive (fracture/steps.ts). */
  steps?: 'fixed' | 'adaptive';
}

export type Softening = 'linear' | 'bilinear' | 'exponential';

export interface Material {
  E: number; nu: number; ft: number; GF: number;
  softening: Softening;
  /** β in the effective opening √(w² + β s²). */
  shearWeight: number;
  /** Fracture toughness K_Ic (MPa√m), needed by crack.model lefm. */
  KIc?: number;
  /** A spatially random tensile strength about ft (study variants); absent: ft everywhere. */
  strengthField?: StrengthFieldSettings;
}

/** A seeded Gaussian random field of ft with exponential covariance (src/cohesive/strength.ts). */
export interface StrengthFieldSettings {
  distribution: 'normal' | 'lognormal';
  /** Coefficient of variation of ft (-). */
  cov: number;
  /** mm */
  correlationLength: number;
  seed: number;
  /** Grid nodes per correlation length where the field is drawn. */
  pointsPerLength: number;
}

export interface CrackSettings {
  start: 'notch-tips' | 'anywhere' | Vec2[];
  criterion: 'principal-stress';
  growthStep: number;
  averagingRadius: number;
  /** Fraction of ft at which the next segment is laid, still intact, ahead of a tip. */
  insertAt: number;
  /** cohesive: faces joined by the traction–separation law; lefm: traction-free cracks that grow where K reaches KIc. */
  model: 'cohesive' | 'lefm';
}

export interface MeshSettings {
  size: number; tipSize: number; refineRadius: number;
  coarsen: boolean; seed: number; lloyd: number;
  /** Virtual element order (1 linear, 2 quadratic); absent means 1. */
  order?: 1 | 2;
}

export interface Probe { name: string; at: Vec2 }

export interface OutputSettings {
  frames: ('svg' | 'png')[];
  every: number;
  /** At most this many frames, evenly spaced over the run (the last step always among them). */
  maxFrames: number;
  animation: 'gif' | 'webp' | 'none';
  vtk: boolean;
  /** Width of PNG pictures in pixels. */
  pngWidth: number;
}

export interface CaseModel {
  format: 1;
  /** Short name used for the default output folder (from the file name). */
  name: string;
  title: string;
  units: 'mm-N-MPa';
  model: 'plane-stress' | 'plane-strain';
  thickness: number;
  geometry: { outline: Vec2[]; holes: Hole[]; notches: Notch[] };
  material: Material;
  supports: Support[];
  loads: Load[];
  control: Control;
  /** Absent: elastic analysis, one step at control.target. */
  crack?: CrackSettings;
  mesh: MeshSettings;
  probes: Probe[];
  output: OutputSettings;
  /** A wedge drives the two loads apart (test rigs): included angle in degrees; load_N is the splitting force. */
  wedge?: { angle: number };
  /** Extra named gauges (test rigs). */
  gauges?: NamedGauge[];
}
