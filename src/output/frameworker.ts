// A worker thread that draws a share of a run's frames (see frames.ts), off the main thread.
import { isMainThread, parentPort, workerData } from 'node:worker_threads';
import { drawFrameSteps, type FramePlan } from './frames.js';

if (!isMainThread && parentPort) {
  const job = workerData as { dir: string; plan: FramePlan; steps: number[] };
  const port = parentPort;
  drawFrameSteps(job.dir, job.plan, job.steps)
    .then((thumbs) => port.postMessage({ thumbs }))
    .catch((e: unknown) => port.postMessage({ error: e instanceof Error ? e.message : String(e) }));
}
