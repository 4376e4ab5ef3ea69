// `rupta new`: every template writes a case that `rupta check` accepts; the option words
// are read as the user means them; files are not overwritten without --force.
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parseNewArgs } from '../cli/new.js';
import { loadCase } from '../src/case/index.js';
import { InputError } from '../src/errors.js';
import { Analysis } from '../src/fracture/analysis.js';
import { meshStats } from '../src/mesh/stats.js';
import { meshCase } from '../src/run.js';
import { renderTemplate, templates } from '../src/templates/index.js';
import { CLI, ROOT, rupta, ensureBuilt, type Ran } from './support/cli.js';




let dir = '';

beforeAll(() => {
  ensureBuilt();
  dir = mkdtempSync(join(tmpdir(), 'rupta-cli-new-'));
}, 120_000);

afterAll(() => { if (dir) rmSync(dir, { recursive: true, force: true }); });

describe('rupta new, in process', () => {
  it.each(templates.map((t) => t.name))('%s with its defaults passes the checks of rupta check', (name) => {
    const file = join(dir, `${name}.yaml`);
    writeFileSync(file, renderTemplate(name, {}));
    const c = loadCase(file);
    const { mesh } = meshCase(c);
    const a = new Analysis(c, mesh);
    expect(meshStats(mesh).polygons).toBeGreaterThan(0);
    expect(a.freeDofs).toBeGreaterThan(0);
  });
});

describe('parseNewArgs', () => {
  it('reads template, options, output and force in any order', () => {
    const a = parseNewArgs(['--depth', '150', 'beam-3pb', '--material=mortar', '-o', 'x.yaml', '--eccentricity', '-10', '--force']);
    expect(a).toEqual({ template: 'beam-3pb', options: { depth: '150', material: 'mortar', eccentricity: '-10' }, output: 'x.yaml', force: true, list: false });
  });

  it('keeps the flags commander already read', () => {
    expect(parseNewArgs(['l-panel'], { output: 'p.yaml', list: false })).toMatchObject({ template: 'l-panel', output: 'p.yaml', force: false });
  });

  it.each([
    [['beam-3pb', '--span'], '--span needs a value, as in --span 100 (see rupta new --list)'],
    [['beam-3pb', '--span', '--depth', '100'], '--span needs a value, as in --span 100 (see rupta new --list)'],
    [['beam-3pb', '--span', '400', '--span', '300'], '--span is given twice; give each option once'],
    [['beam-3pb', 'l-panel'], 'only one template name can be given (found beam-3pb and l-panel); each option value follows its --option'],
    [['beam-3pb', '-o'], '-o needs a file name, as in rupta new beam-3pb -o beam.yaml'],
  ])('refuses %j with one sentence', (words, msg) => {
    expect(() => parseNewArgs(words)).toThrow(new InputError(msg));
  });
});

describe('rupta new, through the command line', () => {
  it('lists every template and its options', async () => {
    const r = await rupta(['new', '--list'], dir);
    expect(r.code).toBe(0);
    for (const t of templates) {
      expect(r.stdout).toMatch(new RegExp(`^${t.name}  \\S`, 'm'));
      for (const o of t.options) expect(r.stdout).toContain(`--${o.name}`);
    }
  }, 60_000);

  it.each([
    ['beam-3pb', ['--depth', '120', '--material', 'mortar']],
    ['compact-tension', ['--loading', 'notch-faces']],
  ])('%s written with -o is accepted by rupta check', async (name, opts) => {
    const file = `${name}-cli.yaml`;
    const w = await rupta(['new', name, ...opts, '-o', file], dir);
    expect(w.stderr).toBe('');
    expect(w.code).toBe(0);
    const raw: Record<string, string> = {};
    for (let i = 0; i < opts.length; i += 2) raw[opts[i]!.slice(2)] = opts[i + 1]!;
    expect(readFileSync(join(dir, file), 'utf8')).toBe(renderTemplate(name, raw));
    const c = await rupta(['check', file], dir);
    expect(c.stderr).toBe('');
    expect(c.code).toBe(0);
    expect(c.stdout).toMatch(/dofs/);
  }, 60_000);

  it('prints to stdout without -o, and keeps an existing file unless --force', async () => {
    const out = await rupta(['new', 'disc-splitting'], dir);
    expect(out.code).toBe(0);
    expect(out.stdout).toBe(renderTemplate('disc-splitting', {}));
    const file = join(dir, 'kept.yaml');
    writeFileSync(file, 'mine\n');
    const refused = await rupta(['new', 'disc-splitting', '-o', 'kept.yaml'], dir);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toBe('rupta: kept.yaml already exists; add --force to overwrite it\n');
    expect(readFileSync(file, 'utf8')).toBe('mine\n');
    const forced = await rupta(['new', 'disc-splitting', '-o', 'kept.yaml', '--force'], dir);
    expect(forced.code).toBe(0);
    expect(readFileSync(file, 'utf8')).toBe(renderTemplate('disc-splitting', {}));
  }, 60_000);
});
