// Hostile case files, a table of them (the large ones as JSON, which parses fast): each is refused with one sentence naming what is wrong
// (an InputError, never another error, never a hang), and files that are not regular files or
// are too big are refused before they are read.
import { execFileSync } from 'node:child_process';
import { closeSync, mkdtempSync, openSync, rmSync, ftruncateSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { parse, stringify } from 'yaml';
import { InputError } from '../src/errors.js';
import { loadCase, parseCase } from '../src/case/index.js';
import { renderTemplate } from '../src/templates/index.js';
import { coarseDemoYaml } from './support/cli.js';

const base = coarseDemoYaml();
const dir = mkdtempSync(join(tmpdir(), 'rupta-robust-hostile-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

type Raw = Record<string, any>;
/** The coarse demo with one change, as YAML (or JSON when asked). */
const edit = (f: (c: Raw) => void, json = false): [string, string] => {
  const c = parse(base) as Raw;
  f(c);
  return json ? [JSON.stringify(c), 'case.json'] : [stringify(c), 'case.yaml'];
};
const text = (t: string, name = 'case.yaml'): [string, string] => [t, name];
const pts = <T>(n: number, f: (i: number) => T): T[] => Array.from({ length: n }, (_, i) => f(i));

const HOSTILE: [string, [string, string], RegExp][] = [
  // text that is not a case
  ['empty text', text(''), /is empty; a case file needs/],
  ['only blanks', text('   \n\t\n'), /is empty/],
  ['a bare number', text('42'), /the case file must be a mapping/],
  ['a YAML list', text('- 1\n- 2\n'), /the case file must be a mapping/],
  ['broken YAML indentation', text('format: 1\n  units: x\n- y'), /is not valid YAML at line/],
  ['JSON trailing comma', text('{"format": 1,}', 'case.json'), /is not valid JSON at line 1/],
  ['JSON duplicate key at the top', text('{"format": 1, "format": 1}', 'case.json'), /has the key "format" twice in one mapping at line 1/],
  ['JSON duplicate key deep inside', edit((c) => c, true).map((t, i) => (i === 0 ? t.replace('"E":32000', '"E":32000,"E":1') : t)) as [string, string], /has the key "E" twice in one mapping/],
  ['JSON nested 100 000 deep', text('['.repeat(100_000) + ']'.repeat(100_000), 'case.json'), /nests lists and mappings more than 32 deep/],
  ['YAML nested 5 000 deep', text('a: ' + '['.repeat(5000) + ']'.repeat(5000)), /(nests lists and mappings more than 32 deep|is not valid YAML)/],
  ['YAML alias bomb', text('a: &a [x, x, x, x, x, x, x, x, x]\nb: &b [*a, *a, *a, *a, *a, *a, *a, *a, *a]\nc: &c [*b, *b, *b, *b, *b, *b, *b, *b, *b]\nd: &d [*c, *c, *c, *c, *c, *c, *c, *c, *c]\ne: [*d, *d, *d, *d, *d, *d, *d, *d, *d]\n'), /is not valid YAML|excessive alias|not a known key/],
  ['YAML duplicate key', text(base.replace('units: mm-N-MPa', 'units: mm-N-MPa\nunits: mm-N-MPa')), /is not valid YAML at line \d+, column \d+: map keys must be unique/],
  ['decimal comma in a flow mapping', text(base.replace(/^material:[\s\S]*?(?=^\S)/m, 'material: {E: 32000, nu: 0.2, ft: 3,1, GF: 0.11}\n')), /ft at line \d+ of case\.yaml must be a number written with a decimal point \(found 3,1, a decimal comma; write 3\.1\)/],
  ['decimal comma in a block', text(base.replace(/^  ft: .*$/m, '  ft: 3,1')), /ft at line \d+ of case\.yaml must be a number written with a decimal point \(found 3,1/],
  ['a __proto__ key', text('{"format": 1, "__proto__": {"x": 1}}', 'case.json'), /./],
  ['a constructor key', edit((c) => { Object.assign(c, { constructor: 1 }); }), /constructor is not a known key/],
  // control characters that would break tables, pictures and reports
  ['title with a line break', edit((c) => { c.title = 'Beam\nB2'; }), /^title must be one line of text without control characters such as line breaks or tabs \(found U\+000A at character 5\)$/],
  ['title with a tab', edit((c) => { c.title = 'Beam\tB2'; }), /title must be one line of text .* \(found U\+0009/],
  ['title with an escape', edit((c) => { c.title = 'Beam \u001b[31mred'; }), /found U\+001B/],
  ['title with NUL', edit((c) => { c.title = 'Beam\u0000'; }), /found U\+0000/],
  ['title with a line separator', edit((c) => { c.title = 'a\u2028b'; }), /found U\+2028/],
  ['title with DEL', edit((c) => { c.title = 'a\u007fb'; }), /found U\+007F/],
  ['probe name with a line break', edit((c) => { c.probes[0].name = 'mid\ntop'; }), /^probes\[0\]\.name must be one line of text without control characters/],
  ['probe name with a CR', edit((c) => { c.probes[0].name = 'mid\rtop'; }), /probes\[0\]\.name .* \(found U\+000D/],
  ['probe name with C1 control', edit((c) => { c.probes[0].name = 'mid\u0085'; }), /found U\+0085/],
  ['empty probe name', edit((c) => { c.probes[0].name = ''; }), /probes\[0\]\.name/],
  ['probe name a number', edit((c) => { c.probes[0].name = 7; }), /probes\[0\]\.name/],
  ['two probes of one name', edit((c) => { c.probes[1].name = c.probes[0].name; }), /must be a name no other probe uses/],
  // numbers that are not numbers
  ['E is NaN', edit((c) => { c.material.E = '.nan'; }), /material\.E/],
  ['E is .inf', text(base.replace(/^  E: .*$/m, '  E: .inf')), /material\.E must be/],
  ['E is 1e999 in JSON', text(edit((c) => c, true)[0].replace('"E":32000', '"E":1e999'), 'case.json'), /material\.E must be .* \(found Infinity\)/],
  ['E is a quoted number', edit((c) => { c.material.E = '32000'; }), /material\.E .*write it without quotes/],
  ['E is a list', edit((c) => { c.material.E = [1, 2]; }), /material\.E/],
  ['negative thickness', edit((c) => { c.thickness = -50; }), /thickness must be a positive number/],
  ['zero increments', edit((c) => { c.control.increments = 0; }), /control\.increments must be a whole number/],
  ['fractional increments', edit((c) => { c.control.increments = 2.5; }), /control\.increments must be a whole number/],
  ['pngWidth that sharp cannot draw in time', edit((c) => { c.output.pngWidth = 20000; }), /output\.pngWidth must be a whole number from 100 to 8000 in px \(found 20000\)/],
  ['pngWidth fractional', edit((c) => { c.output.pngWidth = 400.5; }), /output\.pngWidth must be a whole number/],
  ['negative notch width', edit((c) => { c.geometry.notches[0].width = -2; }), /geometry\.notches\[0\]\.width/],
  ['mesh far too fine', edit((c) => { c.mesh.size = 0.01; c.mesh.tipSize = 0.002; }), /must give at most 2000000 polygons/],
  // counts beyond the stated limits, refused before any geometry is looked at
  ['100 001 outline points', edit((c) => { c.geometry.outline = pts(100_001, (i) => [i, i % 2]); }, true), /^geometry\.outline may hold at most 100,000 points \(found 100,001\)$/],
  ['5 001 holes', edit((c) => { c.geometry.holes = pts(5001, (i) => ({ circle: { center: [10 + i, 50], radius: 0.1 } })); }, true), /^geometry\.holes may hold at most 5,000 holes \(found 5,001\)$/],
  ['50 001 probes', edit((c) => { c.probes = pts(50_001, (i) => ({ name: `p${i}`, at: [100, 50] })); }, true), /^probes may hold at most 50,000 probes \(found 50,001\)$/],
  ['1 001 notches', edit((c) => { c.geometry.notches = pts(1001, () => ({ from: [220, 0], to: [220, 30], width: 2 })); }), /geometry\.notches may hold at most 1,000 notches/],
  ['1 001 crack start points', edit((c) => { c.crack.start = pts(1001, () => [100, 50]); }), /crack\.start may hold at most 1,000 points/],
  ['200 001 hole polygon points', edit((c) => { c.geometry.holes = pts(3, () => ({ polygon: pts(70_000, (i) => [100 + Math.cos(i), 50 + Math.sin(i)]) })); }, true), /geometry\.holes may hold at most 200,000 polygon points in all/],
  // geometry that cannot be a specimen
  ['a bow-tie outline', edit((c) => { c.geometry.outline = [[0, 0], [440, 100], [440, 0], [0, 100]]; }), /geometry\.outline must be a simple polygon that does not touch or cross itself/],
  ['a bow-tie outline of 5 000 points', edit((c) => { c.geometry.outline = [...pts(2500, (i) => [i * 0.2, 0]), [500, 100], ...pts(2498, (i) => [499.6 - i * 0.2, 100 - (i === 1200 ? 150 : 0)])]; }, true), /geometry\.outline must be a simple polygon/],
  ['an outline of zero area', edit((c) => { c.geometry.outline = [[0, 0], [100, 0], [200, 0]]; }), /geometry\.outline/],
  ['a hole touching the outline', edit((c) => { c.geometry.holes = [{ circle: { center: [100, 10], radius: 10 } }]; }), /geometry\.holes\[0\] must lie inside the outline without touching it/],
  ['two overlapping holes', edit((c) => { c.geometry.holes = [{ circle: { center: [100, 50], radius: 10 } }, { circle: { center: [110, 50], radius: 10 } }]; }), /geometry\.holes\[1\] must not touch or overlap geometry\.holes\[0\]/],
  ['overlapping holes among 2 000', edit((c) => { c.geometry.outline = [[0, 0], [1000, 0], [1000, 1000], [0, 1000]]; c.geometry.holes = pts(2000, (i) => ({ circle: { center: [30 + 20 * (i % 45), 100 + 18 * Math.floor(i / 45)], radius: i === 1999 ? 15 : 3 } })); }, true), /geometry\.holes\[1999\] must not touch or overlap geometry\.holes\[\d+\]/],
  ['a self-crossing polygon hole', edit((c) => { c.geometry.holes = [{ polygon: [[100, 20], [150, 80], [150, 20], [100, 80]] }]; }), /geometry\.holes\[0\]\.polygon must be a simple polygon/],
  ['a notch from outside', edit((c) => { c.geometry.notches[0].from = [220, -20]; }), /geometry\.notches\[0\]\.from must be a point on the outline or inside it/],
  ['a notch tip on the boundary', edit((c) => { c.geometry.notches[0].to = [220, 100]; }), /geometry\.notches\[0\]\.to must be a point inside the specimen/],
  ['a notch of zero length', edit((c) => { c.geometry.notches[0].to = c.geometry.notches[0].from; }), /must have distinct from and to points/],
  ['a support off the boundary', edit((c) => { c.supports[0].at = [20, 30]; }), /supports\[0\]\.at must be a point on the specimen boundary/],
  ['a load direction of zero', edit((c) => { c.loads[0].direction = [0, 0]; }), /loads\[0\]\.direction/],
  ['a probe outside', edit((c) => { c.probes[0].at = [900, 50]; }), /probes\[0\]\.at must be a point in the specimen/],
  ['a crack start outside', edit((c) => { c.crack.start = [[900, 50]]; }), /crack\.start\[0\] must be a point in the specimen/],
  ['cmod without a gauge', edit((c) => { delete c.control.gauge; }), /control\.gauge is required when control\.by is cmod/],
  ['a gauge of zero length', edit((c) => { c.control.gauge.to = c.control.gauge.from; }), /control\.gauge must have distinct from and to points/],
  ['supports that leave x free', edit((c) => { c.supports = [{ at: [20, 0], fix: 'y' }, { at: [420, 0], fix: 'y' }]; }), /must hold the specimen against rigid-body motion/],
  ['no supports', edit((c) => { c.supports = []; }), /supports/],
  ['an unknown top-level key', edit((c) => { c.extra = 1; }), /extra is not a known key/],
  ['format 2', edit((c) => { c.format = 2; }), /format/],
  ['other units', edit((c) => { c.units = 'in-lbf-psi'; }), /units/],
];

describe('hostile case files', () => {
  it('the table holds at least 60 of them', () => { expect(HOSTILE.length).toBeGreaterThanOrEqual(60); });
  it.each(HOSTILE)('%s: refused with one sentence', (_what, [t, name], want) => {
    let err: unknown = null;
    try { parseCase(t, name); } catch (e) { err = e; }
    expect(err).toBeInstanceOf(InputError);
    const msg = (err as Error).message;
    expect(msg).not.toContain('\n');
    expect(msg).toMatch(want);
  });
});

describe('hostile files given as the case', () => {
  const files: [string, () => string, RegExp][] = [
    ['a pipe (never blocks)', () => { const p = join(dir, 'pipe.yaml'); execFileSync('mkfifo', [p]); return p; }, /must be a regular file \(found a pipe\)/],
    ['a device', () => '/dev/zero', /must be a regular file \(found a device\)/],
    ['a folder', () => dir, /is a folder, not a case file/],
    ['a missing file', () => join(dir, 'none.yaml'), /does not exist/],
    ['a file of 33 MiB', () => { const p = join(dir, 'big.yaml'); const fd = openSync(p, 'w'); ftruncateSync(fd, 33 * 1024 * 1024); closeSync(fd); return p; }, /must be at most 32 MiB \(found 33 MiB\)/],
  ];
  it.each(files)('%s: refused at once with one sentence', (_what, make, want) => {
    const p = make();
    let err: unknown = null;
    try { loadCase(p); } catch (e) { err = e; }
    expect(err).toBeInstanceOf(InputError);
    expect((err as Error).message).toMatch(want);
  });
});

describe('rupta new', () => {
  it('refuses a title with a control character at the option, not in the case it would write', () => {
    expect(() => renderTemplate('beam-3pb', { title: 'Beam\nB2' })).toThrow(/^--title of template beam-3pb must be one line of text without control characters .* \(found U\+000A at character 5\)$/);
  });
});
