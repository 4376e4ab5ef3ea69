// Output files: atomic whole-file writes and row-by-row CSV tables. Writers never follow a
// link at the file they write, never replace anything but a regular file, and turn the
// errors of a full disk or a folder they may not write into one sentence.

import { closeSync, constants, fstatSync, lstatSync, mkdirSync, openSync, readFileSync, renameSync, rmSync, unlinkSync, writeFileSync, writeSync, type Stats } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { DiskFull, InputError } from '../errors.js';

let tempCounter = 0;

/** lstat, or null when nothing is there. */
export function lstatOrNull(path: string): Stats | null {
  try { return lstatSync(path); } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (code === 'ENOENT' || code === 'ENOTDIR') return null;
    throw writeFailure(e, path);
  }
}

/** What a non-regular thing is, for sentences. */
export function kindText(st: Stats): string {
  return st.isSymbolicLink() ? 'a symbolic link' : st.isDirectory() ? 'a folder' : st.isFIFO() ? 'a pipe'
    : st.isSocket() ? 'a socket' : st.isCharacterDevice() || st.isBlockDevice() ? 'a device' : 'a regular file';
}

/** The error to throw for a failed write: a full disk, a folder rupta may not write, or (otherwise) the error itself. */
export function writeFailure(e: unknown, path: string): Error {
  if (e instanceof InputError || e instanceof DiskFull) return e;
  const code = (e as NodeJS.ErrnoException)?.code;
  if (code === 'ENOSPC' || code === 'EDQUOT' || code === 'EFBIG') return new DiskFull(path);
  if (code === 'EACCES' || code === 'EPERM') return new InputError(`${path} cannot be written (permission denied)`);
  if (code === 'EROFS') return new InputError(`${path} cannot be written (the file system is read-only)`);
  if (code === 'ENOTDIR') return new InputError(`${path} cannot be written (a file stands where a folder is expected in its path)`);
  if (code === 'EISDIR') return new InputError(`${path} cannot be written (it is a folder)`);
  if (code === 'ELOOP') return new InputError(`${path} cannot be written (it is a symbolic link, which rupta does not follow)`);
  if (code === 'ENAMETOOLONG') return new InputError(`${path} cannot be written (the name is too long)`);
  return e instanceof Error ? e : new Error(String(e));
}

/** Refuses to write over anything but a regular file (a link, folder, pipe or device). */
export function refuseNonRegular(path: string): void {
  const st = lstatOrNull(path);
  if (st && !st.isFile()) {
    throw new InputError(`${path} is ${kindText(st)}; rupta writes only regular files and does not replace or follow anything else (remove it or choose another folder)`);
  }
}

/**
 * Called with every path about to be written or removed: the output folder layer checks
 * that no folder on the way has been swapped for a link since the folder was taken.
 */
let pathCheck: ((path: string) => void) | null = null;
export function setPathCheck(f: (path: string) => void): void { pathCheck = f; }

/** Remove a file (never a folder, never a link's target): checked like a write; absent is fine. */
export function removeFile(path: string): void {
  pathCheck?.(path);
  const st = lstatOrNull(path);
  if (!st || st.isDirectory()) return;
  try { unlinkSync(path); } catch (e) { if ((e as NodeJS.ErrnoException).code !== 'ENOENT') throw writeFailure(e, path); }
}

/** Create a folder and its parents; no error when it exists as a folder. */
export function ensureDir(path: string): void {
  try { mkdirSync(path, { recursive: true }); } catch (e) {
    if ((e as NodeJS.ErrnoException).code === 'EEXIST') throw new InputError(`${path} must be a folder (found a file of that name)`);
    throw writeFailure(e, path);
  }
}

/**
 * Write a whole file so that readers never see it half written: a fresh temp file in the same
 * folder (created exclusively, so a planted link is never followed), then a rename over the
 * target, which must be absent or a regular file.
 */
export function writeFileAtomic(path: string, data: string | Uint8Array): void {
  pathCheck?.(path);
  const dir = dirname(path);
  ensureDir(dir);
  refuseNonRegular(path);
  const tmp = join(dir, `.${basename(path)}.${process.pid}.${tempCounter++}.tmp`);
  try {
    writeFileSync(tmp, data, { flag: 'wx' });
    renameSync(tmp, path);
  } catch (err) {
    rmSync(tmp, { force: true });
    throw writeFailure(err, path);
  }
}

/** Compact, deterministic number text: up to 9 significant digits, plain decimals for ordinary magnitudes. */
export function formatNumber(x: number): string {
  if (Number.isNaN(x)) return 'NaN';
  if (x === Infinity) return 'Infinity';
  if (x === -Infinity) return '-Infinity';
  if (x === 0) return '0';
  if (Number.isInteger(x) && Math.abs(x) < 1e15) return String(x);
  // rounding through toPrecision, then the shortest round-trip text of the rounded value
  return String(Number(x.toPrecision(9)));
}

/** A text cell that a spreadsheet would read as a formula: it starts with = + - @ (or a tab or CR) and is not a number. */
const FORMULA_START = /^[=+\-@\t\r]/;
const NUMBER_TEXT = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/**
 * One CSV cell: numbers compact, null empty; text quoted as RFC 4180 asks (a cell holding a
 * comma, quote, CR or LF is quoted, quotes doubled), and text that a spreadsheet would take
 * for a formula gets a leading apostrophe (common practice against formula injection).
 */
export function csvCell(v: number | string | null | undefined): string {
  if (v === null || v === undefined) return '';
  if (typeof v === 'number') return formatNumber(v);
  const t = FORMULA_START.test(v) && !NUMBER_TEXT.test(v) ? `'${v}` : v;
  return /[",\r\n]/.test(t) ? `"${t.replace(/"/g, '""')}"` : t;
}

/** Open a file for writing without following a link or blocking on a pipe; refused unless it is (or becomes) a regular file. */
function openRegular(path: string, append: boolean): number {
  pathCheck?.(path);
  refuseNonRegular(path);
  let fd: number;
  try {
    fd = openSync(path, constants.O_WRONLY | constants.O_CREAT | (constants.O_NOFOLLOW ?? 0) | (constants.O_NONBLOCK ?? 0) | (append ? constants.O_APPEND : constants.O_TRUNC), 0o666);
  } catch (e) { throw writeFailure(e, path); }
  const st = fstatSync(fd);
  if (!st.isFile()) { closeSync(fd); throw new InputError(`${path} is ${kindText(st)}; rupta writes only regular files`); }
  return fd;
}

/** A CSV table written one row at a time, so an interrupted run keeps every finished row. */
export class RowWriter {
  private fd: number | null;
  private readonly columns: number;

  /** keepExisting: continue a file that already starts with this header (resumed runs). */
  constructor(readonly path: string, readonly header: string, opts: { keepExisting?: boolean } = {}) {
    pathCheck?.(path);
    ensureDir(dirname(path));
    this.columns = header.split(',').length;
    const resume = opts.keepExisting === true && lstatOrNull(path)?.isFile() === true && readFileSync(path, 'utf8').split('\n', 1)[0] === header;
    this.fd = openRegular(path, resume);
    if (!resume) this.write(header + '\n');
  }

  private write(text: string): void {
    try { writeSync(this.fd!, text); } catch (e) { throw writeFailure(e, this.path); }
  }

  append(cells: (number | string | null)[]): void {
    if (this.fd === null) throw new Error(`RowWriter for ${this.path} is closed`);
    if (cells.length !== this.columns) {
      throw new Error(`row for ${this.path} has ${cells.length} cells, the header has ${this.columns}`);
    }
    let line = '';
    for (let i = 0; i < cells.length; i++) line += (i ? ',' : '') + csvCell(cells[i]);
    // unbuffered write: the row is in the file as soon as append returns
    this.write(line + '\n');
  }

  close(): void {
    if (this.fd !== null) closeSync(this.fd);
    this.fd = null;
  }
}

/** A text file of whole lines appended one at a time (unbuffered), started afresh or continued. */
export class LineWriter {
  private fd: number | null;

  constructor(readonly path: string, opts: { append?: boolean } = {}) {
    pathCheck?.(path);
    ensureDir(dirname(path));
    this.fd = openRegular(path, opts.append === true);
  }

  line(text: string): void {
    if (this.fd === null) throw new Error(`LineWriter for ${this.path} is closed`);
    try { writeSync(this.fd, text + '\n'); } catch (e) { throw writeFailure(e, this.path); }
  }

  close(): void {
    if (this.fd !== null) closeSync(this.fd);
    this.fd = null;
  }
}
