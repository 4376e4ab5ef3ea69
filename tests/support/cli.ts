// Running the real command line as a child process, for tests of exit codes and files.
import { execFile, execFileSync } from 'node:child_process';
import { existsSync, readFileSync } from 'node:fs';
import { parse, stringify } from 'yaml';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

export const ROOT = fileURLToPath(new URL('../..', import.meta.url));
export const CLI = join(ROOT, 'cli', 'rupta.mjs');

export interface Ran { code: number; stdout: string; stderr: string }

/** `node cli/rupta.mjs ARGS` in cwd; never rejects, the exit code is in the result. */
export function rupta(args: string[], cwd: string, timeoutMs = 120_000): Promise<Ran> {
  return new Promise((resolve) => {
    execFile(process.execPath, [CLI, ...args], { cwd, timeout: timeoutMs, env: { ...process.env, RUPTA_DEBUG: '' } }, (err, stdout, stderr) => {
      const code = err ? (typeof err.code === 'number' ? err.code : -1) : 0;
      resolve({ code, stdout: String(stdout), stderr: String(stderr) });
    });
  });
}

/** Compile once when the built command line is missing (npm ci builds it in CI). */
export function ensureBuilt(): void {
  if (!existsSync(join(ROOT, '.build', 'cli', 'main.js')) || !existsSync(join(ROOT, '.build', 'cli', 'new.js'))) {
    execFileSync('npx', ['tsc', '-p', '.'], { cwd: ROOT, stdio: 'ignore' });
  }
}

/** The demo beam made coarse (a run takes a second or two), as YAML; `change` edits it further. */
export function coarseDemoYaml(change: (c: Record<string, any>) => void = () => {}): string {
  const c = parse(readFileSync(join(ROOT, 'cases', 'beam-3pb-demo.yaml'), 'utf8')) as Record<string, any>;
  Object.assign(c.mesh, { size: 20, tipSize: 5, refineRadius: 15 });
  Object.assign(c.crack, { growthStep: 8, averagingRadius: 12 });
  c.control.increments = 40;
  Object.assign(c.output, { frames: [], animation: 'none' });
  change(c);
  return stringify(c);
}
