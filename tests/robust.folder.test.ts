// The output folder layer on its own: a lock names its owner by process id, start time, machine
// and boot, so a live process that merely reused the id does not keep a folder locked; and a
// sub-folder (or the folder itself) swapped for a link or another folder after the folder was
// taken is refused at the next write or removal, with nothing written through it.
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, renameSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { hostname, tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { InputError } from '../src/errors.js';
import { RowWriter, removeFile, writeFileAtomic } from '../src/output/files.js';
import { LOCK_FILE, OutputFolder, lockState, lockText, parseLock, processStart } from '../src/output/folder.js';

let dir = '';
let sleeper: ChildProcess | null = null;
beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'rupta-folder-'));
  mkdirSync(join(dir, 'outside'));
  // a live process that is not rupta: its id is what a reused id looks like
  sleeper = spawn(process.execPath, ['-e', 'setTimeout(() => {}, 60000)'], { stdio: 'ignore' });
  await new Promise((r) => sleeper!.once('spawn', r));
});
afterAll(() => {
  sleeper?.kill('SIGKILL');
  if (dir) rmSync(dir, { recursive: true, force: true });
});

const linux = existsSync('/proc/self/stat');
const refusal = (f: () => void): string => {
  try { f(); } catch (e) { expect(e).toBeInstanceOf(InputError); return (e as Error).message; }
  throw new Error('expected a refusal');
};

describe('the lock tells a live owner from a reused process id', () => {
  it('writes the pid, its start time, the host and the boot, and reads them back', () => {
    const o = parseLock(lockText());
    expect(o.pid).toBe(process.pid);
    expect(o.host).toBe(hostname());
    if (linux) expect(o.start).toBe(processStart(process.pid));
    expect(lockState(o)).toBe('live');
    // the first line alone (older locks) still names the owner
    expect(parseLock(`${process.pid}\n`)).toEqual({ pid: process.pid, start: null, host: null, boot: null });
  });

  it('a live process with another start time does not hold the folder: the lock is taken over', (ctx) => {
    if (!linux) { ctx.skip(); return; }
    const pid = sleeper!.pid!;
    const start = processStart(pid)!;
    expect(start).toMatch(/^\d+$/);
    const f = OutputFolder.open(join(dir, 'reused'));
    // the real owner, alive: refused
    writeFileSync(join(dir, 'reused', LOCK_FILE), lockText({ pid, start, host: hostname(), boot: null }));
    expect(refusal(() => f.lock())).toMatch(new RegExp(`is in use by another rupta run \\(process ${pid}\\)`));
    // the same id, but started at another moment: another process that reused it
    writeFileSync(join(dir, 'reused', LOCK_FILE), lockText({ pid, start: String(Number(start) + 1), host: hostname(), boot: null }));
    f.lock();
    expect(parseLock(readFileSync(join(dir, 'reused', LOCK_FILE), 'utf8')).pid).toBe(process.pid);
    f.release();
    expect(existsSync(join(dir, 'reused', LOCK_FILE))).toBe(false);
  });

  it('a lock from before the last boot is stale; one from another machine is not taken', (ctx) => {
    if (!linux) { ctx.skip(); return; }
    const f = OutputFolder.open(join(dir, 'boot'));
    writeFileSync(join(dir, 'boot', LOCK_FILE), lockText({ pid: sleeper!.pid!, start: processStart(sleeper!.pid!), host: hostname(), boot: '00000000-0000-0000-0000-000000000000' }));
    f.lock();
    f.release();
    writeFileSync(join(dir, 'boot', LOCK_FILE), lockText({ pid: 1, start: '1', host: 'elsewhere.invalid', boot: null }));
    expect(refusal(() => f.lock())).toMatch(/is in use by a rupta run on elsewhere\.invalid \(process 1\); wait for it to end .* delete /);
  });
});

describe('a folder swapped during a run', () => {
  it('a sub-folder swapped for a link: the next write, table and removal are refused, nothing lands outside', () => {
    const run = join(dir, 'run');
    const f = OutputFolder.open(run);
    f.lock();
    try {
      const frames = f.subdir('frames');
      writeFileAtomic(join(frames, 'step-0001.bin'), 'a');
      renameSync(frames, join(run, 'frames.moved'));
      symlinkSync(join(dir, 'outside'), frames);
      expect(refusal(() => writeFileAtomic(join(frames, 'step-0002.bin'), 'b'))).toMatch(/run\/frames is a symbolic link; rupta does not follow or replace anything but folders on the way inside its output folder/);
      expect(refusal(() => removeFile(join(frames, 'step-0001.bin')))).toMatch(/frames is a symbolic link/);
      expect(refusal(() => new RowWriter(join(frames, 't.csv'), 'a,b'))).toMatch(/frames is a symbolic link/);
      expect(refusal(() => f.file('frames/step-0003.png'))).toMatch(/frames is a symbolic link/);
      expect(refusal(() => f.list('frames'))).toMatch(/frames is a symbolic link/);
      expect(readdirSync(join(dir, 'outside'))).toEqual([]);
      // swapped for another real folder: refused too (it is not the folder the run made)
      rmSync(frames);
      mkdirSync(frames);
      expect(refusal(() => writeFileAtomic(join(frames, 'step-0002.bin'), 'b'))).toMatch(/run\/frames was replaced by another folder while rupta wrote into it/);
    } finally {
      f.release();
    }
    // once released, the folder is the user's again
    writeFileAtomic(join(run, 'frames', 'later.txt'), 'x');
  });

  it('the folder itself swapped for a link elsewhere: refused', () => {
    const run = join(dir, 'run2');
    const f = OutputFolder.open(run);
    f.lock();
    try {
      writeFileAtomic(join(run, 'curve.csv'), 'x\n');
      renameSync(run, join(dir, 'run2.moved'));
      symlinkSync(join(dir, 'outside'), run);
      expect(refusal(() => writeFileAtomic(join(run, 'summary.json'), '{}'))).toMatch(/the output folder .*run2 was moved, removed or replaced while rupta wrote into it/);
      expect(readdirSync(join(dir, 'outside'))).toEqual([]);
    } finally {
      f.release();
    }
  });
});
