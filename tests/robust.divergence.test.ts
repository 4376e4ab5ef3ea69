// A run that cannot go on stops cleanly: status "stopped" with the step and the control
// level in the reason, exit 3, and every file complete up to the last converged step.
// SIGTERM ends a run like SIGINT does. Common practice for long-running solvers.
import { spawn } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parse, stringify } from 'yaml';
import { CURVE_HEADER } from '../src/output/runfiles.js';
import { CLI, ROOT, rupta, ensureBuilt, coarseDemoYaml, type Ran } from './support/cli.js';


/** The command line, run in this file's temporary folder. */
const run = (args: string[]): Promise<Ran> => rupta(args, dir, 60_000);

let dir = '';
const read = (...p: string[]) => readFileSync(join(dir, ...p), 'utf8');
const rowsOf = (csv: string) => csv.trimEnd().split('\n').slice(1);

beforeAll(() => {
  ensureBuilt();
  dir = mkdtempSync(join(tmpdir(), 'rupta-robust-divergence-'));
  // A clip gauge across the bottom face 40–60 mm beside the notch: once the crack opens, the
  // beam beside it unloads and that gauge closes, so no load can make it open further. (At
  // 20–40 mm the crack opening took over the steps and traced the curve to its end once the
  // line ahead of the tip was refined before loading.)
  writeFileSync(join(dir, 'offset-gauge.yaml'), coarseDemoYaml((c) => { c.output.frames = ['svg']; c.control.gauge = { from: [160, 0], to: [180, 0] }; c.control.target = 0.05; }));
  writeFileSync(join(dir, 'beam.yaml'), coarseDemoYaml((c) => { c.output.frames = ['svg']; }));
}, 120_000);

afterAll(() => { if (dir) rmSync(dir, { recursive: true, force: true }); });

describe('a run that diverges', () => {
  it('ends as stopped with exit 3, the step and control level named, and intact files up to the last converged step', async () => {
    const r = await run(['run', 'offset-gauge.yaml', '--out', 'stop', '--quiet']);
    expect(r.code).toBe(3);
    const summary = JSON.parse(read('stop', 'summary.json'));
    expect(summary.status).toBe('stopped');
    const m = /^step (\d+) did not converge .*at cmod ([\d.e+-]+)/.exec(summary.reason);
    expect(m).not.toBeNull();
    expect(r.stderr).toBe(`rupta: the run stopped: ${summary.reason}\n`);
    const curve = read('stop', 'curve.csv');
    expect(curve.split('\n')[0]).toBe(CURVE_HEADER);
    expect(curve.endsWith('\n')).toBe(true);
    const rows = rowsOf(curve);
    // the failed step is the one after the last row, and no row holds a non-finite number
    expect(rows.length).toBe(summary.steps + 1);
    expect(Number(m![1])).toBe(summary.steps + 1);
    rows.forEach((line, i) => {
      const cells = line.split(',');
      expect(Number(cells[0])).toBe(i);
      for (const x of cells) if (x !== '') expect(Number.isFinite(Number(x))).toBe(true);
    });
    // the control level that failed lies beyond the last converged one
    expect(Number(m![2])).toBeGreaterThan(Number(rows.at(-1)!.split(',')[1]));
    // one frame per converged step, the summary and report complete, no temp file left
    const frames = readdirSync(join(dir, 'stop', 'frames')).filter((f) => f.endsWith('.svg'));
    expect(frames).toHaveLength(rows.length);
    expect(read('stop', 'report.html')).toContain('</html>');
    expect(readdirSync(join(dir, 'stop')).filter((f) => f.endsWith('.tmp'))).toEqual([]);
  }, 60_000);

  it('SIGTERM ends a run as interrupted with exit 3 and a summary, like SIGINT', async () => {
    const out = 'term';
    const r = await new Promise<{ code: number; stderr: string }>((resolve) => {
      const child = spawn(process.execPath, [CLI, 'run', 'beam.yaml', '--out', out, '--quiet'], { cwd: dir });
      let stderr = '', sent = false;
      child.stderr.on('data', (d) => { stderr += d; });
      const poll = setInterval(() => {
        if (!sent && existsSync(join(dir, out, 'checkpoint.json'))) { sent = true; child.kill('SIGTERM'); }
      }, 10);
      child.on('close', (code) => { clearInterval(poll); resolve({ code: code ?? -1, stderr }); });
    });
    expect(r.code).toBe(3);
    const summary = JSON.parse(read(out, 'summary.json'));
    expect(summary.status).toBe('interrupted');
    expect(rowsOf(read(out, 'curve.csv')).length).toBe(summary.steps + 1);
    expect(readdirSync(join(dir, out, 'frames')).filter((f) => f.endsWith('.svg'))).toHaveLength(summary.steps + 1);
    expect(JSON.parse(read(out, 'checkpoint.json').split('\n')[0]!).step).toBe(summary.steps);
  }, 60_000);
});
