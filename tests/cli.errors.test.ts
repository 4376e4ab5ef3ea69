// Bad case files and bad command lines through the real command line: one sentence on
// stderr, exit code 2, never a stack trace.
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parse, stringify } from 'yaml';
import { CLI, ROOT, rupta, ensureBuilt, type Ran } from './support/cli.js';

const demoText = readFileSync(join(ROOT, 'cases', 'beam-3pb-demo.yaml'), 'utf8');



/** Runs the jobs two at a time (the machine has two cores), results in input order. */
async function pool<T, R>(items: readonly T[], job: (t: T) => Promise<R>, width = 2): Promise<R[]> {
  const out: R[] = new Array(items.length);
  let next = 0;
  const worker = async () => { while (next < items.length) { const i = next++; out[i] = await job(items[i]!); } };
  await Promise.all(Array.from({ length: width }, worker));
  return out;
}

type Obj = Record<string, any>;
/** A row: what is wrong, the case file (a mutation of the demo, raw text, or no file), the sentence expected. */
interface Row { what: string; file?: string; mutate?: (c: Obj) => void; text?: string; args?: string[]; want: string | RegExp }

const rows: Row[] = [
  // Wrong types.
  { what: 'thickness a word', mutate: (c) => { c.thickness = 'fifty'; }, want: 'thickness must be a positive number in mm (found "fifty")' },
  { what: 'E with a unit', mutate: (c) => { c.material.E = '32 GPa'; }, want: 'material.E must be a positive number in MPa (found "32 GPa"; write the number alone)' },
  { what: 'ft quoted', mutate: (c) => { c.material.ft = '3.1'; }, want: 'material.ft must be a positive number in MPa (found "3.1"; write it without quotes)' },
  { what: 'coarsen yes-word', mutate: (c) => { c.mesh.coarsen = 'yes'; }, want: 'mesh.coarsen must be true or false (found "yes")' },
  { what: 'supports a mapping', mutate: (c) => { c.supports = c.supports[0]; }, want: 'supports must be a list of at least one support (found a mapping with keys at, fix)' },
  { what: 'outline point a string', mutate: (c) => { c.geometry.outline[1] = '440, 0'; }, want: 'geometry.outline[1] must be an [x, y] point in mm (found "440, 0")' },
  { what: 'title a number', mutate: (c) => { c.title = 12; }, want: 'title must be a line of text (found 12)' },
  { what: 'model unknown', mutate: (c) => { c.model = '3d'; }, want: 'model must be one of plane-stress, plane-strain (found "3d")' },
  { what: 'increments fractional', mutate: (c) => { c.control.increments = 2.5; }, want: 'control.increments must be a whole number from 1 to 100000 (found 2.5)' },
  { what: 'control by stress', mutate: (c) => { c.control.by = 'stress'; }, want: 'control.by must be one of displacement, cmod, force (found "stress")' },
  // Missing keys.
  { what: 'ft missing', mutate: (c) => { delete c.material.ft; }, want: 'material.ft must be a positive number in MPa (missing)' },
  { what: 'loads missing', mutate: (c) => { delete c.loads; }, want: 'loads must be a list of at least one load (missing)' },
  { what: 'outline missing', mutate: (c) => { delete c.geometry.outline; }, want: 'geometry.outline must be a list of at least 3 [x, y] points in mm (missing)' },
  { what: 'format missing', mutate: (c) => { delete c.format; }, want: 'format must be 1, the only case-file format so far (missing)' },
  { what: 'cmod control without gauge', mutate: (c) => { delete c.control.gauge; }, want: 'control.gauge is required when control.by is cmod' },
  // Zero or negative sizes and values out of range.
  { what: 'thickness zero', mutate: (c) => { c.thickness = 0; }, want: 'thickness must be a positive number in mm (found 0)' },
  { what: 'mesh size negative', mutate: (c) => { c.mesh.size = -10; }, want: 'mesh.size must be a positive number in mm (found -10)' },
  { what: 'notch width negative', mutate: (c) => { c.geometry.notches[0].width = -2; }, want: 'geometry.notches[0].width must be zero or a positive number in mm (found -2)' },
  { what: 'hole radius zero', mutate: (c) => { c.geometry.holes = [{ circle: { center: [100, 50], radius: 0 } }]; }, want: 'geometry.holes[0].circle.radius must be a positive number in mm (found 0)' },
  { what: 'growth step negative', mutate: (c) => { c.crack.growthStep = -4; }, want: 'crack.growthStep must be a positive number in mm (found -4)' },
  { what: 'support width negative', mutate: (c) => { c.supports[0].width = -1; }, want: 'supports[0].width must be zero or a positive number in mm (found -1)' },
  { what: 'nu above 0.5', mutate: (c) => { c.material.nu = 0.6; }, want: 'material.nu must be a number of at least 0 and below 0.5, dimensionless (found 0.6)' },
  { what: 'png too narrow', mutate: (c) => { c.output.pngWidth = 50; }, want: 'output.pngWidth must be a whole number from 100 to 8000 in px (found 50)' },
  { what: 'tip cells larger than the mesh', mutate: (c) => { c.mesh.tipSize = 12; }, want: 'mesh.tipSize must be a positive number no larger than mesh.size in mm (found 12, mesh.size is 10)' },
  // Softening law.
  { what: 'unknown softening law', mutate: (c) => { c.material.softening = 'cubic'; }, want: 'material.softening must be one of linear, bilinear, exponential (found "cubic")' },
  // Outline, holes and notches.
  { what: 'self-intersecting outline', mutate: (c) => { c.geometry.outline = [[0, 0], [440, 100], [440, 0], [0, 100]]; },
    want: 'geometry.outline must be a simple polygon that does not touch or cross itself (found edge 0 touching edge 2 near [220, 50] mm)' },
  { what: 'hole outside the specimen', mutate: (c) => { c.geometry.holes = [{ circle: { center: [600, 50], radius: 10 } }]; },
    want: 'geometry.holes[0] must lie inside the outline without touching it (found a circle at [600, 50] with radius 10 mm)' },
  { what: 'hole overlapping the outline', mutate: (c) => { c.geometry.holes = [{ circle: { center: [100, 95], radius: 10 } }]; },
    want: 'geometry.holes[0] must lie inside the outline without touching it (found a circle at [100, 95] with radius 10 mm)' },
  { what: 'polygon hole crossing the outline', mutate: (c) => { c.geometry.holes = [{ polygon: [[300, 50], [460, 50], [460, 70], [300, 70]] }]; },
    want: 'geometry.holes[0] must lie inside the outline without touching it (found a polygon of 4 points)' },
  { what: 'holes overlapping each other', mutate: (c) => { c.geometry.holes = [{ circle: { center: [100, 50], radius: 15 } }, { circle: { center: [120, 50], radius: 15 } }]; },
    want: 'geometry.holes[1] must not touch or overlap geometry.holes[0] (found a circle at [120, 50] with radius 15 mm)' },
  { what: 'notch tip outside', mutate: (c) => { c.geometry.notches[0].to = [220, 130]; },
    want: 'geometry.notches[0].to must be a point inside the specimen, off its boundary, in mm (found [220, 130])' },
  { what: 'notch mouth outside', mutate: (c) => { c.geometry.notches[0].from = [220, -20]; },
    want: 'geometry.notches[0].from must be a point on the outline or inside it in mm (found [220, -20])' },
  { what: 'notch of zero length', mutate: (c) => { c.geometry.notches[0].to = [220, 0]; },
    want: 'geometry.notches[0] must have distinct from and to points (found both at [220, 0] mm)' },
  // Supports, loads, gauge and points on the boundary.
  { what: 'support off the boundary', mutate: (c) => { c.supports[0].at = [20, 5]; },
    want: 'supports[0].at must be a point on the specimen boundary in mm (found [20, 5], the nearest boundary point is [20, 0])' },
  { what: 'load inside the specimen', mutate: (c) => { c.loads[0].at = [220, 50]; },
    want: 'loads[0].at must be a point on the specimen boundary in mm (found [220, 50], the nearest boundary point is [220, 30])' },
  { what: 'load inside the notch cut', mutate: (c) => { c.loads[0].at = [220, 10]; },
    want: 'loads[0].at must be a point on the specimen boundary in mm (found [220, 10], inside the cut of geometry.notches[0])' },
  { what: 'gauge end outside the specimen', mutate: (c) => { c.control.gauge.to = [300, -5]; },
    want: 'control.gauge.to must be a point of the specimen in mm (found [300, -5], outside the specimen or in a hole)' },
  { what: 'support strip past the corner', mutate: (c) => { c.supports[0].width = 60; },
    want: 'supports[0].width must fit on the boundary around supports[0].at without turning by more than 45° in mm (found 60 at [20, 0], where the boundary turns by 90°)' },
  { what: 'support along two edges', mutate: (c) => { c.supports[0] = { along: [[10, 0], [440, 50]], fix: 'y' }; },
    want: 'supports[0].along must be two points on one straight edge of the specimen in mm (found [10, 0] to [440, 50])' },
  { what: 'zero load direction', mutate: (c) => { c.loads[0].direction = [0, 0]; },
    want: 'loads[0].direction must be a non-zero [x, y] direction, dimensionless (found [0, 0])' },
  { what: 'crack start outside', mutate: (c) => { c.crack.start = [[500, 50]]; }, want: 'crack.start[0] must be a point in the specimen in mm (found [500, 50])' },
  { what: 'probe outside', mutate: (c) => { c.probes[1].at = [220, 150]; }, want: 'probes[1].at must be a point in the specimen in mm (found [220, 150])' },
  { what: 'probe names twice', mutate: (c) => { c.probes[1].name = 'load-point'; }, want: 'probes[1].name must be a name no other probe uses (found "load-point" twice)' },
  // Rigid-body motion.
  { what: 'nothing fixes x', mutate: (c) => { c.supports[1].fix = 'y'; },
    want: 'supports must hold the specimen against rigid-body motion in x, y and rotation, together with the displacements the loads prescribe (found no support or load holding x)' },
  { what: 'two rollers in x leave rotation free', mutate: (c) => { c.supports = [{ at: [20, 0], fix: 'x' }, { at: [420, 0], fix: 'x' }]; },
    want: 'supports must hold the specimen against rigid-body motion in x, y and rotation, together with the displacements the loads prescribe (found supports and loads that leave a rotation free)' },
  // Mesh too large to run.
  { what: 'mesh over the polygon limit', mutate: (c) => { c.mesh.size = 0.05; c.mesh.tipSize = 0.01; },
    want: /^mesh\.size and mesh\.tipSize must give at most 2000000 polygons \(found about \d+ polygons with size 0\.05 mm and tipSize 0\.01 mm\)$/ },
  // Unknown keys.
  { what: 'misspelt GF', mutate: (c) => { c.material.Gf = c.material.GF; delete c.material.GF; }, want: 'material.Gf is not a known key; did you mean material.GF?' },
  { what: 'misspelt supports', mutate: (c) => { c.suports = c.supports; delete c.supports; }, want: 'suports is not a known key; did you mean supports?' },
  { what: 'holes at the top level', mutate: (c) => { c.holes = []; }, want: 'holes is not a known key here; did you mean geometry.holes?' },
  { what: 'unknown key, no near name', mutate: (c) => { c.material.density = 2400; },
    want: 'material.density is not a known key; the known keys of material are E, nu, ft, GF, softening, shearWeight, KIc, strengthField' },
  // YAML and JSON syntax, empty and missing files.
  { what: 'YAML indentation', file: 'indent.yaml', text: 'format: 1\nunits: mm-N-MPa\n  thickness: 50\n', want: /^indent\.yaml is not valid YAML at line 2, column \d+: / },
  { what: 'YAML unclosed bracket', file: 'bracket.yaml', text: 'format: 1\ngeometry:\n  outline: [[0, 0], [440, 0]\n', want: /^bracket\.yaml is not valid YAML at line \d+, column \d+: .*\]/ },
  { what: 'YAML duplicate key', file: 'dup.yaml', text: 'format: 1\nformat: 1\n', want: 'dup.yaml is not valid YAML at line 2, column 1: map keys must be unique' },
  { what: 'YAML tab indentation', file: 'tab.yaml', text: 'format: 1\ngeometry:\n\toutline: []\n', want: 'tab.yaml is not valid YAML at line 3, column 1: tabs are not allowed as indentation' },
  { what: 'YAML list, not a mapping', file: 'list.yaml', text: '- 1\n- 2\n',
    want: 'the case file must be a mapping of case keys such as format, units, geometry, material, supports, loads and control (found [1, 2])' },
  { what: 'JSON trailing comma', file: 'bad.json', text: '{"format": 1,}', want: /^bad\.json is not valid JSON at line 1, column 14: / },
  { what: 'empty file', file: 'empty.yaml', text: '',
    want: 'empty.yaml is empty; a case file needs at least format, units, thickness, geometry, material, supports, loads and control' },
  { what: 'missing file', file: 'nosuch.yaml', want: 'the case file nosuch.yaml does not exist' },
  { what: 'a folder', file: 'folder.yaml', want: 'the case file folder.yaml is a folder, not a case file' },
  // Bad command lines.
  { what: 'unknown option', args: ['run', '--frobnicate', 'good.yaml'], want: 'unknown option --frobnicate for rupta run (see rupta run --help)' },
  { what: 'misspelt option', args: ['run', 'good.yaml', '--quite'], want: 'unknown option --quite for rupta run; did you mean --quiet? (see rupta run --help)' },
  { what: 'unknown command', args: ['frobnicate', 'good.yaml'], want: 'unknown command frobnicate (see rupta --help)' },
  { what: 'misspelt command', args: ['chek', 'good.yaml'], want: 'unknown command chek; did you mean check? (see rupta --help)' },
  { what: 'missing case argument', args: ['check'], want: 'missing required argument case for rupta check (see rupta check --help)' },
  { what: 'two case arguments', args: ['check', 'good.yaml', 'good.yaml'], want: 'too many arguments (expected 1, found 2) for rupta check (see rupta check --help)' },
  { what: 'option without its value', args: ['run', 'good.yaml', '--out'], want: 'option --out <dir> needs a value for rupta run (see rupta run --help)' },
  { what: 'unknown template', args: ['new', 'nosuch'], want: /^template "nosuch" is not known; the templates are beam-3pb, .*ceramic-bend-bar$/ },
  { what: 'negative span', args: ['new', 'beam-3pb', '--span', '-5'], want: '--span of template beam-3pb must be a number from 0.1 to 100000 in mm (found -5)' },
  { what: 'unknown template option', args: ['new', 'beam-3pb', '--spam', '400'], want: '--spam is not an option of template beam-3pb; did you mean --span?' },
  { what: 'template option without value', args: ['new', 'beam-3pb', '--span'], want: '--span needs a value, as in --span 100 (see rupta new --list)' },
  { what: 'template name missing', args: ['new', '--depth', '100'], want: /^the template name is missing; give one of beam-3pb, / },
];

let dir = '';

beforeAll(() => {
  ensureBuilt();
  dir = mkdtempSync(join(tmpdir(), 'rupta-cli-errors-'));
  writeFileSync(join(dir, 'good.yaml'), demoText);
  mkdirSync(join(dir, 'folder.yaml'));
  rows.forEach((r, i) => {
    if (r.mutate) {
      const c = parse(demoText) as Obj;
      r.mutate(c);
      r.file = `bad-${i}.yaml`;
      writeFileSync(join(dir, r.file), stringify(c));
    } else if (r.text !== undefined) writeFileSync(join(dir, r.file!), r.text);
  });
}, 120_000);

afterAll(() => { if (dir) rmSync(dir, { recursive: true, force: true }); });

describe('rupta with bad input', () => {
  it('has a table of at least 30 bad case files', () => {
    expect(rows.filter((r) => !r.args).length).toBeGreaterThanOrEqual(30);
  });

  it('answers each with one sentence and exit code 2', async () => {
    const ran = await pool(rows, (r) => rupta(r.args ?? ['check', r.file!], dir));
    const wrong: string[] = [];
    rows.forEach((r, i) => {
      const { code, stdout, stderr } = ran[i]!;
      const lines = stderr.trimEnd().split('\n');
      const msg = lines[0]!.replace(/^rupta: /, '');
      const ok = code === 2 && lines.length === 1 && lines[0]!.startsWith('rupta: ') && stdout === ''
        && !/^\s+at /m.test(stderr) && !stderr.includes('internal error')
        && (typeof r.want === 'string' ? msg === r.want : r.want.test(msg));
      if (!ok) wrong.push(`${r.what}: exit ${code}, stderr ${JSON.stringify(stderr)}, expected ${String(r.want)}`);
    });
    expect(wrong).toEqual([]);
  }, 120_000);

  it('checks the unspoilt demo case (the mutations start from a good case)', async () => {
    const r = await rupta(['check', 'good.yaml'], dir);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/dofs/);
  }, 60_000);
});
