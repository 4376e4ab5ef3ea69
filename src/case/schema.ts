// Shape and types of a case file as written (before defaults). Messages come from the
// field table (fields.ts), so the schema only states structure; value ranges and
// geometry are checked afterwards on the filled model (check.ts).
import { z } from 'zod';
import type { Vec2 } from './model.js';

const num = z.number();
const isPoint = (v: unknown): v is Vec2 =>
  Array.isArray(v) && v.length === 2 && Number.isFinite(v[0]) && Number.isFinite(v[1]);
const point = z.custom<Vec2>(isPoint);
const pointList = z.array(point).min(3);
const pair = z.array(point).length(2);

/** Exactly one of two keys must be present (at/along, circle/polygon). */
function oneOf<T extends object>(a: keyof T, b: keyof T) {
  return (v: T, ctx: z.RefinementCtx) => {
    if ((v[a] === undefined) === (v[b] === undefined)) ctx.addIssue({ code: 'custom', message: 'one of', path: [] });
  };
}

const hole = z
  .strictObject({
    circle: z.strictObject({ center: point, radius: num }).optional(),
    polygon: pointList.optional(),
  })
  .superRefine(oneOf('circle', 'polygon'));

const notch = z.strictObject({ from: point, to: point, width: num.optional() });

// test rigs: how a bearing strip meets the specimen
const platen = z.enum(['rocker', 'clamped', 'pressure']);
const supportPlaten = z.enum(['rocker', 'clamped']);

const support = z
  .strictObject({ at: point.optional(), along: pair.optional(), width: num.optional(), fix: z.enum(['x', 'y', 'xy']), platen: supportPlaten.optional() })
  .superRefine(oneOf('at', 'along'));

const load = z
  .strictObject({ at: point.optional(), along: pair.optional(), width: num.optional(), direction: point, platen: platen.optional(), share: num.optional() })
  .superRefine(oneOf('at', 'along'));

const gauge = z.strictObject({ from: point, to: point });
// test rigs: extra gauges anywhere on the face, named; the control gauge may name one
const namedGauge = z.strictObject({ name: z.string(), from: point, to: point });

const control = z.strictObject({
  by: z.enum(['displacement', 'cmod', 'force']).optional(),
  gauge: z.union([gauge, z.string()]).optional(),
  reading: z.enum(['opening', 'sliding']).optional(),
  target: num,
  increments: num.optional(),
  stopAtLoadFraction: num.optional(),
  steps: z.enum(['fixed', 'adaptive']).optional(),
});

const crack = z.strictObject({
  start: z.union([z.enum(['notch-tips', 'anywhere']), z.array(point).min(1)]).optional(),
  criterion: z.literal('principal-stress').optional(),
  growthStep: num.optional(),
  averagingRadius: num.optional(),
  insertAt: num.optional(),
  model: z.enum(['cohesive', 'lefm']).optional(),
});

const mesh = z.strictObject({
  size: num.optional(),
  tipSize: num.optional(),
  refineRadius: num.optional(),
  coarsen: z.boolean().optional(),
  seed: num.optional(),
  lloyd: num.optional(),
  // element order: 2 runs elastic cases; crack growth is of order 1 only (case/check.ts)
  order: z.union([z.literal(1), z.literal(2)]).optional(),
});

const output = z.strictObject({
  frames: z.array(z.enum(['svg', 'png'])).optional(),
  every: num.optional(),
  maxFrames: num.optional(),
  animation: z.enum(['gif', 'webp', 'none']).optional(),
  vtk: z.boolean().optional(),
  pngWidth: num.optional(),
});

export const caseSchema = z.strictObject({
  format: z.literal(1),
  title: z.string().optional(),
  units: z.literal('mm-N-MPa'),
  model: z.enum(['plane-stress', 'plane-strain']).optional(),
  thickness: num,
  geometry: z.strictObject({
    outline: pointList,
    holes: z.array(hole).optional(),
    notches: z.array(notch).optional(),
  }),
  material: z.strictObject({
    E: num,
    nu: num,
    ft: num,
    GF: num,
    softening: z.enum(['linear', 'bilinear', 'exponential']).optional(),
    shearWeight: num.optional(),
    KIc: num.optional(),
    strengthField: z.strictObject({
      distribution: z.enum(['normal', 'lognormal']).optional(),
      cov: num,
      correlationLength: num,
      seed: num.optional(),
      pointsPerLength: num.optional(),
    }).optional(),
  }),
  supports: z.array(support).min(1),
  loads: z.array(load).min(1),
  control,
  crack: crack.optional(),
  mesh: mesh.optional(),
  probes: z.array(z.strictObject({ name: z.string().min(1), at: point })).optional(),
  gauges: z.array(namedGauge).optional(),
  wedge: z.strictObject({ angle: num }).optional(),
  output: output.optional(),
});

/** A case as written, structurally valid, before defaults. */
export type CaseInput = z.infer<typeof caseSchema>;
