// Default values of a case file, all in one place, chosen for notched concrete and
// mortar specimens tested in a laboratory (mm, N, MPa).
import type { CaseInput } from './schema.js';
import type {
  CaseModel, CrackSettings, Load, MeshSettings, OutputSettings, Support, Vec2,
} from './model.js';

/** Fixed defaults; the derived ones are listed in DERIVED_DEFAULTS. */
export const DEFAULTS = {
  model: 'plane-stress',
  holes: [] as const,
  notches: [] as const,
  notchWidth: 0,
  softening: 'bilinear',
  shearWeight: 1,
  supportWidth: 0,
  loadWidth: 0,
  platen: 'rocker' as const,
  controlBy: 'displacement',
  increments: 100,
  stopAtLoadFraction: 0.05,
  criterion: 'principal-stress',
  insertAt: 0.8,
  coarsen: true,
  seed: 1,
  lloyd: 8,
  probes: [] as const,
  frames: ['png'] as const,
  every: 1,
  maxFrames: 40,
  animation: 'gif',
  vtk: false,
  pngWidth: 1200,
} as const;

/** Defaults that follow from other values, in words (for help texts and reports). */
export const DERIVED_DEFAULTS: Record<string, string> = {
  name: 'file name without its extension',
  title: 'the case name',
  'mesh.size': 'shortest side of the outline bounding box / 10',
  'mesh.tipSize': 'mesh.size / 5',
  'mesh.refineRadius': '10 × mesh.tipSize',
  'crack.start': 'notch-tips when there are notches, otherwise anywhere',
  'crack.growthStep': '2 × mesh.tipSize',
  'crack.averagingRadius': '3 × mesh.tipSize',
};

const copy = (p: Vec2): Vec2 => [p[0], p[1]];
const seg = (s: Vec2[]): [Vec2, Vec2] => [copy(s[0]!), copy(s[1]!)];

/** Unit vector; a zero vector stays zero so that the checks can report it. */
function unit(d: Vec2): Vec2 {
  const len = Math.hypot(d[0], d[1]);
  return len > 0 ? [d[0] / len, d[1] / len] : [d[0], d[1]];
}

/** Outline with a repeated closing point dropped. */
function openOutline(pts: Vec2[]): Vec2[] {
  const out = pts.map(copy);
  const a = out[0]!, b = out[out.length - 1]!;
  if (out.length > 3 && a[0] === b[0] && a[1] === b[1]) out.pop();
  return out;
}

function defaultMeshSize(outline: Vec2[]): number {
  let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity;
  for (const [x, y] of outline) {
    x0 = Math.min(x0, x); x1 = Math.max(x1, x); y0 = Math.min(y0, y); y1 = Math.max(y1, y);
  }
  return Math.min(x1 - x0, y1 - y0) / 10;
}

/** The control gauge: its points, and its name when it names one of `gauges` (checked in check.ts). */
function controlGauge(c: CaseInput): { gauge?: { from: Vec2; to: Vec2 }; gaugeName?: string } {
  const g = c.control.gauge;
  if (g === undefined) return {};
  if (typeof g !== 'string') return { gauge: { from: copy(g.from), to: copy(g.to) } };
  const hit = (c.gauges ?? []).find((x) => x.name === g);
  return hit ? { gauge: { from: copy(hit.from), to: copy(hit.to) }, gaugeName: g } : { gaugeName: g };
}

/** The model of a structurally valid case, with every default filled in. */
export function fillDefaults(c: CaseInput, name: string): CaseModel {
  const outline = openOutline(c.geometry.outline);
  const notches = (c.geometry.notches ?? []).map((n) => ({
    from: copy(n.from), to: copy(n.to), width: n.width ?? DEFAULTS.notchWidth,
  }));
  const m = c.mesh ?? {};
  const size = m.size ?? defaultMeshSize(outline);
  const tipSize = m.tipSize ?? size / 5;
  const mesh: MeshSettings = {
    size, tipSize,
    refineRadius: m.refineRadius ?? 10 * tipSize,
    coarsen: m.coarsen ?? DEFAULTS.coarsen,
    seed: m.seed ?? DEFAULTS.seed,
    lloyd: m.lloyd ?? DEFAULTS.lloyd,
    order: m.order ?? 1,
  };
  let crack: CrackSettings | undefined;
  if (c.crack) {
    const s = c.crack.start;
    crack = {
      start: s === undefined ? (notches.length > 0 ? 'notch-tips' : 'anywhere') : typeof s === 'string' ? s : s.map(copy),
      criterion: c.crack.criterion ?? DEFAULTS.criterion,
      growthStep: c.crack.growthStep ?? 2 * tipSize,
      averagingRadius: c.crack.averagingRadius ?? 3 * tipSize,
      insertAt: c.crack.insertAt ?? DEFAULTS.insertAt,
      model: c.crack.model ?? 'cohesive',
    };
  }
  const place = (p: { at?: Vec2; along?: Vec2[] }) =>
    p.at !== undefined ? { at: copy(p.at) } : { along: seg(p.along!) };
  const supports: Support[] = c.supports.map((s) => ({ ...place(s), width: s.width ?? DEFAULTS.supportWidth, fix: s.fix, platen: s.platen ?? DEFAULTS.platen }));
  const loads: Load[] = c.loads.map((l) => ({ ...place(l), width: l.width ?? DEFAULTS.loadWidth, direction: unit(l.direction), platen: l.platen ?? DEFAULTS.platen, ...(l.share !== undefined ? { share: l.share } : {}) }));
  const o = c.output ?? {};
  const output: OutputSettings = {
    frames: o.frames ? [...new Set(o.frames)] : [...DEFAULTS.frames],
    every: o.every ?? DEFAULTS.every,
    maxFrames: o.maxFrames ?? DEFAULTS.maxFrames,
    animation: o.animation ?? DEFAULTS.animation,
    vtk: o.vtk ?? DEFAULTS.vtk,
    pngWidth: o.pngWidth ?? DEFAULTS.pngWidth,
  };
  const model: CaseModel = {
    format: 1,
    name,
    title: c.title ?? name,
    units: 'mm-N-MPa',
    model: c.model ?? DEFAULTS.model,
    thickness: c.thickness,
    geometry: {
      outline,
      holes: (c.geometry.holes ?? []).map((h) =>
        h.circle ? { kind: 'circle' as const, center: copy(h.circle.center), radius: h.circle.radius }
          : { kind: 'polygon' as const, points: h.polygon!.map(copy) }),
      notches,
    },
    material: {
      E: c.material.E, nu: c.material.nu, ft: c.material.ft, GF: c.material.GF,
      softening: c.material.softening ?? DEFAULTS.softening,
      shearWeight: c.material.shearWeight ?? DEFAULTS.shearWeight,
      ...(c.material.KIc !== undefined ? { KIc: c.material.KIc } : {}),
      ...(c.material.strengthField ? { strengthField: {
        distribution: c.material.strengthField.distribution ?? 'lognormal',
        cov: c.material.strengthField.cov,
        correlationLength: c.material.strengthField.correlationLength,
        seed: c.material.strengthField.seed ?? 1,
        pointsPerLength: c.material.strengthField.pointsPerLength ?? 2,
      } } : {}),
    },
    supports,
    loads,
    control: {
      by: c.control.by ?? DEFAULTS.controlBy,
      ...controlGauge(c),
      reading: c.control.reading ?? 'opening',
      target: c.control.target,
      increments: c.control.increments ?? DEFAULTS.increments,
      stopAtLoadFraction: c.control.stopAtLoadFraction ?? DEFAULTS.stopAtLoadFraction,
      ...(c.control.steps ? { steps: c.control.steps } : {}),
    },
    mesh,
    probes: (c.probes ?? []).map((p) => ({ name: p.name, at: copy(p.at) })),
    gauges: (c.gauges ?? []).map((g) => ({ name: g.name, from: copy(g.from), to: copy(g.to) })),
    ...(c.wedge ? { wedge: { angle: c.wedge.angle } } : {}),
    output,
  };
  if (crack) model.crack = crack;
  return model;
}
