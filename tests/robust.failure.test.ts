// A fault inside the program (here: a step callback that throws, as a full disk would) does
// not lose the run: the steps up to the fault stay on disk, summary.json says "failed" with
// the fault in its reason, and the caller gets the error. Common practice for long runs.
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { parseCase } from '../src/case/index.js';
import { runCase } from '../src/run.js';
import { coarseDemoYaml } from './support/cli.js';

const dir = mkdtempSync(join(tmpdir(), 'rupta-robust-failure-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('an internal fault during a run', () => {
  it('keeps the steps so far, writes a summary marked failed and hands the error on', async () => {
    const c = parseCase(coarseDemoYaml((r) => { r.output.frames = []; r.output.animation = 'none'; }), 'beam.yaml');
    const out = join(dir, 'fault');
    const run = runCase(c, { out, onStep: (e) => { if (e.row.step === 3) throw new Error('the disk is full'); } });
    await expect(run).rejects.toThrow(/the disk is full; the steps up to the fault and a summary marked failed are in /);
    const summary = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
    expect(summary.status).toBe('failed');
    expect(summary.reason).toBe('internal error after step 3: the disk is full');
    const rows = readFileSync(join(out, 'curve.csv'), 'utf8').trimEnd().split('\n');
    expect(rows.length).toBe(1 + 4); // header and steps 0–3: step 3 was written before its callback threw
  });
});
