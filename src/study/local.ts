// Local execution: a small pool of child processes, each an ordinary `rupta run` of one
// variant's case file into its run folder. A process per variant keeps a crash or an
// out-of-memory of one variant from taking the study with it, and is exactly what a
// cluster's array task runs.
import { spawn, type ChildProcess } from 'node:child_process';
import { closeSync, openSync } from 'node:fs';
import { cliEntry, logFile } from './layout.js';

export interface LocalTask { id: string; resume: boolean }
export interface TaskEnd { id: string; code: number | null; signal: string | null; seconds: number }

/** Arguments of `rupta run` for one variant, relative to the study folder. */
export function runArgs(id: string, resume: boolean): string[] {
  return ['run', `cases/${id}.yaml`, '--out', `runs/${id}`, '--quiet', resume ? '--resume' : '--force'];
}

/**
 * Runs the tasks, at most `jobs` at a time, in the order given. `stop()` asks the running
 * processes to finish their step and end (SIGTERM: they write their files and a checkpoint)
 * and starts no more.
 */
export function runPool(dir: string, tasks: LocalTask[], jobs: number, hooks: {
  onStart?: (id: string) => void;
  onEnd?: (e: TaskEnd) => void;
}): { done: Promise<TaskEnd[]>; stop: () => void } {
  const cli = cliEntry();
  const queue = tasks.slice();
  const running = new Set<ChildProcess>();
  const ends: TaskEnd[] = [];
  let stopped = false;
  let resolveAll!: (e: TaskEnd[]) => void;
  const done = new Promise<TaskEnd[]>((res) => { resolveAll = res; });

  const launch = (): void => {
    while (!stopped && running.size < jobs && queue.length > 0) {
      const t = queue.shift()!;
      const t0 = performance.now();
      const log = openSync(logFile(dir, t.id), 'w');
      const p = spawn(process.execPath, [cli, ...runArgs(t.id, t.resume)], {
        cwd: dir, stdio: ['ignore', log, log], env: { ...process.env, RUPTA_DEBUG: '' },
        // a process group of its own: Ctrl-C at the terminal reaches the study only, which then
        // asks each run once to stop after its step (a second signal would end it at once)
        detached: true,
      });
      closeSync(log);
      running.add(p);
      hooks.onStart?.(t.id);
      let ended = false;
      const finish = (code: number | null, signal: string | null) => {
        if (ended) return;
        ended = true;
        running.delete(p);
        const e = { id: t.id, code, signal, seconds: (performance.now() - t0) / 1000 };
        ends.push(e);
        hooks.onEnd?.(e);
        launch();
      };
      p.on('error', () => finish(-1, null));
      p.on('exit', (code, signal) => finish(code, signal));
    }
    if (running.size === 0 && (queue.length === 0 || stopped)) resolveAll(ends);
  };
  queueMicrotask(launch);
  return {
    done,
    stop: () => {
      if (stopped) return;
      stopped = true;
      for (const p of running) p.kill('SIGTERM');
      if (running.size === 0) resolveAll(ends);
    },
  };
}

