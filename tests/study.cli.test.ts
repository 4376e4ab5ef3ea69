// rupta study through the command line: mistakes exit 2 with one sentence and no trace.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { stringify } from 'yaml';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ensureBuilt, rupta } from './support/cli.js';
import { coarseCase } from './study.helpers.js';

let dir = '';
beforeAll(() => {
  ensureBuilt();
  dir = mkdtempSync(join(tmpdir(), 'rupta-study-cli-'));
  writeFileSync(join(dir, 'beam.yaml'), stringify(coarseCase()));
  writeFileSync(join(dir, 'ok.yaml'), stringify({ study: 1, case: 'beam.yaml', vary: { 'mesh.seed': [1, 2] } }));
  writeFileSync(join(dir, 'badkey.yaml'), stringify({ study: 1, case: 'beam.yaml', samples: { count: 0 } }));
  writeFileSync(join(dir, 'nocase.yaml'), stringify({ study: 1, case: 'missing.yaml' }));
  writeFileSync(join(dir, 'badvariant.yaml'), stringify({ study: 1, case: 'beam.yaml', vary: { 'material.GF': [0.1, 0] } }));
}, 120_000);
afterAll(() => { if (dir) rmSync(dir, { recursive: true, force: true }); });

describe('rupta study input mistakes', () => {
  const table: [string, string[], RegExp][] = [
    ['count of draws', ['study', 'badkey.yaml'], /^rupta: badkey\.yaml: study field samples\.count must be a whole number of draws from 1 to 100000 \(found 0\)\n$/],
    ['missing base case', ['study', 'nocase.yaml'], /^rupta: nocase\.yaml: study field case names missing\.yaml, which cannot be read/],
    ['variant not valid', ['study', 'badvariant.yaml'], /^rupta: variant v0002 of the study: material\.GF must be a positive number in N\/mm \(found 0\)\n$/],
    ['where to run', ['study', 'ok.yaml', '--on', 'moon'], /^rupta: --on must be local or slurm \(found "moon"\)\n$/],
    ['jobs', ['study', 'ok.yaml', '--jobs', '0'], /^rupta: --jobs must be a whole number of at least 1 \(found "0"\)\n$/],
    ['dry run here', ['study', 'ok.yaml', '--dry-run', '--out', 'dry'], /^rupta: --dry-run writes the batch script of a Slurm study: give it with --on slurm\n$/],
    ['memory', ['study', 'ok.yaml', '--on', 'slurm', '--dry-run', '--mem', 'lots', '--out', 'mem'], /^rupta: --mem must be the memory per variant as a whole number with a unit K, M, G or T, e\.g\. 2G \(found lots\)\n$/],
  ];
  it.each(table)('%s', async (_n, args, re) => {
    const r = await rupta(args, dir);
    expect(r.stderr).toMatch(re);
    expect(r.code).toBe(2);
  });
});
