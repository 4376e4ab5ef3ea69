// Output files: atomic whole-file writes and row-by-row CSV tables.

import { closeSync, mkdirSync, openSync, renameSync, rmSync, writeFileSync, writeSync, existsSync, readFileSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';

let tempCounter = 0;

/** Create a folder and its parents; no error when it exists. */
export function ensureDir(path: string): void {
  mkdirSync(path, { recursive: true });
}

/** Write a whole file so that readers never see it half written: temp file in the same folder, then rename. */
export function writeFileAtomic(path: string, data: string | Uint8Array): void {
  const dir = dirname(path);
  ensureDir(dir);
  const tmp = join(dir, `.${basename(path)}.${process.pid}.${tempCounter++}.tmp`);
  try {
    writeFileSync(tmp, data);
    renameSync(tmp, path);
  } catch (err) {
    rmSync(tmp, { force: true });
    throw err;
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

/** One CSV cell: numbers compact, null empty, text quoted only when it must be. */
export function csvCell(v: number | string | null | undefined): string {
  if (v === null || v === undefined) return '';
  if (typeof v === 'number') return formatNumber(v);
  return /[",\r\n]/.test(v) ? `"${v.replace(/"/g, '""')}"` : v;
}

/** A CSV table written one row at a time, so an interrupted run keeps every finished row. */
export class RowWriter {
  private fd: number | null;
  private readonly columns: number;

  /** keepExisting: continue a file that already starts with this header (resumed runs). */
  constructor(readonly path: string, readonly header: string, opts: { keepExisting?: boolean } = {}) {
    ensureDir(dirname(path));
    this.columns = header.split(',').length;
    const resume = opts.keepExisting === true && existsSync(path) && readFileSync(path, 'utf8').split('\n', 1)[0] === header;
    this.fd = openSync(path, resume ? 'a' : 'w');
    if (!resume) writeSync(this.fd, header + '\n');
  }

  append(cells: (number | string | null)[]): void {
    if (this.fd === null) throw new Error(`RowWriter for ${this.path} is closed`);
    if (cells.length !== this.columns) {
      throw new Error(`row for ${this.path} has ${cells.length} cells, the header has ${this.columns}`);
    }
    let line = '';
    for (let i = 0; i < cells.length; i++) line += (i ? ',' : '') + csvCell(cells[i]);
    // unbuffered write: the row is in the file as soon as append returns
    writeSync(this.fd, line + '\n');
  }

  close(): void {
    if (this.fd !== null) closeSync(this.fd);
    this.fd = null;
  }
}
