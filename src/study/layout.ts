// Where a study keeps its files, and what a finished variant looks like on disk.
import { existsSync, readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

export const STUDY_FILE = 'study.json';

export const caseFile = (dir: string, id: string) => join(dir, 'cases', `${id}.yaml`);
export const runDir = (dir: string, id: string) => join(dir, 'runs', id);
export const logFile = (dir: string, id: string) => join(dir, 'logs', `${id}.txt`);

export type RunStatus = 'complete' | 'stopped' | 'interrupted' | 'failed' | 'missing';

/** Status of a variant's run folder from its summary (missing: never ran or ended without one). */
export function runStatus(dir: string, id: string): RunStatus {
  const p = join(runDir(dir, id), 'summary.json');
  if (!existsSync(p)) return 'missing';
  try {
    const s = JSON.parse(readFileSync(p, 'utf8')) as { status?: string };
    return s.status === 'complete' || s.status === 'stopped' || s.status === 'interrupted' || s.status === 'failed' ? s.status : 'missing';
  } catch { return 'missing'; }
}

/** A run that needs no repeating: it ended on its own (complete, stopped early, or failed in a way that repeats). */
export const isFinished = (s: RunStatus) => s === 'complete' || s === 'stopped' || s === 'failed';

/** The entry script of the command line (cli/rupta.mjs), found from this module in the sources or the build. */
export function cliEntry(): string {
  let d = dirname(fileURLToPath(import.meta.url));
  for (let i = 0; i < 5; i++) {
    const p = join(d, 'cli', 'rupta.mjs');
    if (existsSync(p) && existsSync(join(d, 'package.json'))) return p;
    d = dirname(d);
  }
  throw new Error('the rupta command line (cli/rupta.mjs) was not found next to the library');
}
