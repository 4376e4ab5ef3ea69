// What every case-file field expects and in which unit, in one table, so that every
// message (type errors from the schema, range errors from the checks) says the same thing.

/** Allowed interval of a numeric field; `int` asks for a whole number. */
export interface Range { gt?: number; ge?: number; lt?: number; le?: number; int?: boolean }

export interface FieldSpec {
  /** Noun phrase after "must be". */
  what: string;
  /** Unit of the value: 'mm', 'MPa', 'N/mm', 'px'; '-' is dimensionless; absent when no unit applies. */
  unit?: string;
  range?: Range;
}

const POINT = 'an [x, y] point';
const POSITIVE = 'a positive number';
const NONNEG = 'zero or a positive number';

/** Keyed by field path with list indices written as [] (e.g. supports[].fix). */
export const FIELDS: Record<string, FieldSpec> = {
  '': { what: 'a mapping of case keys such as format, units, geometry, material, supports, loads and control' },
  format: { what: '1, the only case-file format so far' },
  title: { what: 'a line of text' },
  units: { what: 'mm-N-MPa' },
  model: { what: 'one of plane-stress, plane-strain' },
  thickness: { what: POSITIVE, unit: 'mm', range: { gt: 0 } },

  geometry: { what: 'a mapping {outline, holes, notches}' },
  'geometry.outline': { what: 'a list of at least 3 [x, y] points', unit: 'mm' },
  'geometry.outline[]': { what: POINT, unit: 'mm' },
  'geometry.holes': { what: 'a list of holes, each {circle: {center, radius}} or {polygon: [[x, y], ...]}' },
  'geometry.holes[]': { what: 'either {circle: {center, radius}} or {polygon: [[x, y], ...]}' },
  'geometry.holes[].circle': { what: 'a mapping {center, radius}' },
  'geometry.holes[].circle.center': { what: POINT, unit: 'mm' },
  'geometry.holes[].circle.radius': { what: POSITIVE, unit: 'mm', range: { gt: 0 } },
  'geometry.holes[].polygon': { what: 'a list of at least 3 [x, y] points', unit: 'mm' },
  'geometry.holes[].polygon[]': { what: POINT, unit: 'mm' },
  'geometry.notches': { what: 'a list of notches, each {from, to, width}' },
  'geometry.notches[]': { what: 'a mapping {from, to, width}' },
  'geometry.notches[].from': { what: POINT, unit: 'mm' },
  'geometry.notches[].to': { what: POINT, unit: 'mm' },
  'geometry.notches[].width': { what: NONNEG, unit: 'mm', range: { ge: 0 } },

  material: { what: 'a mapping {E, nu, ft, GF, softening, shearWeight, KIc, strengthField}' },
  'material.E': { what: POSITIVE, unit: 'MPa', range: { gt: 0 } },
  'material.nu': { what: 'a number of at least 0 and below 0.5', unit: '-', range: { ge: 0, lt: 0.5 } },
  'material.ft': { what: POSITIVE, unit: 'MPa', range: { gt: 0 } },
  'material.GF': { what: POSITIVE, unit: 'N/mm', range: { gt: 0 } },
  'material.softening': { what: 'one of linear, bilinear, exponential' },
  'material.shearWeight': { what: NONNEG, unit: '-', range: { ge: 0 } },
  'material.KIc': { what: 'a positive number (the fracture toughness, needed by crack.model lefm)', unit: 'MPa√m', range: { gt: 0 } },
  'material.strengthField': { what: 'a mapping {distribution, cov, correlationLength, seed, pointsPerLength}' },
  'material.strengthField.distribution': { what: 'one of normal, lognormal' },
  'material.strengthField.cov': { what: 'a coefficient of variation from 0 to 1', unit: '-', range: { ge: 0, le: 1 } },
  'material.strengthField.correlationLength': { what: POSITIVE, unit: 'mm', range: { gt: 0 } },
  'material.strengthField.seed': { what: 'a whole number of at least 0', unit: '-', range: { ge: 0, int: true } },
  'material.strengthField.pointsPerLength': { what: 'a whole number from 1 to 8', unit: '-', range: { ge: 1, le: 8, int: true } },

  supports: { what: 'a list of at least one support' },
  'supports[]': { what: 'a support with exactly one of at: [x, y] or along: [[x, y], [x, y]], and fix: x, y or xy' },
  'supports[].at': { what: POINT, unit: 'mm' },
  'supports[].along': { what: 'a pair of [x, y] points', unit: 'mm' },
  'supports[].along[]': { what: POINT, unit: 'mm' },
  'supports[].width': { what: NONNEG, unit: 'mm', range: { ge: 0 } },
  'supports[].fix': { what: 'one of x, y, xy' },
  'supports[].platen': { what: 'one of rocker (a rigid strip that may rotate about its centre), clamped' },

  loads: { what: 'a list of at least one load' },
  'loads[]': { what: 'a load with exactly one of at: [x, y] or along: [[x, y], [x, y]], and direction: [x, y]' },
  'loads[].at': { what: POINT, unit: 'mm' },
  'loads[].along': { what: 'a pair of [x, y] points', unit: 'mm' },
  'loads[].along[]': { what: POINT, unit: 'mm' },
  'loads[].width': { what: NONNEG, unit: 'mm', range: { ge: 0 } },
  'loads[].direction': { what: 'a non-zero [x, y] direction', unit: '-' },
  'loads[].share': { what: 'a positive share of the machine force, given on every load or on none (a spreader)', unit: '-', range: { gt: 0 } },
  'loads[].platen': { what: 'one of rocker (a rigid strip that may rotate about its centre), clamped, pressure (a uniform pressure over the strip)' },

  control: { what: 'a mapping {by, gauge, reading, target, increments, stopAtLoadFraction, steps}' },
  'control.by': { what: 'one of displacement, cmod, force' },
  'control.gauge': { what: 'a mapping {from: [x, y], to: [x, y]} or the name of one of gauges' },
  'control.reading': { what: 'one of opening (along the gauge, the CMOD), sliding (across it)' },
  'control.gauge.from': { what: POINT, unit: 'mm' },
  'control.gauge.to': { what: POINT, unit: 'mm' },
  // The unit of the target follows control.by (see unitFor).
  'control.target': { what: POSITIVE, unit: 'mm', range: { gt: 0 } },
  'control.increments': { what: 'a whole number from 1 to 100000', range: { ge: 1, le: 100000, int: true } },
  'control.steps': { what: 'one of fixed (steps on the increments), adaptive (step lengths from Newton and the softening, up to 4 increments)' },
  'control.stopAtLoadFraction': { what: 'a fraction of the peak load of at least 0 (never stop) and below 1', unit: '-', range: { ge: 0, lt: 1 } },

  crack: { what: 'a mapping {start, criterion, growthStep, averagingRadius, insertAt, model}; write crack: {} for all defaults or leave crack out for an elastic analysis' },
  'crack.start': { what: 'notch-tips, anywhere or a list of [x, y] points', unit: 'mm' },
  'crack.start[]': { what: POINT, unit: 'mm' },
  'crack.criterion': { what: 'principal-stress' },
  'crack.growthStep': { what: POSITIVE, unit: 'mm', range: { gt: 0 } },
  'crack.averagingRadius': { what: POSITIVE, unit: 'mm', range: { gt: 0 } },
  'crack.insertAt': { what: 'a fraction of ft from 0.5 to 1', unit: '-', range: { ge: 0.5, le: 1 } },
  'crack.model': { what: 'one of cohesive, lefm' },

  mesh: { what: 'a mapping {size, tipSize, refineRadius, coarsen, seed, lloyd, order}' },
  'mesh.size': { what: POSITIVE, unit: 'mm', range: { gt: 0 } },
  'mesh.tipSize': { what: 'a positive number no larger than mesh.size', unit: 'mm', range: { gt: 0 } },
  'mesh.refineRadius': { what: NONNEG, unit: 'mm', range: { ge: 0 } },
  'mesh.coarsen': { what: 'true or false' },
  'mesh.seed': { what: 'a whole number from 0 to 4294967295', range: { ge: 0, le: 4294967295, int: true } },
  'mesh.lloyd': { what: 'a whole number of Lloyd iterations from 0 to 1000', range: { ge: 0, le: 1000, int: true } },
  'mesh.order': { what: '1 (linear virtual elements) or 2 (quadratic)' },

  probes: { what: 'a list of probes, each {name, at}' },
  'probes[]': { what: 'a mapping {name, at}' },
  'probes[].name': { what: 'a non-empty name' },
  'probes[].at': { what: POINT, unit: 'mm' },

  wedge: { what: 'a mapping {angle}' },
  'wedge.angle': { what: 'the included angle of the wedge, above 0 and below 90', unit: 'degrees', range: { gt: 0, lt: 90 } },
  gauges: { what: 'a list of gauges, each {name, from: [x, y], to: [x, y]}' },
  'gauges[]': { what: 'a mapping {name, from: [x, y], to: [x, y]}' },
  'gauges[].name': { what: 'a non-empty name' },
  'gauges[].from': { what: POINT, unit: 'mm' },
  'gauges[].to': { what: POINT, unit: 'mm' },

  output: { what: 'a mapping {frames, every, maxFrames, animation, vtk, pngWidth}' },
  'output.frames': { what: 'a list of picture formats (svg, png)' },
  'output.frames[]': { what: 'one of svg, png' },
  'output.every': { what: 'a whole number of steps from 1 to 100000', range: { ge: 1, le: 100000, int: true } },
  'output.maxFrames': { what: 'a whole number of frames from 1 to 10000', range: { ge: 1, le: 10000, int: true } },
  'output.animation': { what: 'one of gif, webp, none' },
  'output.vtk': { what: 'true or false' },
  'output.pngWidth': { what: 'a whole number from 100 to 8000', unit: 'px', range: { ge: 100, le: 8000, int: true } },
};

/** Field path as written in messages: supports[1].fix. */
export function dotted(path: readonly PropertyKey[]): string {
  let s = '';
  for (const p of path) {
    if (typeof p === 'number') s += `[${p}]`;
    else s += s === '' ? String(p) : `.${String(p)}`;
  }
  return s;
}

/** Table key of a path: list indices become []. */
export function fieldKey(path: readonly PropertyKey[]): string {
  return dotted(path.map((p) => (typeof p === 'number' ? -1 : p))).replace(/\[-1\]/g, '[]');
}

export function specOf(key: string): FieldSpec {
  return FIELDS[key] ?? { what: 'a valid value' };
}

/** Unit of a field; the control target is in N under force control, in mm otherwise. */
export function unitFor(key: string, controlBy?: unknown): string | undefined {
  if (key === 'control.target') return controlBy === 'force' ? 'N' : 'mm';
  return specOf(key).unit;
}

/** "must be a positive number in N/mm" for a field key. */
export function mustBe(key: string, controlBy?: unknown): string {
  const unit = unitFor(key, controlBy);
  const tail = unit === undefined ? '' : unit === '-' ? ', dimensionless' : ` in ${unit}`;
  return `must be ${specOf(key).what}${tail}`;
}

/** Whether a number lies in the field's range. */
export function inRange(v: number, r: Range): boolean {
  if (!Number.isFinite(v)) return false;
  if (r.int && !Number.isInteger(v)) return false;
  if (r.gt !== undefined && !(v > r.gt)) return false;
  if (r.ge !== undefined && !(v >= r.ge)) return false;
  if (r.lt !== undefined && !(v < r.lt)) return false;
  if (r.le !== undefined && !(v <= r.le)) return false;
  return true;
}
