// Reading the user's input files with limits: regular files only (a FIFO, socket or device is
// refused at once and never blocks), and a size cap stated in the refusal.
import { closeSync, constants, fstatSync, openSync, readSync } from 'node:fs';
import { InputError } from '../errors.js';

/** Largest case file read (a case with 50,000 outline points takes about 2 MB). */
export const MAX_CASE_BYTES = 32 * 1024 * 1024;

const mib = (n: number) => `${(n / (1024 * 1024)).toFixed(n % (1024 * 1024) === 0 ? 0 : 1)} MiB`;

/** Why a path cannot be opened, as the end of a sentence. */
export function openFailure(code: string | undefined): string {
  return code === 'ENOENT' ? 'does not exist' : code === 'EISDIR' ? 'is a folder, not a file'
    : code === 'EACCES' || code === 'EPERM' ? 'cannot be read (permission denied)'
      : code === 'ELOOP' ? 'is a loop of symbolic links' : code === 'ENOTDIR' ? 'has a file where a folder is expected in its path'
        : code === 'ENAMETOOLONG' ? 'has a name that is too long' : `cannot be read (${code ?? 'unknown error'})`;
}

/**
 * The text of a regular file of at most maxBytes; `what` names it in sentences ("the case file").
 * Opened without blocking, so a FIFO with no writer cannot hang the reader; the kind and size
 * are checked on the open descriptor, and the read stops at the cap even if the file grows.
 */
export function readTextFile(path: string, what: string, maxBytes: number): string {
  return readFileBytes(path, what, maxBytes).toString('utf8');
}

/** The bytes of a regular file of at most maxBytes, with the same checks as readTextFile (for text of unknown encoding). */
export function readFileBytes(path: string, what: string, maxBytes: number): Buffer {
  let fd: number;
  try {
    fd = openSync(path, constants.O_RDONLY | (constants.O_NONBLOCK ?? 0));
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new InputError(`${what} ${path} ${code === 'EISDIR' ? `is a folder, not ${what.replace(/^the /, 'a ')}` : openFailure(code)}`);
  }
  try {
    const st = fstatSync(fd);
    if (st.isDirectory()) throw new InputError(`${what} ${path} is a folder, not ${what.replace(/^the /, 'a ')}`);
    if (!st.isFile()) {
      const kind = st.isFIFO() ? 'a pipe' : st.isSocket() ? 'a socket' : st.isCharacterDevice() || st.isBlockDevice() ? 'a device' : 'not a regular file';
      throw new InputError(`${what} ${path} must be a regular file (found ${kind})`);
    }
    if (st.size > maxBytes) throw new InputError(`${what} ${path} must be at most ${mib(maxBytes)} (found ${mib(st.size)})`);
    // read to the end (stopping one byte past the cap), so a file that grows while read is caught too
    let buf = Buffer.alloc(Math.min(st.size, maxBytes) + 1), got = 0;
    for (;;) {
      let n: number;
      try { n = readSync(fd, buf, got, buf.length - got, null); } catch (e) {
        throw new InputError(`${what} ${path} ${openFailure((e as NodeJS.ErrnoException).code)}`);
      }
      if (n === 0) break;
      got += n;
      if (got > maxBytes) throw new InputError(`${what} ${path} must be at most ${mib(maxBytes)} (it grew past that while being read)`);
      if (got === buf.length) { const more = Buffer.alloc(Math.min(2 * buf.length, maxBytes + 1)); buf.copy(more); buf = more; }
    }
    return buf.subarray(0, got);
  } finally {
    closeSync(fd);
  }
}

