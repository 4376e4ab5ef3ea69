import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { parse, stringify } from 'yaml';
import { InputError } from '../src/errors.js';
import { checkCase, describeCase, loadCase, parseCase, type CaseModel } from '../src/case/index.js';

const casesDir = new URL('../cases/', import.meta.url);
const demoPath = new URL('beam-3pb-demo.yaml', casesDir);
const demoText = readFileSync(demoPath, 'utf8');

const minimal = {
  format: 1,
  units: 'mm-N-MPa',
  thickness: 50,
  geometry: { outline: [[0, 0], [400, 0], [400, 100], [0, 100]], notches: [{ from: [200, 0], to: [200, 40] }] },
  material: { E: 30000, nu: 0.2, ft: 3, GF: 0.1 },
  supports: [{ at: [0, 0], fix: 'xy' }, { at: [400, 0], fix: 'y' }],
  loads: [{ at: [200, 100], direction: [0, -3] }],
  control: { target: 0.3 },
  crack: {},
};

const errorOf = (f: () => unknown): string => {
  try { f(); } catch (e) { if (e instanceof InputError) return e.message; throw e; }
  return '(no error)';
};

describe('shipped cases', () => {
  const files = readdirSync(casesDir).filter((f) => /\.(ya?ml|json)$/.test(f));
  it('include the demo beam and the elastic plate', () => {
    expect(files).toEqual(expect.arrayContaining(['beam-3pb-demo.yaml', 'plate-hole-elastic.yaml']));
  });
  it.each(files)('%s loads', (f) => {
    const c = loadCase(join(casesDir.pathname, f));
    expect(c.name).toBe(f.replace(/\.[^.]+$/, ''));
  });
  it('demo beam keeps its values', () => {
    const c = loadCase(demoPath.pathname);
    expect(c.material).toEqual({ E: 32000, nu: 0.2, ft: 3.1, GF: 0.11, softening: 'bilinear', shearWeight: 1 });
    expect(c.control).toEqual({ by: 'cmod', gauge: { from: [219, 0], to: [221, 0] }, reading: 'opening', target: 1, increments: 100, stopAtLoadFraction: 0.05 });
    expect(c.crack).toEqual({ start: 'notch-tips', criterion: 'principal-stress', growthStep: 4, averagingRadius: 6, insertAt: 0.8, model: 'cohesive' });
    expect(c.mesh).toEqual({ size: 10, tipSize: 2, refineRadius: 20, coarsen: true, seed: 1, lloyd: 8, order: 1 });
  });
  it('elastic plate has no crack section', () => {
    expect(loadCase(new URL('plate-hole-elastic.yaml', casesDir).pathname).crack).toBeUndefined();
  });
});

describe('defaults', () => {
  it('fills every optional field', () => {
    const c = parseCase(JSON.stringify(minimal), 'runs/small-beam.json');
    expect(c.name).toBe('small-beam');
    expect(c.title).toBe('small-beam');
    expect(c.model).toBe('plane-stress');
    expect(c.geometry.holes).toEqual([]);
    expect(c.geometry.notches).toEqual([{ from: [200, 0], to: [200, 40], width: 0 }]);
    expect(c.material.softening).toBe('bilinear');
    expect(c.material.shearWeight).toBe(1);
    expect(c.supports.map((s) => s.width)).toEqual([0, 0]);
    expect(c.loads[0]!.width).toBe(0);
    expect(c.loads[0]!.direction).toEqual([0, -1]);
    expect(c.control).toEqual({ by: 'displacement', reading: 'opening', target: 0.3, increments: 100, stopAtLoadFraction: 0.05 });
    // Shortest side 100 mm / 10, tip size / 5, radius 10 tips, step 2 tips, averaging 3 tips.
    expect(c.mesh).toEqual({ size: 10, tipSize: 2, refineRadius: 20, coarsen: true, seed: 1, lloyd: 8, order: 1 });
    expect(c.crack).toEqual({ start: 'notch-tips', criterion: 'principal-stress', growthStep: 4, averagingRadius: 6, insertAt: 0.8, model: 'cohesive' });
    expect(c.probes).toEqual([]);
    expect(c.gauges).toEqual([]);
    expect(c.output).toEqual({ frames: ['png'], every: 1, maxFrames: 40, animation: 'gif', vtk: false, pngWidth: 1200 });
  });
  it('derives the tip size from a given mesh size', () => {
    const c = parseCase(JSON.stringify({ ...minimal, mesh: { size: 5 } }), 'a.json');
    expect(c.mesh.tipSize).toBe(1);
    expect(c.mesh.refineRadius).toBe(10);
    expect(c.crack!.growthStep).toBe(2);
    expect(c.crack!.averagingRadius).toBe(3);
  });
  it('leaves crack undefined without a crack section and starts anywhere without notches', () => {
    const { crack: _c, ...elastic } = minimal;
    expect(parseCase(JSON.stringify(elastic), 'a.json').crack).toBeUndefined();
    const plain = { ...minimal, geometry: { outline: minimal.geometry.outline } };
    expect(parseCase(JSON.stringify(plain), 'a.json').crack!.start).toBe('anywhere');
  });
  it('normalises load directions and drops a repeated closing point', () => {
    const c = parseCase(JSON.stringify({
      ...minimal,
      geometry: { outline: [...minimal.geometry.outline, [0, 0]] },
      loads: [{ at: [200, 100], direction: [3, -4] }],
    }), 'a.json');
    expect(c.loads[0]!.direction[0]).toBeCloseTo(0.6, 15);
    expect(c.loads[0]!.direction[1]).toBeCloseTo(-0.8, 15);
    expect(c.geometry.outline).toHaveLength(4);
  });
});

describe('formats', () => {
  it('JSON and YAML give the same model', () => {
    const fromYaml = parseCase(demoText, 'beam-3pb-demo.yaml');
    const fromJson = parseCase(JSON.stringify(parse(demoText)), 'beam-3pb-demo.json');
    expect(fromJson).toEqual(fromYaml);
    // JSON content is recognised without the extension, YAML flow style too.
    expect(parseCase(JSON.stringify(parse(demoText), null, 2), 'beam-3pb-demo')).toEqual(fromYaml);
    expect(parseCase(stringify(parse(demoText)), 'beam-3pb-demo.yml')).toEqual(fromYaml);
  });
  it('YAML syntax errors name line and column', () => {
    expect(errorOf(() => parseCase('format: 1\nunits: [mm-N-MPa\nthickness: 5\n', 'b.yaml')))
      .toBe('b.yaml is not valid YAML at line 3, column 1: flow sequence in block collection must be sufficiently indented and end with a ]');
    expect(errorOf(() => parseCase('format: 1\nformat: 1\n', 'b.yaml')))
      .toBe('b.yaml is not valid YAML at line 2, column 1: map keys must be unique');
  });
  it('JSON syntax errors name line and column', () => {
    expect(errorOf(() => parseCase('{\n  "format": 1,\n  "units" "mm-N-MPa"\n}', 'b.json')))
      .toMatch(/^b\.json is not valid JSON at line 3, column 11: /);
  });
  it('an empty file is one sentence', () => {
    expect(errorOf(() => parseCase('  \n', 'e.yaml'))).toMatch(/^e\.yaml is empty; a case file needs at least format, units/);
  });
  it('a missing or unreadable file is an InputError', () => {
    const dir = mkdtempSync(join(tmpdir(), 'case-'));
    expect(errorOf(() => loadCase(join(dir, 'none.yaml')))).toBe(`the case file ${join(dir, 'none.yaml')} does not exist`);
    expect(errorOf(() => loadCase(dir))).toBe(`the case file ${dir} is a folder, not a case file`);
    writeFileSync(join(dir, 'ok.yaml'), demoText);
    expect(loadCase(join(dir, 'ok.yaml')).name).toBe('ok');
  });
});

describe('messages', () => {
  it('an unknown key is reported before the missing key it replaces', () => {
    const c = parse(demoText);
    c.material.gf = c.material.GF; delete c.material.GF;
    expect(errorOf(() => parseCase(JSON.stringify(c), 'x.json'))).toBe('material.gf is not a known key; did you mean material.GF?');
  });
  it('the target unit follows the control', () => {
    const c = parse(demoText);
    c.control.target = 'ten';
    expect(errorOf(() => parseCase(JSON.stringify(c), 'x.json'))).toBe('control.target must be a positive number in mm (found "ten")');
    c.control.by = 'force';
    expect(errorOf(() => parseCase(JSON.stringify(c), 'x.json'))).toBe('control.target must be a positive number in N (found "ten")');
  });
  it('points on notch faces count as boundary; a sharp slit has its mouth on the outline', () => {
    const c = parse(demoText);
    c.control.gauge = { from: [219, 10], to: [221, 10] };
    expect(parseCase(JSON.stringify(c), 'x.json').control.gauge).toEqual({ from: [219, 10], to: [221, 10] });
    c.geometry.notches[0].width = 0;
    c.control.gauge = { from: [220, 0], to: [220, 10] };
    expect(() => parseCase(JSON.stringify(c), 'x.json')).not.toThrow();
  });
  it('polygon holes are accepted inside and rejected when overlapping', () => {
    const c = parse(demoText);
    c.geometry.holes = [{ polygon: [[50, 40], [70, 40], [70, 60], [50, 60]] }];
    expect(parseCase(JSON.stringify(c), 'x.json').geometry.holes[0]).toEqual({ kind: 'polygon', points: [[50, 40], [70, 40], [70, 60], [50, 60]] });
    c.geometry.holes.push({ circle: { center: [75, 50], radius: 8 } });
    expect(errorOf(() => parseCase(JSON.stringify(c), 'x.json')))
      .toBe('geometry.holes[1] must not touch or overlap geometry.holes[0] (found a circle at [75, 50] with radius 8 mm)');
  });
  it('supports that leave a rotation free are refused', () => {
    const c = parse(demoText);
    c.supports = [{ at: [20, 0], fix: 'x' }, { at: [420, 0], fix: 'x' }]; // with the load, only x twice and y once
    expect(errorOf(() => parseCase(JSON.stringify(c), 'x.json')))
      .toBe('supports must hold the specimen against rigid-body motion in x, y and rotation, together with the displacements the loads prescribe (found supports and loads that leave a rotation free)');
  });
  it('counts the displacements the loads prescribe: a bar pulled at both ends is held', () => {
    const c = parse(demoText);
    c.geometry = { outline: [[0, 0], [200, 0], [200, 20], [0, 20]], notches: [{ from: [100, 0], to: [100, 5], width: 1 }] };
    c.supports = [{ at: [50, 0], fix: 'y' }];
    c.loads = [{ along: [[0, 0], [0, 20]], direction: [-1, 0] }, { along: [[200, 0], [200, 20]], direction: [1, 0] }];
    c.control = { by: 'displacement', target: 0.05 };
    c.probes = [];
    delete c.crack;
    expect(() => parseCase(JSON.stringify(c), 'x.json')).not.toThrow();
    c.loads = [{ along: [[200, 0], [200, 20]], direction: [0, 1] }]; // pulled sideways: nothing holds x
    expect(errorOf(() => parseCase(JSON.stringify(c), 'x.json'))).toMatch(/found no support or load holding x/);
  });
  it('checkCase guards models built in scripts', () => {
    const c: CaseModel = parseCase(demoText, 'beam-3pb-demo.yaml');
    expect(() => checkCase(c)).not.toThrow();
    c.material.E = -1;
    expect(errorOf(() => checkCase(c))).toBe('material.E must be a positive number in MPa (found -1)');
  });
});

describe('describeCase', () => {
  it('summarises the demo beam', () => {
    const text = describeCase(parseCase(demoText, 'beam-3pb-demo.yaml'));
    expect(text.split('\n')[0]).toBe('Demo mix C-41, lab bay 3, notched beam N-1 (beam-3pb-demo)');
    // l_ch = E·GF/ft² = 32000·0.11/3.1² = 366.3 mm (Hillerborg, Modéer & Petersson 1976).
    expect(text).toContain('l_ch 366 mm');
    expect(text).toContain('specimen   440 × 100 mm');
    expect(text).toContain('cmod to 1 mm in 100 increments, gauge [219, 0]–[221, 0]');
    expect(text).toContain('size 10 mm, tip 2 mm within 20 mm');
  });
});
