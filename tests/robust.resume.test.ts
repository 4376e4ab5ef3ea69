// A run stopped by SIGINT keeps complete files and a checkpoint; --resume goes on from it
// and ends with the same curve.csv bytes as a run that was never stopped (common practice
// for restartable simulations: a restart repeats the same floating-point sequence).
import { spawn } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parse, stringify } from 'yaml';
import { CLI, ROOT, rupta, ensureBuilt, coarseDemoYaml, type Ran } from './support/cli.js';



/** The command line, run in this file's temporary folder. */
const run = (args: string[]): Promise<Ran> => rupta(args, dir, 60_000);

/** Start a run and send SIGINT once its first checkpoint is on disk. */
function interruptedRun(file: string, out: string): Promise<Ran & { ckSeen: boolean }> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, [CLI, 'run', file, '--out', out, '--quiet'], { cwd: dir });
    let stdout = '', stderr = '', ckSeen = false;
    child.stdout.on('data', (d) => { stdout += d; });
    child.stderr.on('data', (d) => { stderr += d; });
    const poll = setInterval(() => {
      if (!ckSeen && existsSync(join(dir, out, 'checkpoint.json'))) { ckSeen = true; child.kill('SIGINT'); }
    }, 10);
    child.on('close', (code) => { clearInterval(poll); resolve({ code: code ?? -1, stdout, stderr, ckSeen }); });
  });
}


let dir = '';
const read = (...p: string[]) => readFileSync(join(dir, ...p), 'utf8');
const rowsOf = (csv: string) => csv.trimEnd().split('\n').slice(1);

beforeAll(() => {
  ensureBuilt();
  dir = mkdtempSync(join(tmpdir(), 'rupta-robust-resume-'));
  writeFileSync(join(dir, 'beam.yaml'), coarseDemoYaml());
}, 120_000);

afterAll(() => { if (dir) rmSync(dir, { recursive: true, force: true }); });

describe('interrupting and resuming a run', () => {
  let full = '';

  it('runs uninterrupted for the reference curve and leaves no checkpoint behind', async () => {
    const r = await run(['run', 'beam.yaml', '--out', 'whole', '--quiet']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    full = read('whole', 'curve.csv');
    // enough steps that an interruption lands in the middle
    expect(rowsOf(full).length).toBeGreaterThan(20);
    expect(existsSync(join(dir, 'whole', 'checkpoint.json'))).toBe(false);
  }, 60_000);

  it('on SIGINT ends as interrupted with exit 3, complete files and a checkpoint of the last step', async () => {
    const r = await interruptedRun('beam.yaml', 'cut');
    expect(r.ckSeen).toBe(true);
    expect(r.code).toBe(3);
    expect(r.stderr).toMatch(/interrupted by a signal after step \d+; go on with: rupta run beam\.yaml --out cut --resume/);
    const summary = JSON.parse(read('cut', 'summary.json'));
    expect(summary.status).toBe('interrupted');
    const curve = read('cut', 'curve.csv');
    const rows = rowsOf(curve);
    // one row per converged step, numbered 0..steps, and exactly the rows the whole run has
    expect(rows.length).toBe(summary.steps + 1);
    rows.forEach((line, i) => expect(Number(line.split(',')[0])).toBe(i));
    expect(full.startsWith(curve)).toBe(true);
    expect(rows.length).toBeLessThan(rowsOf(full).length);
    const ck = JSON.parse(read('cut', 'checkpoint.json').split('\n')[0]!);
    expect(ck.step).toBe(summary.steps);
    // probes: two probes per step, up to the same step
    const probes = rowsOf(read('cut', 'probes.csv'));
    expect(probes.length).toBe(2 * rows.length);
    expect(Number(probes.at(-1)!.split(',')[0])).toBe(summary.steps);
    expect(summary.reason).toContain(`after step ${summary.steps}`);
    // the folder is not overwritten by a plain run
    const again = await run(['run', 'beam.yaml', '--out', 'cut', '--quiet']);
    expect(again.code).toBe(2);
    expect(again.stderr).toMatch(/already holds a run; pass --force .* --resume/);
  }, 60_000);

  it('refuses to resume a changed case (exit 2, one sentence), and leaves the run as it was', async () => {
    writeFileSync(join(dir, 'changed.yaml'), coarseDemoYaml((c) => { c.material.GF = 0.12; }));
    const before = read('cut', 'curve.csv');
    const r = await run(['run', 'changed.yaml', '--out', 'cut', '--quiet', '--resume']);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe('rupta: the case has changed since the run in cut was started, so it cannot be resumed; run it again with --force, or into another folder with --out\n');
    expect(read('cut', 'curve.csv')).toBe(before);
  }, 60_000);

  it('refuses --resume together with --force, and --resume where there is no run', async () => {
    const both = await run(['run', 'beam.yaml', '--out', 'cut', '--quiet', '--resume', '--force']);
    expect(both.code).toBe(2);
    expect(both.stderr).toMatch(/--resume .* --force .* not both/);
    const none = await run(['run', 'beam.yaml', '--out', 'nothing-here', '--quiet', '--resume']);
    expect(none.code).toBe(2);
    expect(none.stderr).toMatch(/no checkpoint to resume from in nothing-here/);
  }, 60_000);

  it('resumes to the same curve.csv and probes.csv bytes as the uninterrupted run, then has nothing left to resume', async () => {
    const r = await run(['run', 'beam.yaml', '--out', 'cut', '--quiet', '--resume']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(read('cut', 'curve.csv')).toBe(full);
    expect(read('cut', 'probes.csv')).toBe(read('whole', 'probes.csv'));
    const a = JSON.parse(read('whole', 'summary.json')), b = JSON.parse(read('cut', 'summary.json'));
    expect(b.status).toBe('complete');
    for (const k of ['reason', 'peak', 'crackPaths', 'steps', 'dofs', 'mesh', 'probes', 'workOfFracture']) expect(b[k]).toEqual(a[k]);
    expect(existsSync(join(dir, 'cut', 'checkpoint.json'))).toBe(false);
    const again = await run(['run', 'beam.yaml', '--out', 'cut', '--quiet', '--resume']);
    expect(again.code).toBe(2);
    expect(again.stderr).toMatch(/is complete, so there is nothing to resume/);
  }, 60_000);
});
