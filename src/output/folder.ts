// The output folder of a run (or of a mesh, a fit): everything rupta writes stays inside it.
// Names inside are plain relative names (no `..`, no absolute paths); sub-folders and files
// that are symbolic links, pipes or devices are refused, never followed; a lock file holding
// the owner's process id keeps two runs out of one folder, and a dead owner's lock is taken over.
import { accessSync, constants, readFileSync, readdirSync, rmSync, statSync, unlinkSync, writeFileSync } from 'node:fs';
import { dirname, isAbsolute, join, normalize, sep } from 'node:path';
import { InputError } from '../errors.js';
import { ensureDir, kindText, lstatOrNull, writeFailure, writeFileAtomic } from './files.js';

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

const held = new Set<string>();
let exitHook = false;

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
    const parts = rel.split(sep);
    let at = this.dir;
    for (let i = 0; i < parts.length; i++) {
      at = join(at, parts[i]!);
      const st = lstatOrNull(at);
      if (!st) break;
      const last = i === parts.length - 1;
      if (last ? !st.isFile() : !st.isDirectory()) {
        throw new InputError(`${at} is ${kindText(st)}; rupta does not follow or replace ${last ? 'anything but regular files' : 'anything but folders on the way'} inside its output folder (remove it or choose another folder with --out)`);
      }
    }
    return join(this.dir, rel);
  }

  /** A sub-folder, created when missing; a link or file of that name is refused. */
  subdir(name: string): string {
    const path = join(this.dir, name);
    const st = lstatOrNull(path);
    if (st && !st.isDirectory()) {
      throw new InputError(`${path} is ${kindText(st)}; rupta does not follow links inside its output folder (remove it or choose another folder with --out)`);
    }
    if (!st) ensureDir(path);
    return path;
  }

  /** Regular files directly in a sub-folder ('' for the folder itself); a linked sub-folder is refused, never listed. */
  list(sub = ''): string[] {
    const path = sub ? join(this.dir, sub) : this.dir;
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
    const mine = `${process.pid}\n`;
    for (let attempt = 0; attempt < 3; attempt++) {
      try {
        writeFileSync(path, mine, { flag: 'wx' });
        this.locked = true;
        break;
      } catch (e) {
        if ((e as NodeJS.ErrnoException).code !== 'EEXIST') throw writeFailure(e, path);
      }
      let owner = NaN;
      try { owner = Number(readFileSync(this.file(LOCK_FILE), 'utf8').trim()); } catch (e) {
        if ((e as NodeJS.ErrnoException).code === 'ENOENT') continue;
        throw e;
      }
      if (owner === process.pid && held.has(path)) {
        throw new InputError(`the output folder ${this.dir} is in use by another run of this program; choose another folder with --out`);
      }
      if (owner === process.pid) { this.locked = true; break; }
      if (alive(owner)) {
        throw new InputError(`the output folder ${this.dir} is in use by another rupta run (process ${owner}); wait for it to end or choose another folder with --out (if no run is going on there, delete ${path})`);
      }
      // stale: the owner has gone; take it over atomically and check that the take-over held
      writeFileAtomic(path, mine);
      let now = '';
      try { now = readFileSync(path, 'utf8'); } catch { /* taken and dropped by another: try again */ }
      if (now === mine) { this.locked = true; break; }
    }
    if (!this.locked) throw new InputError(`the output folder ${this.dir} is in use by another rupta run; choose another folder with --out`);
    held.add(path);
    if (!exitHook) {
      exitHook = true;
      // also on process.exit() (a second signal): a lock outliving its process is only stale, but tidy is better
      process.on('exit', () => { for (const p of held) rmSync(p, { force: true }); });
    }
  }

  release(): void {
    if (!this.locked) return;
    const path = join(this.dir, LOCK_FILE);
    try { if (readFileSync(path, 'utf8') === `${process.pid}\n`) unlinkSync(path); } catch { /* already gone */ }
    held.delete(path);
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
