// One candidate of a fit: a full analysis without files, as a worker thread or in-process.

import { isMainThread, parentPort } from 'node:worker_threads';
import type { CaseModel } from '../case/model.js';
import type { PolyMesh } from '../mesh/polymesh.js';
import { Analysis } from '../fracture/analysis.js';
import { LefmAnalysis } from '../fracture/lefm.js';

/** The curve of one simulation, as plain arrays (they cross the thread boundary). */
export interface SimCurve {
  status: 'complete' | 'stopped' | 'interrupted' | 'failed';
  reason: string;
  load: Float64Array;
  displacement: Float64Array;
  cmod: Float64Array | null;
  seconds: number;
}

export interface SimJob { id: number; c: CaseModel; mesh: PolyMesh; timeLimit_s?: number }
export type SimReply = { id: number; ok: true; curve: SimCurve } | { id: number; ok: false; error: string };

/**
 * Run a case on a given initial mesh and keep only its curve; a failure is a status, not a
 * throw. Past the time limit the run ends after the step in hand (status interrupted, reason
 * "time limit").
 */
export async function simulateCurve(c: CaseModel, mesh: PolyMesh, timeLimit_s = Infinity): Promise<SimCurve> {
  const t0 = performance.now();
  const L: number[] = [], D: number[] = [], C: number[] = [];
  let gauge = true, late = false;
  try {
    const a = c.crack?.model === 'lefm' ? new LefmAnalysis(c, mesh) : new Analysis(c, mesh);
    if (Number.isFinite(timeLimit_s)) a.stopRequested = () => (late = late || performance.now() - t0 > 1000 * timeLimit_s);
    const r = await a.run((e) => {
      L.push(e.row.load_N); D.push(e.row.displacement_mm);
      if (e.row.cmod_mm === null) gauge = false; else C.push(e.row.cmod_mm);
    });
    return { status: r.status, reason: late ? 'time limit' : r.reason, load: Float64Array.from(L), displacement: Float64Array.from(D), cmod: gauge ? Float64Array.from(C) : null, seconds: (performance.now() - t0) / 1000 };
  } catch (e) {
    // a singular system or NaN counts as a bad candidate: the optimiser moves away from it
    return { status: 'failed', reason: e instanceof Error ? e.message : String(e), load: Float64Array.from(L), displacement: Float64Array.from(D), cmod: gauge ? Float64Array.from(C) : null, seconds: (performance.now() - t0) / 1000 };
  }
}

if (!isMainThread && parentPort) {
  const port = parentPort;
  port.on('message', (job: SimJob) => {
    simulateCurve(job.c, job.mesh, job.timeLimit_s).then(
      (curve) => port.postMessage({ id: job.id, ok: true, curve } satisfies SimReply),
      (e: unknown) => port.postMessage({ id: job.id, ok: false, error: e instanceof Error ? e.message : String(e) } satisfies SimReply),
    );
  });
}
