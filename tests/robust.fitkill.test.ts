// A fit killed at a seeded moment (SIGINT, SIGTERM, SIGKILL, or two signals in a row), then
// `rupta fit … --resume`, ends with the same history, fitted values and best-so-far case as a
// fit that was never stopped: the simulations the first start finished are taken from its
// fit-checkpoint.jsonl, not run again, so the optimiser retraces its course exactly (common
// practice for restartable computations: a restart repeats the same sequence). A changed setup
// or a damaged checkpoint is refused with one sentence. Coarse beam, 12 steps a candidate, a
// budget of 7 simulations: the case's values, the shape search (two at a time), the run at the
// fitted values with the sensitivity run beside it, and one mesh seed, so the kills land in
// every phase; on one thread, and once on two (where a kill may fall between the two runs of a pair).
import { spawn } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parse, stringify } from 'yaml';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CLI, ROOT, ensureBuilt, rupta, type Ran } from './support/cli.js';

let dir = '';
const args = (workers: number) => ['fit', 'beam.yaml', '--lab', 'lab.csv', '--workers', String(workers), '--quiet', '--max-evals', '7', '--seeds', '1', '--params', 'ft,GF', '--increments', '12'];
const ARGS = args(0);
const fit = (out: string, ...extra: string[]): Promise<Ran> => rupta([...ARGS, '--out', out, ...extra], dir, 300_000);

beforeAll(() => {
  ensureBuilt();
  dir = mkdtempSync(join(tmpdir(), 'rupta-fitkill-'));
  const c = parse(readFileSync(join(ROOT, 'cases', 'fit-demo.yaml'), 'utf8')) as Record<string, any>;
  c.mesh = { size: 12.5, tipSize: 3.125 };
  c.control.increments = 30;
  writeFileSync(join(dir, 'beam.yaml'), stringify(c));
  writeFileSync(join(dir, 'lab.csv'), readFileSync(join(ROOT, 'cases', 'fit-demo-lab.csv')));
});
afterAll(() => { if (dir) rmSync(dir, { recursive: true, force: true }); });

const text = (out: string, f: string) => readFileSync(join(dir, out, f), 'utf8');
const historyRows = (out: string): string[] => (existsSync(join(dir, out, 'fit-history.csv')) ? text(out, 'fit-history.csv').split('\n').slice(1).filter((l) => l !== '') : []);
/** A history row without its seconds (the one column that is a measurement of the machine). */
const noSeconds = (row: string) => row.split(',').filter((_, i) => i !== 8).join(',');
/** fit-report.txt without its line of wall time. */
const report = (out: string) => text(out, 'fit-report.txt').replace(/^\d+ of at most \d+ simulations in [\d.]+ s /m, '');
/** fit.json without its wall time. */
const result = (out: string) => { const j = JSON.parse(text(out, 'fit.json')); delete j.wallSeconds; return j; };

/** Seeded delays (xorshift), so a failing moment can be replayed. */
function delays(seed: number): () => number {
  let s = seed >>> 0 || 1;
  return () => { s ^= s << 13; s >>>= 0; s ^= s >> 17; s ^= s << 5; s >>>= 0; return s % 100; };  // well inside one simulation of this coarse beam (0.2–0.4 s each)
}

type How = 'SIGINT' | 'SIGTERM' | 'SIGKILL' | 'twice';

/** Start a fit, wait until its history has `rows` rows, wait `delay` ms more (inside a simulation, mostly), and stop it. */
function killedFit(out: string, rows: number, how: How, delay: number, workers = 0): Promise<{ code: number | null; signal: string | null; stderr: string }> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, [CLI, ...args(workers), '--out', out], { cwd: dir, env: { ...process.env, RUPTA_DEBUG: '' } });
    let stderr = '', fired = false;
    child.stderr.on('data', (d) => { stderr += d; });
    const poll = setInterval(() => {
      if (fired || historyRows(out).length < rows) return;
      fired = true;
      setTimeout(() => {
        if (how === 'twice') { child.kill('SIGINT'); setTimeout(() => child.kill('SIGINT'), 15); } else child.kill(how);
      }, delay);
    }, 5);
    child.on('close', (code, signal) => { clearInterval(poll); resolve({ code, signal, stderr }); });
  });
}

interface Reference { rows: string[]; json: Record<string, unknown>; best: string; svg: string; report: string }

async function reference(out: string, workers: number): Promise<Reference> {
  const r = await rupta([...args(workers), '--out', out], dir, 300_000);
  expect(r.code).toBe(3); // the budget ends it: status limit, best so far written
  expect(r.stderr).toMatch(/^rupta: the fit stopped at --max-evals/);
  expect(existsSync(join(dir, out, 'fit-checkpoint.jsonl'))).toBe(false);
  const ref = { rows: historyRows(out), json: result(out), best: text(out, 'beam-best-so-far.yaml'), svg: text(out, 'fit.svg'), report: report(out) };
  expect(ref.rows.map((l) => l.split(',')[1])).toEqual(['estimate', 'shape', 'shape', 'shape', 'fitted', 'jacobian', 'seed']);
  return ref;
}

/** Kill a fit, check what it kept, (optionally) try the refusals, resume it, and compare with the reference. */
async function killAndResume(out: string, rows: number, how: How, delay: number, workers: number, ref: Reference, refusals = false): Promise<void> {
  const r = await killedFit(out, rows, how, delay, workers);
  expect(r.stderr).not.toMatch(/\n\s+at /);
  if (how === 'SIGKILL') expect(r.signal).toBe('SIGKILL');
  else expect(r.code).toBe(3);
  if (how === 'SIGINT' || how === 'SIGTERM') expect(r.stderr).toMatch(/the fit was interrupted: interrupted after \d+ simulations(; the values are the best so far|, after the optimum was found); go on with the same command and --resume/);
  // stopped well before its end: the checkpoint is there to go on from
  const ck = join(dir, out, 'fit-checkpoint.jsonl');
  expect(existsSync(ck)).toBe(true);
  const before = historyRows(out);
  expect(before.length).toBeGreaterThanOrEqual(rows);
  expect(before.length).toBeLessThan(7);
  if (refusals) {
    const other = await rupta([...args(workers), '--out', out, '--resume', '--max-evals', '8'], dir, 300_000);
    expect(other.code).toBe(2);
    expect(other.stderr).toMatch(new RegExp(`^rupta: --resume: the fit in ${out} was started otherwise \\(maxEvals was 7, now 8\\); give the same case, measured curves and options, or --force to start afresh\n$`));
    const fresh = await rupta([...args(workers), '--out', out], dir, 300_000);
    expect(fresh.code).toBe(2);
    expect(fresh.stderr).toMatch(new RegExp(`${out} already holds a fit \\(.*\\): give --force to replace it, --resume to go on with it, or --out for another folder`));
    // a changed number in a finished simulation's line
    const kept = readFileSync(ck);
    const lines = kept.toString('utf8').split('\n');
    lines[1] = lines[1]!.replace(/"load":\[([^,\]]*),([0-9])/, (_, a, d) => `"load":[${a},${(Number(d) + 1) % 10}`);
    writeFileSync(ck, lines.join('\n'));
    const dam = await rupta([...args(workers), '--out', out, '--resume'], dir, 300_000);
    expect(dam.code).toBe(2);
    expect(dam.stderr).toMatch(new RegExp(`^rupta: the fit checkpoint ${out}/fit-checkpoint\\.jsonl is damaged at line 2 \\(it does not match its checksum\\); start the fit again with --force\n$`));
    writeFileSync(ck, kept);
  }
  const again = await rupta([...args(workers), '--out', out, '--resume'], dir, 300_000);
  expect(again.code).toBe(3);
  expect(again.stderr).toMatch(/^rupta: the fit stopped at --max-evals/);
  const after = historyRows(out);
  // the simulations finished before the kill were taken from the checkpoint, not run again: even their times are the same
  expect(after.slice(0, before.length)).toEqual(before);
  expect(after.map(noSeconds)).toEqual(ref.rows.map(noSeconds));
  expect(result(out)).toEqual(ref.json);
  expect(text(out, 'beam-best-so-far.yaml')).toBe(ref.best);
  expect(text(out, 'fit.svg')).toBe(ref.svg);
  expect(report(out)).toBe(ref.report);
  expect(readdirSync(join(dir, out)).filter((f) => f.endsWith('.tmp') || f === '.rupta.lock' || f === 'fit-checkpoint.jsonl')).toEqual([]);
}

describe('a fit killed at a seeded moment, then resumed', () => {
  let one: Reference | null = null, two: Reference | null = null;

  it('runs once uninterrupted on one thread for the reference', async () => { one = await reference('whole', 0); }, 300_000);

  const next = delays(20261203);
  // the shape search's first pair, its last run, the sensitivity run and the mesh seed
  const cases: [How, number][] = [['SIGINT', 1], ['SIGTERM', 3], ['twice', 5]];
  cases.forEach(([how, rows], k) => {
    const delay = next();
    it(`${how} after ${rows} simulations (+${delay} ms): --resume ends with the same history, values and case${k === 0 ? '; a changed setup and a damaged checkpoint are refused first' : ''}`, async () => {
      await killAndResume(`cut-${k}`, rows, how, delay, 0, one!, k === 0);
    }, 300_000);
  });

  it('nothing to resume in a fit that ran to its end (exit 2)', async () => {
    const none = await fit('whole', '--resume');
    expect(none.code).toBe(2);
    expect(none.stderr).toMatch(/^rupta: whole holds no interrupted fit to go on with \(no fit-checkpoint\.jsonl; a fit that ran to its end removes it\): start the fit without --resume\n$/);
  }, 60_000);

  it('on two threads: its own reference, then SIGKILL within a pair of the shape search and --resume', async () => {
    two = await reference('whole2', 2);
    await killAndResume('cut-2t', 2, 'SIGKILL', next(), 2, two);
  }, 600_000);
});
