import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { InputError } from '../src/errors.js';
import { parseCase } from '../src/case/index.js';

const demoText = readFileSync(new URL('../cases/beam-3pb-demo.yaml', import.meta.url), 'utf8');
type Obj = Record<string, any>;
const demo = (): Obj => parse(demoText) as Obj;

/** Message of the InputError that a mutated demo case raises. */
function messageOf(mutate: (c: Obj) => void): string {
  const c = demo();
  mutate(c);
  try {
    parseCase(JSON.stringify(c), 'beam.json');
  } catch (e) {
    if (e instanceof InputError) return e.message;
    throw e;
  }
  return '(no error)';
}

// Each row: what is wrong, how the demo case is spoilt, the exact sentence expected.
const cases: [string, (c: Obj) => void, string][] = [
  ["negative GF", (c) => { c.material.GF = -0.1; }, "material.GF must be a positive number in N/mm (found -0.1)"],
  ["fix z", (c) => { c.supports[1].fix = 'z'; }, "supports[1].fix must be one of x, y, xy (found \"z\")"],
  ["outline two points", (c) => { c.geometry.outline = [[0,0],[440,0]]; }, "geometry.outline must be a list of at least 3 [x, y] points in mm (found 2 points)"],
  ["misspelt Gf", (c) => { c.material.Gf = c.material.GF; delete c.material.GF; }, "material.Gf is not a known key; did you mean material.GF?"],
  ["units m-kN", (c) => { c.units = 'm-kN'; }, "units must be mm-N-MPa (found \"m-kN\")"],
  ["nu 0.5", (c) => { c.material.nu = 0.5; }, "material.nu must be a number of at least 0 and below 0.5, dimensionless (found 0.5)"],
  ["nu negative", (c) => { c.material.nu = -0.1; }, "material.nu must be a number of at least 0 and below 0.5, dimensionless (found -0.1)"],
  ["E zero", (c) => { c.material.E = 0; }, "material.E must be a positive number in MPa (found 0)"],
  ["ft string with unit", (c) => { c.material.ft = '3.1 MPa'; }, "material.ft must be a positive number in MPa (found \"3.1 MPa\"; write the number alone)"],
  ["thickness missing", (c) => { delete c.thickness; }, "thickness must be a positive number in mm (missing)"],
  ["thickness negative", (c) => { c.thickness = -50; }, "thickness must be a positive number in mm (found -50)"],
  ["tipSize above size", (c) => { c.mesh.tipSize = 12; }, "mesh.tipSize must be a positive number no larger than mesh.size in mm (found 12, mesh.size is 10)"],
  ["averagingRadius zero", (c) => { c.crack.averagingRadius = 0; }, "crack.averagingRadius must be a positive number in mm (found 0)"],
  ["insertAt above 1", (c) => { c.crack.insertAt = 1.2; }, "crack.insertAt must be a fraction of ft from 0.5 to 1, dimensionless (found 1.2)"],
  ["cmod without gauge", (c) => { delete c.control.gauge; }, "control.gauge is required when control.by is cmod"],
  ["force target zero", (c) => { c.control.by = 'force'; c.control.target = 0; }, "control.target must be a positive number in N (found 0)"],
  ["increments fraction", (c) => { c.control.increments = 2.5; }, "control.increments must be a whole number from 1 to 100000 (found 2.5)"],
  ["increments too many", (c) => { c.control.increments = 200000; }, "control.increments must be a whole number from 1 to 100000 (found 200000)"],
  ["self-intersecting outline", (c) => { c.geometry.outline = [[0,0],[440,100],[440,0],[0,100]]; }, "geometry.outline must be a simple polygon that does not touch or cross itself (found edge 0 touching edge 2 near [220, 50] mm)"],
  ["notch outside", (c) => { c.geometry.notches[0] = {from: [500, 0], to: [500, 30], width: 2}; }, "geometry.notches[0].from must be a point on the outline or inside it in mm (found [500, 0])"],
  ["notch tip outside", (c) => { c.geometry.notches[0].to = [220, 130]; }, "geometry.notches[0].to must be a point inside the specimen, off its boundary, in mm (found [220, 130])"],
  ["hole outside", (c) => { c.geometry.holes = [{circle: {center: [430, 50], radius: 20}}]; }, "geometry.holes[0] must lie inside the outline without touching it (found a circle at [430, 50] with radius 20 mm)"],
  ["support off boundary", (c) => { c.supports[0].at = [20, 1]; }, "supports[0].at must be a point on the specimen boundary in mm (found [20, 1], the nearest boundary point is [20, 0])"],
  ["load off boundary", (c) => { c.loads[0].at = [220, 90]; }, "loads[0].at must be a point on the specimen boundary in mm (found [220, 90], the nearest boundary point is [220, 100])"],
  ["gauge inside the notch mouth", (c) => { c.control.gauge.from = [220, 0]; }, "control.gauge.from must be a point of the specimen in mm (found [220, 0], inside the cut of geometry.notches[0])"],
  ["no supports", (c) => { c.supports = []; }, "supports must be a list of at least one support (found an empty list)"],
  ["unknown top-level key", (c) => { c.colour = 'red'; }, "colour is not a known key; the known top-level keys are format, title, units, model, thickness, geometry, material, supports, loads, control, crack, mesh, probes, wedge, gauges, output"],
  ["misplaced holes key", (c) => { c.holes = []; }, "holes is not a known key here; did you mean geometry.holes?"],
  ["unknown key without a near name", (c) => { c.material.density = 2400; }, "material.density is not a known key; the known keys of material are E, nu, ft, GF, softening, shearWeight, KIc, strengthField"],
  ["hole with both shapes", (c) => { c.geometry.holes = [{circle: {center: [100, 50], radius: 5}, polygon: [[1,1],[2,1],[2,2]]}]; }, "geometry.holes[0] must be either {circle: {center, radius}} or {polygon: [[x, y], ...]} (found a mapping with keys circle, polygon)"],
  ["support with at and along", (c) => { c.supports[0].along = [[0,0],[10,0]]; }, "supports[0] must be a support with exactly one of at: [x, y] or along: [[x, y], [x, y]], and fix: x, y or xy (found a mapping with keys at, fix, along)"],
  ["point of three numbers", (c) => { c.supports[0].at = [20, 0, 0]; }, "supports[0].at must be an [x, y] point in mm (found [20, 0, 0])"],
  ["softening unknown", (c) => { c.material.softening = 'cubic'; }, "material.softening must be one of linear, bilinear, exponential (found \"cubic\")"],
  ["zero load direction", (c) => { c.loads[0].direction = [0, 0]; }, "loads[0].direction must be a non-zero [x, y] direction, dimensionless (found [0, 0])"],
  ["rigid body free in x", (c) => { c.supports[1].fix = 'y'; }, "supports must hold the specimen against rigid-body motion in x, y and rotation, together with the displacements the loads prescribe (found no support or load holding x)"],
  ["format 2", (c) => { c.format = 2; }, "format must be 1, the only case-file format so far (found 2)"],
  ["control.by typo value", (c) => { c.control.by = 'CMOD'; }, "control.by must be one of displacement, cmod, force (found \"CMOD\")"],
  ["crack start notch-tips without notches", (c) => { c.geometry.notches = []; }, "crack.start must be anywhere or a list of [x, y] points in mm when the geometry has no notches (found \"notch-tips\")"],
  ["crack empty value", (c) => { c.crack = null; }, "crack must be a mapping {start, criterion, growthStep, averagingRadius, insertAt, model}; write crack: {} for all defaults or leave crack out for an elastic analysis (found an empty value)"],
  ["probe outside", (c) => { c.probes[1].at = [500, 50]; }, "probes[1].at must be a point in the specimen in mm (found [500, 50])"],
  ["duplicate probe name", (c) => { c.probes[1].name = 'load-point'; }, "probes[1].name must be a name no other probe uses (found \"load-point\" twice)"],
  ["bad outline point", (c) => { c.geometry.outline[2] = [440, 'top']; }, "geometry.outline[2] must be an [x, y] point in mm (found [440, \"top\"])"],
  ["stopAtLoadFraction 1", (c) => { c.control.stopAtLoadFraction = 1; }, "control.stopAtLoadFraction must be a fraction of the peak load of at least 0 (never stop) and below 1, dimensionless (found 1)"],
  ["mesh too fine", (c) => { c.mesh.size = 0.01; c.mesh.tipSize = 0.002; }, "mesh.size and mesh.tipSize must give at most 2000000 polygons (found about 754159265 polygons with size 0.01 mm and tipSize 0.002 mm)"],
  ["along with width", (c) => { c.supports[0] = {along: [[0,0],[10,0]], fix: 'y', width: 5}; }, "supports[0].width must be 0 for a support or load along an edge; a bearing width applies to a point (found 5)"],
  ["along across a corner", (c) => { c.supports[0] = {along: [[0,50],[10,0]], fix: 'y'}; }, "supports[0].along must be two points on one straight edge of the specimen in mm (found [0, 50] to [10, 0])"],
  ["bearing strip over a corner", (c) => { c.supports[0] = { at: [0, 0], fix: 'y', width: 10 }; }, "supports[0].width must fit on the boundary around supports[0].at without turning by more than 45° in mm (found 10 at [0, 0], where the boundary turns by 90°)"],
  ["quoted number", (c) => { c.thickness = '50'; }, "thickness must be a positive number in mm (found \"50\"; write it without quotes)"],
  ["key of another mapping", (c) => { c.supports[0].direction = [0, 1]; }, "supports[0].direction is not a known key here; did you mean loads[].direction?"],
  ["pngWidth small", (c) => { c.output.pngWidth = 50; }, "output.pngWidth must be a whole number from 100 to 8000 in px (found 50)"],
  ["frames unknown", (c) => { c.output.frames = ['svg', 'jpg']; }, "output.frames[1] must be one of svg, png (found \"jpg\")"],
  ["tip_size typo", (c) => { c.mesh.tip_size = 2; delete c.mesh.tipSize; }, "mesh.tip_size is not a known key; did you mean mesh.tipSize?"],
  ["crack start bad point", (c) => { c.crack.start = [[220, 30], [1]]; }, "crack.start[1] must be an [x, y] point in mm (found [1])"],
];

describe('bad demo cases give one exact sentence', () => {
  it.each(cases)('%s', (_label, mutate, expected) => {
    expect(messageOf(mutate)).toBe(expected);
  });
});

describe('whole-file mistakes', () => {
  const whole: [string, string][] = [
    ['[1, 2]', 'the case file must be a mapping of case keys such as format, units, geometry, material, supports, loads and control (found [1, 2])'],
    ['just words', 'the case file must be a mapping of case keys such as format, units, geometry, material, supports, loads and control (found "just words")'],
    ['format: 1\n', 'units must be mm-N-MPa (missing)'],
  ];
  it.each(whole)('%j', (text, expected) => {
    let msg = '(no error)';
    try { parseCase(text, 'w.yaml'); } catch (e) { msg = (e as Error).message; }
    expect(msg).toBe(expected);
  });
});
