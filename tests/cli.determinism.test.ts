// Same case, same seed: byte-identical curve.csv through the command line; another mesh
// seed gives another mesh and so another curve (common practice for seeded meshers).
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parse, stringify } from 'yaml';
import { CLI, ROOT, rupta, ensureBuilt, type Ran } from './support/cli.js';




/** The demo beam made coarse and short, so that a whole run takes a second or two. */
function tinyCase(seed: number): string {
  const c = parse(readFileSync(join(ROOT, 'cases', 'beam-3pb-demo.yaml'), 'utf8')) as Record<string, any>;
  Object.assign(c.mesh, { size: 20, tipSize: 5, refineRadius: 15, seed });
  Object.assign(c.crack, { growthStep: 8, averagingRadius: 12 });
  c.control.increments = 15;
  Object.assign(c.output, { frames: [], animation: 'none' });
  return stringify(c);
}

let dir = '';

beforeAll(() => {
  ensureBuilt();
  dir = mkdtempSync(join(tmpdir(), 'rupta-cli-determinism-'));
  writeFileSync(join(dir, 'tiny.yaml'), tinyCase(1));
  writeFileSync(join(dir, 'tiny-seed2.yaml'), tinyCase(2));
}, 120_000);

afterAll(() => { if (dir) rmSync(dir, { recursive: true, force: true }); });

async function curve(file: string, out: string): Promise<Buffer> {
  const r = await rupta(['run', file, '--out', out, '--quiet', '--force'], dir);
  expect(r.stderr).toBe('');
  expect(r.code).toBe(0);
  return readFileSync(join(dir, out, 'curve.csv'));
}

describe('rupta run is deterministic', () => {
  it('gives the same curve.csv bytes for the same case and seed, another curve for another seed', async () => {
    const a = await curve('tiny.yaml', 'a');
    const b = await curve('tiny.yaml', 'b');
    const other = await curve('tiny-seed2.yaml', 'c');
    // A curve with a header and more than the zero row, so the comparison has something to compare.
    expect(a.toString('utf8').trimEnd().split('\n').length).toBeGreaterThan(3);
    expect(Buffer.compare(a, b)).toBe(0);
    expect(Buffer.compare(a, other)).not.toBe(0);
  }, 120_000);
});
