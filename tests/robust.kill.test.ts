// A run killed at a random moment of each phase (meshing, steps, right after a checkpoint,
// the final writes) by SIGINT, SIGTERM, SIGKILL or two signals in a row, then completed with
// `rupta finish`, ends with the same curve.csv, probes.csv and frames (SVG and PNG) byte for
// byte as a run that was never stopped (common practice for restartable simulations: a restart
// repeats the same floating-point sequence). Coarse beam, frames every 8 steps, small PNGs.
import { spawn } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CLI, rupta, ensureBuilt, coarseDemoYaml, type Ran } from './support/cli.js';

let dir = '';
const run = (args: string[]): Promise<Ran> => rupta(args, dir, 120_000);

beforeAll(() => {
  ensureBuilt();
  dir = mkdtempSync(join(tmpdir(), 'rupta-robust-kill-'));
  writeFileSync(join(dir, 'beam.yaml'), coarseDemoYaml((c) => { c.control.increments = 24; c.output = { frames: ['svg', 'png'], every: 8, animation: 'gif', pngWidth: 160 }; }));
}, 120_000);
afterAll(() => { if (dir) rmSync(dir, { recursive: true, force: true }); });

type Phase = 'start' | 'steps' | 'checkpoint' | 'final';
type How = 'SIGINT' | 'SIGTERM' | 'SIGKILL' | 'twice';

const rows = (p: string) => (existsSync(p) ? readFileSync(p, 'utf8').split('\n').length - 2 : -1);
const ckStep = (p: string) => { try { return Number(JSON.parse(readFileSync(p, 'utf8').split('\n')[0]!).step); } catch { return -1; } };

/** Whether the run has reached the phase (checked every few milliseconds). */
function reached(out: string, phase: Phase): boolean {
  const at = (f: string) => join(dir, out, f);
  if (phase === 'start') return true;
  if (phase === 'steps') return rows(at('curve.csv')) >= 12;
  if (phase === 'checkpoint') return ckStep(at('checkpoint.json')) >= 5;
  return existsSync(at('summary.json'));
}

/** Seeded delays (xorshift), so a failing moment can be replayed. */
function delays(seed: number): () => number {
  let s = seed >>> 0 || 1;
  return () => { s ^= s << 13; s >>>= 0; s ^= s >> 17; s ^= s << 5; s >>>= 0; return s % 250; };
}

function killedRun(out: string, phase: Phase, how: How, delay: number): Promise<{ code: number | null; signal: string | null; stderr: string }> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, [CLI, 'run', 'beam.yaml', '--out', out, '--quiet'], { cwd: dir });
    let stderr = '', fired = false;
    child.stderr.on('data', (d) => { stderr += d; });
    const poll = setInterval(() => {
      if (fired || !reached(out, phase)) return;
      fired = true;
      setTimeout(() => {
        if (how === 'twice') { child.kill('SIGINT'); setTimeout(() => child.kill('SIGINT'), 15); } else child.kill(how);
      }, delay);
    }, 3);
    child.on('close', (code, signal) => { clearInterval(poll); resolve({ code, signal, stderr }); });
  });
}

const files = (out: string) => {
  const f = ['curve.csv', 'probes.csv'];
  const fr = join(dir, out, 'frames');
  if (existsSync(fr)) for (const n of readdirSync(fr).sort()) f.push(join('frames', n));
  return f;
};

describe('killed at any phase, then finished', () => {
  let reference: string[] = [];

  it('runs once uninterrupted for the reference files', async () => {
    const r = await run(['run', 'beam.yaml', '--out', 'whole', '--quiet']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    reference = files('whole');
    expect(reference.filter((f) => f.endsWith('.png')).length).toBeGreaterThan(5);
  }, 120_000);

  const next = delays(20261203);
  const cases: [Phase, How][] = [
    // every phase and every way of stopping at least once, kept few: each is a run and a finish
    ['start', 'SIGKILL'], ['steps', 'SIGTERM'], ['steps', 'twice'],
    ['checkpoint', 'SIGINT'], ['final', 'SIGKILL'], ['final', 'twice'],
  ];
  cases.forEach(([phase, how], k) => {
    const delay = next();
    it(`${how} during ${phase} (+${delay} ms): finish reproduces every table and frame byte for byte`, async () => {
      const out = `cut-${k}`;
      const r = await killedRun(out, phase, how, delay);
      // never a stack trace, whatever the moment
      expect(r.stderr).not.toMatch(/\n\s+at /);
      const ck = join(dir, out, 'checkpoint.json');
      const summary = join(dir, out, 'summary.json');
      if (existsSync(ck)) {
        const f = await run(['finish', out, '--quiet']);
        expect(f.stderr).toBe('');
        expect(f.code).toBe(0);
      } else if (!(existsSync(summary) && /"status": "complete"/.test(readFileSync(summary, 'utf8')))) {
        // cut off before the first checkpoint: nothing to go on from, so the run starts afresh
        expect(rows(join(dir, out, 'curve.csv'))).toBeLessThanOrEqual(1);
        const f = await run(['run', 'beam.yaml', '--out', out, '--force', '--quiet']);
        expect(f.code).toBe(0);
      }
      expect(JSON.parse(readFileSync(summary, 'utf8')).status).toBe('complete');
      expect(existsSync(ck)).toBe(false);
      expect(existsSync(join(dir, out, '.rupta.lock'))).toBe(false);
      expect(readdirSync(join(dir, out)).filter((f) => f.endsWith('.tmp'))).toEqual([]);
      for (const f of ['report.html', 'animation.gif', 'curve.png', 'field-s1.png']) expect(existsSync(join(dir, out, f))).toBe(true);
      expect(files(out)).toEqual(reference);
      for (const f of reference) expect(Buffer.compare(readFileSync(join(dir, out, f)), readFileSync(join(dir, 'whole', f))), f).toBe(0);
    }, 180_000);
  });
});
