// The output folder of a run (or of a mesh, a fit): everything rupta writes stays inside it.
// Names inside are plain relative names (no `..`, no absolute paths); sub-folders and files
// that are symbolic links, pipes or devices are refused, never followed; a lock file naming the
// owner (process id, start time, machine, boot) keeps two runs out of one folder, and the lock of
// an owner that has gone is taken over; while a folder is held, a folder on the way swapped for a
// link or another folder is refused at the next write.
import { accessSync, constants, readFileSync, readdirSync, rmSync, statSync, unlinkSync, writeFileSync, type Stats } from 'node:fs';
import { hostname } from 'node:os';
import { dirname, isAbsolute, join, normalize, relative, resolve, sep } from 'node:path';
import { InputError } from '../errors.js';
import { ensureDir, kindText, lstatOrNull, setPathCheck, writeFailure, writeFileAtomic } from './files.js';

export const LOCK_FILE = '.rupta.lock';

/**
 * A folder name made from a case name: letters, digits and `. _ + -` kept, anything else
 * (separators, control characters, spaces) as `_`, leading dots dropped, so that a case called
 * `...yaml` or `../x` can never name the current folder, a parent or a hidden folder.
 */
export function safeFolderName(name: string): string {
  const s = name.normalize('NFC').replace(/[^\p{L}\p{N}._+-]/gu, '_').replace(/^\.+/, '').slice(0, 120);
  return s === '' || /^_*$/.test(s) ? 'case' : s;
}

/** The default output folder of a case: out/<safe case name><suffix>. */
export function defaultOutDir(caseName: string, suffix = ''): string {
  return join('out', safeFolderName(caseName) + suffix);
}

/** True while a process of that id runs (a process we may not signal still runs). */
function alive(pid: number): boolean {
  if (!(Number.isInteger(pid) && pid > 0)) return false;
  try { process.kill(pid, 0); return true; } catch (e) { return (e as NodeJS.ErrnoException).code === 'EPERM'; }
}

/** Start time of a process in clock ticks after boot (field 22 of /proc/PID/stat); null where there is no /proc. */
export function processStart(pid: number): string | null {
  try {
    const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
    // the command name in parentheses may hold spaces and parentheses: count fields after the last ')'
    const f = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
    return /^\d+$/.test(f[19] ?? '') ? f[19]! : null;
  } catch { return null; }
}

/** This boot of the machine (a pid and start time repeat across boots); null where unknown. */
function bootId(): string | null {
  try { return readFileSync('/proc/sys/kernel/random/boot_id', 'utf8').trim() || null; } catch { return null; }
}

/** Who holds a lock: process id, its start time, the machine and its boot (the first line alone in older locks). */
export interface LockOwner { pid: number; start: string | null; host: string | null; boot: string | null }

/** The lock text of this process. */
export function lockText(o: LockOwner = { pid: process.pid, start: processStart(process.pid), host: hostname(), boot: bootId() }): string {
  return `${o.pid}\n` + (o.start ? `start ${o.start}\n` : '') + (o.host ? `host ${o.host}\n` : '') + (o.boot ? `boot ${o.boot}\n` : '');
}

export function parseLock(text: string): LockOwner {
  const lines = text.split('\n');
  const pid = /^\s*\d+\s*$/.test(lines[0] ?? '') ? Number(lines[0]) : NaN;
  const field = (k: string): string | null => {
    const l = lines.find((s) => s.startsWith(k + ' '));
    return l ? l.slice(k.length + 1).trim() || null : null;
  };
  return { pid, start: field('start'), host: field('host'), boot: field('boot') };
}

/**
 * Whether the process that wrote a lock still runs: 'live', 'gone', or 'elsewhere' (another
 * machine, which cannot be asked). A live pid with another start time is a new process that
 * reused the id, so the lock is stale; so is one written before the machine last booted.
 */
export function lockState(o: LockOwner): 'live' | 'gone' | 'elsewhere' {
  if (o.host && o.host !== hostname()) return 'elsewhere';
  const boot = bootId();
  if (o.boot && boot && o.boot !== boot) return 'gone';
  if (!alive(o.pid)) return 'gone';
  const start = processStart(o.pid);
  if (o.start && start && o.start !== start) return 'gone';
  return 'live';
}

const held = new Set<string>();
let exitHook = false;

/** Which folder an inode is: a folder swapped for another (or for a link to one) has another. */
interface Ident { dev: number; ino: number }
const identOf = (st: Stats): Ident => ({ dev: st.dev, ino: st.ino });
const same = (a: Ident, b: Ident): boolean => a.dev === b.dev && a.ino === b.ino;

/**
 * The folders locked by this process (by absolute path): the folder's identity when it was
 * taken and that of each sub-folder met since. Every write or removal below one of them is
 * checked against it first (through files.ts), so a sub-folder swapped for a link while a run
 * goes on is refused, never written through.
 */
const guards = new Map<string, { dir: string; root: Ident; subs: Map<string, Ident> }>();

const notFollowed = (at: string, st: Stats, last: boolean): InputError => new InputError(`${at} is ${kindText(st)}; rupta does not follow or replace ${last ? 'anything but regular files' : 'anything but folders on the way'} inside its output folder (remove it or choose another folder with --out)`);

/**
 * Check a relative name inside a folder: every part on the way a real folder (the same one as
 * when the folder was locked, when it is), the last absent or a regular file ('file'), a folder
 * ('folder') or anything ('any': a removal takes away a link itself).
 */
function walk(dir: string, rel: string, kind: 'file' | 'folder' | 'any'): void {
  const guard = guards.get(resolve(dir));
  if (guard) {
    let st: Stats | null = null;
    try { st = statSync(dir); } catch { /* gone */ }
    if (!st || !same(identOf(st), guard.root)) {
      throw new InputError(`the output folder ${dir} was moved, removed or replaced while rupta wrote into it; nothing more is written there or through it`);
    }
  }
  const parts = rel === '' || rel === '.' ? [] : rel.split(sep);
  let at = dir, sub = '';
  for (let i = 0; i < parts.length; i++) {
    at = join(at, parts[i]!);
    const last = i === parts.length - 1;
    const st = lstatOrNull(at);
    if (!st) break;
    if (last && kind !== 'folder') {
      if (kind === 'file' && !st.isFile()) throw notFollowed(at, st, true);
      break;
    }
    if (!st.isDirectory()) throw notFollowed(at, st, false);
    if (guard) {
      sub = sub ? join(sub, parts[i]!) : parts[i]!;
      const was = guard.subs.get(sub);
      if (!was) guard.subs.set(sub, identOf(st));
      else if (!same(was, identOf(st))) throw new InputError(`${at} was replaced by another folder while rupta wrote into it; nothing more is written there`);
    }
  }
}

// every whole-file write, table and removal of files.ts inside a locked folder passes here
setPathCheck((path) => {
  const abs = resolve(path);
  for (const [root, g] of guards) {
    if (abs.startsWith(root + sep)) walk(g.dir, relative(root, abs), 'any');
  }
});

export class OutputFolder {
  private locked = false;

  private constructor(readonly dir: string) {}

  /**
   * Open (and create) an output folder. `dir` itself may be a link to a folder the user chose;
   * a file, a dangling link, or a folder rupta may not write is refused with one sentence.
   */
  static open(dir: string, what = 'the output folder'): OutputFolder {
    if (dir.trim() === '') throw new InputError(`${what} needs a name (found an empty one)`);
    const st = lstatOrNull(dir);
    if (st?.isSymbolicLink()) {
      let target;
      try { target = statSync(dir); } catch {
        throw new InputError(`${what} ${dir} is a symbolic link to something that does not exist; choose another folder with --out`);
      }
      if (!target.isDirectory()) throw new InputError(`${what} ${dir} must be a folder (found a link to ${kindText(target)})`);
    } else if (st && !st.isDirectory()) {
      throw new InputError(`${what} ${dir} must be a folder (found ${kindText(st)}); choose another folder with --out`);
    } else if (!st) {
      ensureDir(dir);
    }
    try { accessSync(dir, constants.W_OK | constants.X_OK); } catch (e) { throw writeFailure(e, dir); }
    return new OutputFolder(dir);
  }

  /**
   * The path of a name inside the folder, checked: relative, no `..`, every part below the
   * folder a real folder (not a link), the last absent or a regular file.
   */
  file(name: string): string {
    const rel = normalize(name);
    if (isAbsolute(name) || rel === '..' || rel.startsWith('..' + sep) || rel.split(sep).includes('..') || rel === '.') {
      throw new InputError(`${name} is not a name inside the output folder ${this.dir}`);
    }
    walk(this.dir, rel, 'file');
    return join(this.dir, rel);
  }

  /** A sub-folder, created when missing; a link or file of that name is refused. */
  subdir(name: string): string {
    const path = join(this.dir, name);
    walk(this.dir, normalize(name), 'folder');
    const st = lstatOrNull(path);
    if (st && !st.isDirectory()) {
      throw new InputError(`${path} is ${kindText(st)}; rupta does not follow links inside its output folder (remove it or choose another folder with --out)`);
    }
    if (!st) { ensureDir(path); walk(this.dir, normalize(name), 'folder'); }
    return path;
  }

  /** Regular files directly in a sub-folder ('' for the folder itself); a linked sub-folder is refused, never listed. */
  list(sub = ''): string[] {
    const path = sub ? join(this.dir, sub) : this.dir;
    walk(this.dir, sub ? normalize(sub) : '', 'folder');
    if (sub) {
      const st = lstatOrNull(path);
      if (!st) return [];
      if (!st.isDirectory()) throw new InputError(`${path} is ${kindText(st)}; rupta does not follow links inside its output folder (remove it or choose another folder with --out)`);
    }
    return readdirSync(path);
  }

  /** Remove a file inside the folder; a link is removed itself, its target never touched; folders are left alone. */
  remove(name: string): void {
    const path = join(this.dir, name);
    walk(this.dir, normalize(name), 'any');
    const st = lstatOrNull(path);
    if (!st || st.isDirectory()) return;
    try { unlinkSync(path); } catch (e) { if ((e as NodeJS.ErrnoException).code !== 'ENOENT') throw writeFailure(e, path); }
  }

  write(name: string, data: string | Uint8Array): void {
    writeFileAtomic(this.file(name), data);
  }

  /** Temp files of writers that were killed mid-write (`.name.pid.n.tmp`), in the folder or a sub-folder. */
  removeTemps(sub = ''): void {
    for (const f of this.list(sub)) if (/^\..+\.\d+\.\d+\.tmp$/.test(f)) this.remove(sub ? join(sub, f) : f);
  }

  /** Anything in the folder besides the lock and temp files of writers. */
  holdsFiles(besides: string[] = []): boolean {
    return this.list().some((f) => f !== LOCK_FILE && !/^\..*\.tmp$/.test(f) && !besides.includes(f));
  }

  /**
   * Take the folder's lock: refused while another live process holds it; a lock left by a
   * process that no longer runs is taken over. Released by release() or when the process exits.
   */
  lock(): void {
    if (this.locked) return;
    const path = this.file(LOCK_FILE);
    const mine = lockText();
    for (let attempt = 0; attempt < 3; attempt++) {
      try {
        writeFileSync(path, mine, { flag: 'wx' });
        this.locked = true;
        break;
      } catch (e) {
        if ((e as NodeJS.ErrnoException).code !== 'EEXIST') throw writeFailure(e, path);
      }
      let text = '';
      try { text = readFileSync(this.file(LOCK_FILE), 'utf8'); } catch (e) {
        if ((e as NodeJS.ErrnoException).code === 'ENOENT') continue;
        throw e;
      }
      const owner = parseLock(text);
      if (text === mine && held.has(path)) {
        throw new InputError(`the output folder ${this.dir} is in use by another run of this program; choose another folder with --out`);
      }
      if (text === mine) { this.locked = true; break; }
      const state = owner.pid === process.pid && !owner.start ? 'live' : lockState(owner);
      if (state === 'elsewhere') {
        throw new InputError(`the output folder ${this.dir} is in use by a rupta run on ${owner.host} (process ${owner.pid}); wait for it to end or choose another folder with --out (if no run is going on there, delete ${path})`);
      }
      if (state === 'live') {
        if (owner.pid === process.pid) { this.locked = true; break; } // an older lock of this very process
        throw new InputError(`the output folder ${this.dir} is in use by another rupta run (process ${owner.pid}); wait for it to end or choose another folder with --out (if no run is going on there, delete ${path})`);
      }
      // stale: the owner has gone (or its id now names another process); take it over atomically and check that the take-over held
      writeFileAtomic(path, mine);
      let now = '';
      try { now = readFileSync(path, 'utf8'); } catch { /* taken and dropped by another: try again */ }
      if (now === mine) { this.locked = true; break; }
    }
    if (!this.locked) throw new InputError(`the output folder ${this.dir} is in use by another rupta run; choose another folder with --out`);
    held.add(path);
    guards.set(resolve(this.dir), { dir: this.dir, root: identOf(statSync(this.dir)), subs: new Map() });
    if (!exitHook) {
      exitHook = true;
      // also on process.exit() (a second signal): a lock outliving its process is only stale, but tidy is better
      process.on('exit', () => { for (const p of held) rmSync(p, { force: true }); });
    }
  }

  /** Whether this process holds the lock of the folder at dir (a compare or fit that draws a run's report again). */
  static heldHere(dir: string): boolean {
    return guards.has(resolve(dir));
  }

  release(): void {
    if (!this.locked) return;
    const path = join(this.dir, LOCK_FILE);
    try { if (readFileSync(path, 'utf8') === lockText()) unlinkSync(path); } catch { /* already gone */ }
    held.delete(path);
    guards.delete(resolve(this.dir));
    this.locked = false;
  }
}

/**
 * A single file the user named outside any output folder (--export-matrix): its folder must
 * exist, and it must be absent or a regular file; written atomically like the others.
 */
export function checkedFilePath(path: string, what: string): string {
  if (path.trim() === '') throw new InputError(`${what} needs a file name (found an empty one)`);
  const st = lstatOrNull(path);
  if (st && !st.isFile()) throw new InputError(`${what} ${path} must be a regular file or a new name (found ${kindText(st)})`);
  const parent = dirname(path);
  const pst = lstatOrNull(parent);
  let pdir = pst?.isDirectory() ?? false;
  if (pst?.isSymbolicLink()) { try { pdir = statSync(parent).isDirectory(); } catch { pdir = false; } }
  if (!pdir) throw new InputError(`${what} ${path} must be in an existing folder (${parent} is ${pst ? 'not a folder' : 'missing'})`);
  try { accessSync(parent, constants.W_OK); } catch (e) { throw writeFailure(e, path); }
  return path;
}
