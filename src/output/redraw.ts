// Frames, animation and report drawn again from a finished run folder, from its own files only:
// case.json, curve.csv, summary.json, frames/step-NNNN.bin, mesh.svg and field-s1.svg (and the
// compare*.json and fit*.json that the lab commands wrote there).

import { existsSync, readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import type { AnalysisResult } from '../fracture/analysis.js';
import { InputError } from '../errors.js';
import { drawFrames, readCurveRows, readRunInfo, type FrameFile } from './frames.js';
import { curveSvg, writeAnimation } from './runfiles.js';
import { writeReport, type WorkOfFracture } from './report.js';
import { OutputFolder } from './folder.js';

interface Summary {
  status: AnalysisResult['status']; reason: string; peak: AnalysisResult['peak']; crackPaths: AnalysisResult['crackPaths'];
  dofs: AnalysisResult['dofs']; mesh: AnalysisResult['mesh']; probes: AnalysisResult['probes'];
  timings_s: { mesh: number; solve: number; total: number }; workOfFracture: WorkOfFracture | null;
}

/** Pictures of the frames as they are in the folder (for a report written again without drawing them). */
function framesInFolder(dir: string): FrameFile[] {
  const fd = join(dir, 'frames');
  if (!existsSync(fd)) return [];
  const by = new Map<number, FrameFile>();
  for (const f of readdirSync(fd)) {
    const m = /^step-(\d{4,})\.(svg|png)$/.exec(f);
    if (!m) continue;
    const k = Number(m[1]), e = by.get(k) ?? { step: k };
    e[m[2] as 'svg' | 'png'] = join(fd, f);
    by.set(k, e);
  }
  return [...by.values()].sort((a, b) => a.step - b.step);
}

/** Frames (unless frames is false; workers: see drawFrames), animation and report of a run folder, again; the report takes up compare*.json and fit*.json found there. */
export async function redrawRun(dir: string, opt: { frames?: boolean; workers?: number } = {}): Promise<{ frames: number }> {
  if (!existsSync(dir)) throw new InputError(`the run folder ${dir} does not exist`);
  // written like a run: under the folder's lock (unless this process holds it already), no link followed
  const folder = OutputFolder.open(dir, 'the run folder');
  const mine = !OutputFolder.heldHere(dir);
  if (mine) folder.lock();
  try {
    folder.list('frames');
    return await redrawLocked(dir, opt);
  } finally {
    if (mine) folder.release();
  }
}

async function redrawLocked(dir: string, opt: { frames?: boolean; workers?: number }): Promise<{ frames: number }> {
  const info = readRunInfo(dir), c = info.case;
  const rows = readCurveRows(dir);
  const sp = join(dir, 'summary.json');
  if (!existsSync(sp)) throw new InputError(`${dir} holds no summary.json: the run has not finished; go on with it by rupta run --resume`);
  const s = JSON.parse(readFileSync(sp, 'utf8')) as Summary;
  let frames: FrameFile[];
  if (opt.frames === false) frames = framesInFolder(dir);
  else {
    frames = await drawFrames(dir, { workers: opt.workers });
    await writeAnimation(dir, c, frames);
  }
  const text = (f: string): string | null => (existsSync(join(dir, f)) ? readFileSync(join(dir, f), 'utf8') : null);
  const meshPicture = text('mesh.svg');
  // the mesh picture's caption gives the initial counts
  const m = meshPicture ? /(\d+) polygons, (\d+) vertices\./.exec(meshPicture) : null;
  const result: AnalysisResult = {
    status: s.status, reason: s.reason, rows, peak: s.peak, crackPaths: s.crackPaths, dofs: s.dofs, mesh: s.mesh, probes: s.probes,
    timings_s: { solve: s.timings_s.solve },
  };
  await writeReport(join(dir, 'report.html'), {
    c, result, initialMesh: m ? { polygons: Number(m[1]), vertices: Number(m[2]) } : s.mesh, frames,
    finalSvg: text('field-s1.svg'), meshSvg: meshPicture, curveSvg: rows.length > 1 ? curveSvg(c, rows) : null,
    timings: s.timings_s, workOfFracture: s.workOfFracture, run: info,
  });
  return { frames: frames.length };
}

/** After compare or fit wrote into a folder: the report again when the folder is a finished run's (true), else nothing (false). */
export async function refreshRunReport(dir: string): Promise<boolean> {
  if (!existsSync(join(dir, 'case.json')) || !existsSync(join(dir, 'summary.json')) || !existsSync(join(dir, 'curve.csv'))) return false;
  await redrawRun(dir, { frames: false });
  return true;
}
