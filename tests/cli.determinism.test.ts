// Same case, same seed: byte-identical curve.csv through the command line; another mesh
// seed gives another mesh and so another curve (common practice for seeded meshers).
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CLI, ROOT, rupta, ensureBuilt, coarseDemoYaml, type Ran } from './support/cli.js';





let dir = '';

beforeAll(() => {
  ensureBuilt();
  dir = mkdtempSync(join(tmpdir(), 'rupta-cli-determinism-'));
  writeFileSync(join(dir, 'tiny.yaml'), coarseDemoYaml((c) => { c.mesh.seed = 1; c.control.increments = 15; }));
  writeFileSync(join(dir, 'tiny-seed2.yaml'), coarseDemoYaml((c) => { c.mesh.seed = 2; c.control.increments = 15; }));
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
