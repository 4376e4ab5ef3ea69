// The output folder as a trap: links, pipes and files planted where rupta writes, a second
// run on the same folder, bad --out and --export-matrix paths, a case named `...yaml`, a damaged
// checkpoint and a full disk. Each ends with one sentence and exit 2 (3 for a full disk),
// nothing outside the folder is touched, and nothing blocks.
import { execFileSync, spawn } from 'node:child_process';
import { existsSync, lstatSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, renameSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CLI, ROOT, rupta, ensureBuilt, coarseDemoYaml, type Ran } from './support/cli.js';

let dir = '';
const run = (args: string[]): Promise<Ran> => rupta(args, dir, 120_000);
const at = (...p: string[]) => join(dir, ...p);
/** One line, no stack trace. */
const oneSentence = (r: Ran) => { expect(r.stderr.trimEnd().split('\n')).toHaveLength(1); expect(r.stderr).not.toMatch(/\n\s+at /); };

beforeAll(() => {
  ensureBuilt();
  dir = mkdtempSync(join(tmpdir(), 'rupta-robust-files-'));
  writeFileSync(at('beam.yaml'), coarseDemoYaml((c) => { c.control.increments = 8; }));
  mkdirSync(at('outside'));
  writeFileSync(at('outside', 'precious.txt'), 'keep me\n');
}, 120_000);
afterAll(() => { if (dir) rmSync(dir, { recursive: true, force: true }); });

const precious = () => readFileSync(at('outside', 'precious.txt'), 'utf8');

describe('links and special files inside the output folder', () => {
  it('refuses a curve.csv that links outside (with --force), and the target keeps its bytes', async () => {
    mkdirSync(at('lnk'));
    symlinkSync(at('outside', 'precious.txt'), at('lnk', 'curve.csv'));
    const r = await run(['run', 'beam.yaml', '--out', 'lnk', '--force', '--quiet']);
    expect(r.code).toBe(2);
    oneSentence(r);
    expect(r.stderr).toMatch(/lnk\/curve\.csv is a symbolic link; rupta does not follow or replace/);
    expect(precious()).toBe('keep me\n');
    expect(lstatSync(at('lnk', 'curve.csv')).isSymbolicLink()).toBe(true);
  });

  it('refuses a frames folder that links outside, and deletes nothing there', async () => {
    mkdirSync(at('lnkframes'));
    mkdirSync(at('outside', 'frames'));
    writeFileSync(at('outside', 'frames', 'step-0003.svg'), '<svg/>');
    symlinkSync(at('outside', 'frames'), at('lnkframes', 'frames'));
    writeFileSync(at('lnkframes', 'curve.csv'), 'old\n');
    const r = await run(['run', 'beam.yaml', '--out', 'lnkframes', '--force', '--quiet']);
    expect(r.code).toBe(2);
    oneSentence(r);
    expect(r.stderr).toMatch(/frames is a symbolic link/);
    expect(readdirSync(at('outside', 'frames'))).toEqual(['step-0003.svg']);
  });

  it('refuses a pipe where summary.json goes at once (no block), and leaves the pipe a pipe', async () => {
    mkdirSync(at('fifo'));
    execFileSync('mkfifo', [at('fifo', 'summary.json')]);
    const r = await run(['run', 'beam.yaml', '--out', 'fifo', '--force', '--quiet']);
    expect(r.code).toBe(2);
    oneSentence(r);
    expect(r.stderr).toMatch(/summary\.json is a pipe/);
    expect(lstatSync(at('fifo', 'summary.json')).isFIFO()).toBe(true);
  });

  it('never lets a case named ...yaml make the current folder the output folder', async () => {
    mkdirSync(at('dots'));
    writeFileSync(at('dots', '...yaml'), readFileSync(at('beam.yaml')));
    writeFileSync(at('dots', 'notes.txt'), 'mine\n');
    const r = await rupta(['run', '...yaml', '--quiet'], at('dots'), 120_000);
    expect(r.code).toBe(0);
    expect(readdirSync(at('dots')).sort()).toEqual(['...yaml', 'notes.txt', 'out']);
    expect(existsSync(at('dots', 'out', 'case', 'curve.csv'))).toBe(true);
    expect(readFileSync(at('dots', 'notes.txt'), 'utf8')).toBe('mine\n');
  }, 120_000);
});

describe('a folder swapped for a link while the run goes on', () => {
  it('frames/ replaced by a link outside after the first stored step: exit 2, one sentence, nothing written through it', async () => {
    writeFileSync(at('framed.yaml'), coarseDemoYaml((c) => { c.control.increments = 40; c.output = { frames: ['png'], every: 1, animation: 'none', pngWidth: 120 }; }));
    mkdirSync(at('outside', 'swapto'));
    const child = spawn(process.execPath, [CLI, 'run', 'framed.yaml', '--out', 'swap', '--quiet'], { cwd: dir, env: { ...process.env, RUPTA_DEBUG: '' } });
    let stderr = '';
    child.stderr.on('data', (d) => { stderr += d; });
    let swapped = false;
    const poll = setInterval(() => {
      if (swapped || !existsSync(at('swap', 'frames')) || !readdirSync(at('swap', 'frames')).some((f) => f.endsWith('.bin'))) return;
      swapped = true;
      renameSync(at('swap', 'frames'), at('swap', 'frames.moved'));
      symlinkSync(at('outside', 'swapto'), at('swap', 'frames'));
    }, 2);
    const code = await new Promise<number | null>((res) => child.on('close', (c) => { clearInterval(poll); res(c); }));
    expect(swapped).toBe(true);
    expect(code).toBe(2);
    oneSentence({ code: code ?? -1, stdout: '', stderr });
    // (a run that met the name in the instant between the two renames made a folder there: refused as well)
    expect(stderr).toMatch(/swap\/frames (is a symbolic link; rupta does not follow or replace anything but folders on the way inside its output folder|was replaced by another folder while rupta wrote into it)/);
    expect(readdirSync(at('outside', 'swapto'))).toEqual([]);
    expect(existsSync(at('swap', '.rupta.lock'))).toBe(false);
  }, 120_000);
});

describe('rupta redraw holds the folder like a run', () => {
  it('a finished run whose frames/ is now a link outside: redraw refuses (exit 2), deletes and writes nothing there', async () => {
    writeFileSync(at('framed8.yaml'), coarseDemoYaml((c) => { c.control.increments = 8; c.output = { frames: ['png'], every: 4, animation: 'none', pngWidth: 120 }; }));
    const r = await run(['run', 'framed8.yaml', '--out', 'redrawn', '--quiet']);
    expect(r.code).toBe(0);
    mkdirSync(at('outside', 'theirs'));
    writeFileSync(at('outside', 'theirs', 'step-0004.png'), 'not a frame');
    renameSync(at('redrawn', 'frames'), at('redrawn', 'frames.moved'));
    symlinkSync(at('outside', 'theirs'), at('redrawn', 'frames'));
    const again = await run(['redraw', 'redrawn']);
    expect(again.code).toBe(2);
    oneSentence(again);
    expect(again.stderr).toMatch(/redrawn\/frames is a symbolic link; rupta does not follow/);
    expect(readdirSync(at('outside', 'theirs'))).toEqual(['step-0004.png']);
    expect(readFileSync(at('outside', 'theirs', 'step-0004.png'), 'utf8')).toBe('not a frame');
  }, 120_000);
});

describe('compare and fit write through the output folder too', () => {
  const runFolder = (name: string) => {
    mkdirSync(at(name));
    const rows = [[0, 0], [0.04, 800], [0.08, 1000], [0.2, 600], [0.4, 200]].map(([d, P], i) => `${i},${d},${P},${d},,0,0,0,0,0,0,1`);
    writeFileSync(at(name, 'curve.csv'), ['step,control,load_N,displacement_mm,cmod_mm,crack_length_mm,tip_x_mm,tip_y_mm,external_work_Nmm,elastic_energy_Nmm,dissipated_Nmm,iterations', ...rows].join('\n') + '\n');
    writeFileSync(at(name, 'summary.json'), JSON.stringify({ title: 'hand-made', workOfFracture: { ligamentArea_mm2: 1400 } }));
  };
  const lab = () => writeFileSync(at('disp.csv'), 'Force [N];Crosshead [mm]\n0;0\n800;0,04\n1000;0,08\n600;0,2\n200;0,4\n');

  it('compare: a linked compare.png is refused before anything is written; a folder in use is refused', async () => {
    runFolder('cmplink');
    lab();
    symlinkSync(at('outside', 'precious.txt'), at('cmplink', 'compare.png'));
    const r = await run(['compare', 'cmplink', 'disp.csv', '--force']);
    expect(r.code).toBe(2);
    oneSentence(r);
    expect(r.stderr).toMatch(/cmplink\/compare\.png is a symbolic link; rupta does not follow or replace anything but regular files/);
    expect(precious()).toBe('keep me\n');
    expect(existsSync(at('cmplink', 'compare.json'))).toBe(false);
    runFolder('cmpbusy');
    writeFileSync(at('cmpbusy', '.rupta.lock'), `${process.pid}\n`);
    const busy = await run(['compare', 'cmpbusy', 'disp.csv']);
    expect(busy.code).toBe(2);
    expect(busy.stderr).toMatch(new RegExp(`the output folder cmpbusy is in use by another rupta run \\(process ${process.pid}\\)`));
    expect(existsSync(at('cmpbusy', 'compare.json'))).toBe(false);
  }, 60_000);

  it('fit: a fit-history.csv linked outside is refused (with --force) before any simulation, and its target keeps its bytes', async () => {
    writeFileSync(at('fitcase.yaml'), readFileSync(join(ROOT, 'cases', 'fit-demo.yaml')));
    writeFileSync(at('fitlab.csv'), readFileSync(join(ROOT, 'cases', 'fit-demo-lab.csv')));
    mkdirSync(at('fitlink'));
    symlinkSync(at('outside', 'precious.txt'), at('fitlink', 'fit-history.csv'));
    const r = await run(['fit', 'fitcase.yaml', '--lab', 'fitlab.csv', '--workers', '0', '--quiet', '--max-evals', '2', '--out', 'fitlink', '--force']);
    expect(r.code).toBe(2);
    oneSentence(r);
    expect(r.stderr).toMatch(/fitlink\/fit-history\.csv is a symbolic link; rupta does not follow or replace anything but regular files/);
    expect(precious()).toBe('keep me\n');
    expect(readdirSync(at('fitlink'))).toEqual(['fit-history.csv']);
  }, 120_000);
});

describe('bad --out and --export-matrix', () => {
  const cases: [string, () => void, string[], RegExp][] = [
    ['--out is a file', () => writeFileSync(at('afile'), 'x'), ['--out', 'afile'], /the output folder afile must be a folder \(found a regular file\)/],
    ['--out is a dangling link', () => symlinkSync(at('nowhere'), at('dangling')), ['--out', 'dangling'], /the output folder dangling is a symbolic link to something that does not exist/],
    ['--out below a file', () => writeFileSync(at('afile2'), 'x'), ['--out', 'afile2/sub'], /afile2\/sub (must be a folder|cannot be written)/],
    ['--export-matrix in a missing folder', () => {}, ['--out', 'mx1', '--export-matrix', 'no/such/K.mtx'], /the --export-matrix file no\/such\/K\.mtx must be in an existing folder/],
    ['--export-matrix is a folder', () => mkdirSync(at('mdir')), ['--out', 'mx2', '--export-matrix', 'mdir'], /the --export-matrix file mdir must be a regular file or a new name \(found a folder\)/],
    ['--export-matrix is a pipe', () => execFileSync('mkfifo', [at('K.fifo')]), ['--out', 'mx3', '--export-matrix', 'K.fifo'], /found a pipe/],
  ];
  for (const [what, setup, args, want] of cases) {
    it(`${what}: exit 2, one sentence`, async () => {
      setup();
      const r = await run(['run', 'beam.yaml', ...args, '--quiet']);
      expect(r.code).toBe(2);
      oneSentence(r);
      expect(r.stderr).toMatch(want);
    });
  }

  it('a read-only --out folder: exit 2 (skipped as root, who may write anywhere)', async (ctx) => {
    if (process.getuid?.() === 0) { ctx.skip(); return; }
    mkdirSync(at('ro'), { mode: 0o555 });
    const r = await run(['run', 'beam.yaml', '--out', 'ro', '--quiet']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/cannot be written \(permission denied\)/);
  });
});

describe('one run per folder', () => {
  it('refuses a second run while the first holds the lock, and takes over a dead owner\'s lock', async () => {
    mkdirSync(at('locked'));
    // a live owner: this test process
    writeFileSync(at('locked', '.rupta.lock'), `${process.pid}\n`);
    const r = await run(['run', 'beam.yaml', '--out', 'locked', '--force', '--quiet']);
    expect(r.code).toBe(2);
    oneSentence(r);
    expect(r.stderr).toMatch(new RegExp(`in use by another rupta run \\(process ${process.pid}\\)`));
    // a dead owner: a child that has exited
    const dead = spawn(process.execPath, ['-e', '0']);
    await new Promise((res) => dead.on('close', res));
    writeFileSync(at('locked', '.rupta.lock'), `${dead.pid}\n`);
    const r2 = await run(['run', 'beam.yaml', '--out', 'locked', '--force', '--quiet']);
    expect(r2.code).toBe(0);
    expect(existsSync(at('locked', '.rupta.lock'))).toBe(false);
    // a live process whose id was reused: this test process, with a start time it never had
    writeFileSync(at('locked', '.rupta.lock'), `${process.pid}\nstart 1\n`);
    const r3 = await run(['run', 'beam.yaml', '--out', 'locked', '--force', '--quiet']);
    expect(r3.code).toBe(existsSync('/proc/self/stat') ? 0 : 2);
  }, 120_000);

  it('rupta mesh does not overwrite mesh.svg without --force', async () => {
    const a = await run(['mesh', 'beam.yaml', '--out', 'meshed']);
    expect(a.code).toBe(0);
    const b = await run(['mesh', 'beam.yaml', '--out', 'meshed']);
    expect(b.code).toBe(2);
    oneSentence(b);
    expect(b.stderr).toMatch(/meshed\/mesh\.svg already exists; pass --force/);
    expect((await run(['mesh', 'beam.yaml', '--out', 'meshed', '--force'])).code).toBe(0);
  }, 120_000);
});

describe('checkpoints that cannot be trusted', () => {
  it('refuses a damaged checkpoint, missing probe rows and a finish with nothing to finish', async () => {
    const first = spawn(process.execPath, [CLI, 'run', 'beam.yaml', '--out', 'ck', '--quiet'], { cwd: dir });
    await new Promise((res) => first.on('close', res));
    const ck = at('ck', 'checkpoint.json');
    expect(existsSync(ck)).toBe(false);
    const nothing = await run(['finish', 'ck']);
    expect(nothing.code).toBe(2);
    expect(nothing.stderr).toMatch(/the run in ck is complete, so there is nothing to resume/);
    // interrupt a fresh run right after its first checkpoint (step 0 is written before any step)
    const child = spawn(process.execPath, [CLI, 'run', 'beam.yaml', '--out', 'ck2', '--quiet'], { cwd: dir });
    const poll = setInterval(() => { if (existsSync(at('ck2', 'checkpoint.json'))) { clearInterval(poll); child.kill('SIGKILL'); } }, 2);
    await new Promise((res) => child.on('close', res));
    clearInterval(poll);
    const text = readFileSync(at('ck2', 'checkpoint.json'), 'utf8');
    writeFileSync(at('ck2', 'checkpoint.json'), text.replace(/"lambda":[^,]*,/, '"lambda":0.5,'));
    const dam = await run(['finish', 'ck2']);
    expect(dam.code).toBe(2);
    oneSentence(dam);
    expect(dam.stderr).toMatch(/the checkpoint in ck2 is damaged \(checkpoint\.json does not match its checksum\)/);
    writeFileSync(at('ck2', 'checkpoint.json'), text);
    rmSync(at('ck2', 'probes.csv'));
    const gone = await run(['finish', 'ck2']);
    expect(gone.code).toBe(2);
    expect(gone.stderr).toMatch(/probes\.csv in ck2 holds 0 rows up to the checkpoint's step 0 where 2 were written/);
  }, 120_000);
});

describe('a full disk', () => {
  it('ends with one sentence and exit 3, keeps the checkpoint, and finish completes the folder once there is room', async (ctx) => {
    const mnt = at('small');
    mkdirSync(mnt);
    let mounted = false;
    if (process.getuid?.() === 0) {
      try { execFileSync('mount', ['-t', 'tmpfs', '-o', 'size=200k', 'tmpfs', mnt], { stdio: 'ignore' }); mounted = true; } catch { /* no mount here */ }
    }
    if (!mounted) {
      console.warn('skipped: a full disk needs a small tmpfs, which only root (with mount allowed) can make');
      ctx.skip();
      return;
    }
    try {
      const ref = await run(['run', 'beam.yaml', '--out', 'roomy', '--quiet']);
      expect(ref.code).toBe(0);
      const r = await run(['run', 'beam.yaml', '--out', 'small/o', '--quiet']);
      expect(r.code).toBe(3);
      oneSentence(r);
      expect(r.stderr).toMatch(/^rupta: the disk is full: no space was left to write small\/o\/.*; the steps written so far and the last checkpoint are kept: .*rupta finish small\/o$/m);
      expect(existsSync(join(mnt, 'o', 'checkpoint.json'))).toBe(true);
      execFileSync('mount', ['-o', 'remount,size=20m', mnt], { stdio: 'ignore' });
      const f = await run(['finish', 'small/o', '--quiet']);
      expect(f.code).toBe(0);
      for (const t of ['curve.csv', 'probes.csv']) expect(readFileSync(join(mnt, 'o', t), 'utf8')).toBe(readFileSync(at('roomy', t), 'utf8'));
    } finally {
      execFileSync('umount', [mnt], { stdio: 'ignore' });
    }
  }, 180_000);
});

describe('a specimen cut into a mechanism', () => {
  it('two slits meeting cut off a loose piece: exit 2 with one sentence before any step, and no folder left', async () => {
    writeFileSync(at('loose.yaml'), coarseDemoYaml((c) => {
      c.geometry.notches = [{ from: [300, 0], to: [350, 60], width: 0 }, { from: [400, 0], to: [350, 60], width: 0 }];
      c.control = { by: 'displacement', target: 0.3, increments: 10 };
    }));
    for (const args of [['run', 'loose.yaml', '--out', 'loose', '--quiet'], ['check', 'loose.yaml']]) {
      const r = await run(args);
      expect(r.code).toBe(2);
      oneSentence(r);
      expect(r.stderr).toMatch(/geometry\.notches and geometry\.holes must leave every piece of the specimen held by the supports against rigid-body motion \(found 2 pieces; the piece from \[300, 0\] to \[400, 60\] mm is held by no support\)/);
    }
    expect(existsSync(at('loose'))).toBe(false);
  }, 120_000);
});
