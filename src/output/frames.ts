// Frames of a run. While the run goes on, the state of the kept steps is stored as compact data in
// frames/ (at most 2·maxFrames of them, evenly spaced, and the latest); once it has ended, at most
// maxFrames of them are drawn with one magnification, one view and the whole curve in the inset, so
// every frame has the same size and scale. Drawing reads only the run folder's own files (case.json,
// curve.csv, frames/step-NNNN.bin), so `rupta redraw` gives the same frames byte for byte.

import { existsSync, readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import type { CaseModel } from '../case/model.js';
import type { Snapshot, StepRow } from '../fracture/analysis.js';
import { InputError } from '../errors.js';
import { writeFileAtomic, ensureDir, removeFile } from './files.js';
import { autoMagnification, bbox, fieldSvg, type FieldPicture } from './field.js';
import type { CurveInset } from './inset.js';
import sharp from 'sharp';
import { pngDataUri, svgToPngBuffer } from './png.js';
import { FrameRaster, type AnimationPage } from './frameraster.js';
import { decodeStep, encodeStep, type StepData } from './stepdata.js';

/** The validated case as the run used it, in the run folder. */
export const CASE_FILE = 'case.json';
export const stepName = (k: number): string => `step-${String(k).padStart(4, '0')}`;
const DATA_FILE = /^step-(\d{4,})\.bin$/;
const PICTURE_FILE = /^step-(\d{4,})\.(svg|png)$/;

/**
 * A frame drawn for the report and the animation; thumb: the report's copy (data URI: the PNG
 * frame, or the SVG one drawn STEPPER_WIDTH wide); page: the GIF animation's page of it, with the
 * palette its indices refer to.
 */
export interface FrameFile { step: number; svg?: string; png?: string; thumb?: string; page?: AnimationPage & { palette: Uint8Array } }

/** Width of the animation's pages (px; narrower frames keep theirs). */
export const ANIMATION_WIDTH = 720;

/** Width of SVG-only frames in report.html (px); PNG frames go in as they are. */
export const STEPPER_WIDTH = 900;

/** Steps between kept states once `latest` steps have run: `every` doubled until at most 2·cap multiples remain. */
export function strideFor(latest: number, every: number, cap: number): number {
  let s = Math.max(1, every);
  while (Math.floor(latest / s) + 1 > 2 * Math.max(1, cap)) s *= 2;
  return s;
}

/** Steps of a folder's stored states, in order. */
export function storedSteps(framesDir: string): number[] {
  if (!existsSync(framesDir)) return [];
  const out: number[] = [];
  for (const f of readdirSync(framesDir)) { const m = DATA_FILE.exec(f); if (m) out.push(Number(m[1])); }
  return out.sort((a, b) => a - b);
}

/** Keeps the state of evenly spaced steps and of the latest one, as files in frames/. */
export class FrameStore {
  private kept: number[];
  constructor(readonly framesDir: string, readonly ft: number, readonly every: number, readonly cap: number) {
    ensureDir(framesDir);
    this.kept = storedSteps(framesDir);
  }

  add(s: Snapshot): void {
    writeFileAtomic(join(this.framesDir, `${stepName(s.step)}.bin`), encodeStep(s, this.ft));
    if (!this.kept.includes(s.step)) this.kept.push(s.step);
    const S = strideFor(s.step, this.every, this.cap);
    this.kept = this.kept.filter((k) => {
      const keep = k === s.step || k % S === 0;
      if (!keep) removeFile(join(this.framesDir, `${stepName(k)}.bin`));
      return keep;
    });
  }
}

/** Symbols of the supports and loads for pictures. */
export function specimenSymbols(c: CaseModel): Pick<FieldPicture, 'supports' | 'loads'> {
  const supports: NonNullable<FieldPicture['supports']> = [];
  for (const s of c.supports) {
    if (s.at) supports.push({ x: s.at[0], y: s.at[1], fix: s.fix });
    else if (s.along) for (let k = 0; k <= 4; k++) {
      const t = k / 4;
      supports.push({ x: s.along[0][0] + t * (s.along[1][0] - s.along[0][0]), y: s.along[0][1] + t * (s.along[1][1] - s.along[0][1]), fix: s.fix });
    }
  }
  const loads: NonNullable<FieldPicture['loads']> = [];
  for (const l of c.loads) {
    if (l.at) loads.push({ x: l.at[0], y: l.at[1], dx: l.direction[0], dy: l.direction[1] });
    else if (l.along) for (let k = 0; k <= 4; k++) {
      const t = k / 4;
      loads.push({ x: l.along[0][0] + t * (l.along[1][0] - l.along[0][0]), y: l.along[0][1] + t * (l.along[1][1] - l.along[0][1]), dx: l.direction[0], dy: l.direction[1] });
    }
  }
  return { supports, loads };
}

// a load that rounds to zero is printed without a sign
export const fmtLoad = (F: number): string => (Math.abs(F) >= 1000 ? `${(F / 1000).toFixed(2)} kN` : `${(Math.abs(F) < 0.05 ? 0 : F).toFixed(1)} N`);

/** What case.json holds: the validated case, the rupta that ran it, and the case file's hash. */
export interface RunCaseFile {
  format: 1;
  rupta: string;
  /** SHA-256 of the case file's bytes; of the validated case's JSON when the run was not started from a file. */
  caseHash: { sha256: string; of: 'case file' | 'validated case'; file?: string };
  case: CaseModel;
}

/** The case.json of a run folder. */
export function readRunInfo(dir: string): RunCaseFile {
  const p = join(dir, CASE_FILE);
  if (!existsSync(p)) throw new InputError(`${dir} holds no ${CASE_FILE}: it is not the folder of a run made by rupta 0.2 or later`);
  const info = JSON.parse(readFileSync(p, 'utf8')) as RunCaseFile;
  if (info.format !== 1 || !info.case) throw new InputError(`${p} is not a case.json of format 1`);
  return info;
}

/** The case a run folder was run with. */
export function readRunCase(dir: string): CaseModel {
  return readRunInfo(dir).case;
}

/** The rows of a run's curve.csv (empty cells are null). */
export function readCurveRows(dir: string): StepRow[] {
  const p = join(dir, 'curve.csv');
  if (!existsSync(p)) throw new InputError(`${dir} holds no curve.csv: it is not the folder of a run`);
  const lines = readFileSync(p, 'utf8').split('\n');
  const rows: StepRow[] = [];
  const num = (s: string | undefined): number | null => (s === undefined || s === '' ? null : Number(s));
  for (let i = 1; i < lines.length; i++) {
    const c = lines[i].split(',');
    if (c.length < 12) continue;
    rows.push({
      step: Number(c[0]), control: Number(c[1]), load_N: Number(c[2]), displacement_mm: Number(c[3]), cmod_mm: num(c[4]),
      crack_length_mm: Number(c[5]), tip_x_mm: num(c[6]), tip_y_mm: num(c[7]), external_work_Nmm: Number(c[8]),
      elastic_energy_Nmm: Number(c[9]), dissipated_Nmm: Number(c[10]), iterations: Number(c[11]),
    });
  }
  return rows;
}

/** The opening the frames plot: CMOD when there is a gauge, else the load-point displacement; the whole run. */
export function frameInset(rows: StepRow[], step: number): CurveInset | undefined {
  if (rows.length === 0) return undefined;
  const gauge = rows.some((r) => r.cmod_mm !== null);
  let k = rows.length - 1;
  while (k > 0 && rows[k].step > step) k--;
  return {
    x: rows.map((r) => (gauge ? r.cmod_mm ?? NaN : r.displacement_mm)), y: rows.map((r) => r.load_N), current: k,
    xLabel: gauge ? 'CMOD (mm)' : 'Displacement (mm)', yLabel: 'Load (N)',
  };
}

/** What every frame of a run shares. */
export interface FramePlan {
  steps: number[]; magnification: number; view: [number, number, number, number];
  /** One palette of the PNG frames (r, g, b, …), from the last frame. */
  palette?: number[];
}

/** At most `cap` of the stored steps: every m-th from the first, with the smallest m that fits, and the last. */
export function evenlySpaced(stored: number[], cap: number): number[] {
  const n = stored.length;
  if (n <= cap) return stored.slice();
  if (cap <= 1) return [stored[n - 1]];
  for (let m = 2; ; m++) {
    const count = Math.floor((n - 1) / m) + 1 + ((n - 1) % m === 0 ? 0 : 1);
    if (count <= cap) {
      const out: number[] = [];
      for (let i = 0; i < n - 1; i += m) out.push(stored[i]);
      out.push(stored[n - 1]);
      return out;
    }
  }
}

/** The frames to draw (at most maxFrames of the stored states, evenly spaced), one magnification and one view for all. */
export function planFrames(dir: string, c: CaseModel): FramePlan | null {
  const stored = storedSteps(join(dir, 'frames'));
  if (stored.length === 0) return null;
  const steps = evenlySpaced(stored, c.output.maxFrames);
  const data = steps.map((k) => readStep(dir, k));
  const read = new Map(steps.map((k, i) => [k, data[i]!]));
  // one magnification: the largest displacement of the run (its final state in a test that opens steadily)
  let big = data[data.length - 1], umax = 0;
  for (const d of data) {
    let m = 0;
    for (let i = 0; i + 1 < d.u.length; i += 2) m = Math.max(m, Math.hypot(d.u[i], d.u[i + 1]));
    if (m > umax) { umax = m; big = d; }
  }
  const mag = autoMagnification(big.mesh, big.u);
  const view: [number, number, number, number] = [Infinity, Infinity, -Infinity, -Infinity];
  const grow = (b: [number, number, number, number]) => {
    view[0] = Math.min(view[0], b[0]); view[1] = Math.min(view[1], b[1]); view[2] = Math.max(view[2], b[2]); view[3] = Math.max(view[3], b[3]);
  };
  for (const d of data) {
    grow(bbox(d.mesh.xy));
    const pos = new Float64Array(d.mesh.xy.length);
    for (let i = 0; i < pos.length; i++) pos[i] = d.mesh.xy[i] + mag * d.u[i];
    grow(bbox(pos));
  }
  const plan: FramePlan = { steps, magnification: mag, view };
  stepsRead.set(plan, read);
  return plan;
}

/** The states a plan was made from, kept for drawing on this thread (a worker's copy of the plan reads its own). */
const stepsRead = new WeakMap<FramePlan, Map<number, StepData>>();

function readStep(dir: string, step: number): StepData {
  return decodeStep(readFileSync(join(dir, 'frames', `${stepName(step)}.bin`)));
}

/** The picture of one stored state (widthPx: its width). */
export function framePicture(c: CaseModel, d: StepData, rows: StepRow[], plan: FramePlan, widthPx: number): FieldPicture {
  const r = rows.find((q) => q.step === d.step);
  const caption = r
    ? [`Step ${r.step}: load ${fmtLoad(r.load_N)}, load-point displacement ${r.displacement_mm.toFixed(4)} mm` +
        (r.cmod_mm !== null ? `, CMOD ${r.cmod_mm.toFixed(4)} mm` : '') + `, crack length ${r.crack_length_mm.toFixed(1)} mm.`]
    : [`Step ${d.step}.`];
  return {
    mesh: d.mesh, values: d.s1, valueLabel: 'σ₁ / ft', range: [-1, 1], diverging: true,
    displacement: d.u, magnification: plan.magnification, view: plan.view, showMesh: true, cracks: d.cracks, cohesive: d.cohesive,
    ...specimenSymbols(c), inset: frameInset(rows, d.step), title: c.title, caption, widthPx,
  };
}

/**
 * What tells apart the shared layers (title, colour bar, the inset's whole curve and axes, scale
 * bar) of two frames of one plan: only the size (the damage key is an overlay of its own).
 */
const sharedLayersKey = (p: FieldPicture): string => `${p.widthPx}|${p.caption?.length ?? 0}`;

/** The SVG picture of one stored state. */
export function frameSvg(c: CaseModel, d: StepData, rows: StepRow[], plan: FramePlan): string {
  return fieldSvg(framePicture(c, d, rows, plan, 1000));
}

/** What drawing a frame gives besides its files: the report's copy, and the GIF animation's page when there is one. */
export interface FrameDrawn { step: number; thumb: string; page?: AnimationPage }

/** Draw some of the planned frames into frames/ (in this thread); returns the report's copy of each and its page of the GIF. */
export async function drawFrameSteps(dir: string, plan: FramePlan, steps: number[], raster = new FrameRaster()): Promise<FrameDrawn[]> {
  const c = readRunCase(dir), rows = readCurveRows(dir);
  const thumbs: FrameDrawn[] = [];
  const palette = plan.palette ? Uint8Array.from(plan.palette) : undefined;
  // the GIF's pages from the pixels in hand (rupta's palette has room for its transparent index)
  const pages = c.output.animation === 'gif' && palette !== undefined && palette.length / 3 <= 255;
  for (const k of steps) {
    const d = stepsRead.get(plan)?.get(k) ?? readStep(dir, k);
    const base = join(dir, 'frames', stepName(k));
    const svg = c.output.frames.includes('svg') ? frameSvg(c, d, rows, plan) : null;
    if (svg !== null) writeFileAtomic(`${base}.svg`, svg);
    if (c.output.frames.includes('png')) {
      // drawn straight into pixels at the PNG's width: no SVG text to build and parse for the mesh
      const pic = framePicture(c, d, rows, plan, c.output.pngWidth);
      const png = await raster.png(pic, palette, sharedLayersKey(pic));
      writeFileAtomic(`${base}.png`, png);
      // the frame itself: a smaller copy would save little on a palette PNG and cost a resize and an encode
      const uri = `data:image/png;base64,${png.toString('base64')}`;
      // the GIF's page drawn at its own size (or, no wider than the animation, the frame itself)
      let page: AnimationPage | undefined;
      if (pages && c.output.pngWidth <= ANIMATION_WIDTH) page = raster.framePage();
      else if (pages) { const pp = framePicture(c, d, rows, plan, ANIMATION_WIDTH); page = await raster.page(pp, palette!, sharedLayersKey(pp)); }
      thumbs.push({ step: k, thumb: uri.includes('http') ? await pngDataUri(sharp(png)) : uri, page });
    } else thumbs.push({ step: k, thumb: await pngDataUri(sharp(await svgToPngBuffer(svg!, STEPPER_WIDTH))) });
  }
  return thumbs;
}

/**
 * PNG pixels of a run's frames from which a worker draws half of them: PNG frames cost about 30 ms
 * of processor time a megapixel on one thread (the demo's 30 frames of 1200 × 780 px: 0.9 s), so
 * a worker's half then takes at least 1.4 s, four times its start.
 */
export const WORKER_FROM_PIXELS = 90e6;

/**
 * Frames of a finished (or stopped) run folder, drawn on this thread and a worker (workers: 2), on
 * one worker (1) or here alone (0); by default on a worker too for SVG frames and for PNG frames
 * of at least WORKER_FROM_PIXELS pixels in all, else here alone. Pictures of other
 * steps are removed, and with prune (a complete run, which no resume needs) their stored states too.
 */
export async function drawFrames(dir: string, opt: { workers?: number; prune?: boolean } = {}): Promise<FrameFile[]> {
  const c = readRunCase(dir);
  const framesDir = join(dir, 'frames');
  const plan = c.crack && c.output.frames.length > 0 ? planFrames(dir, c) : null;
  const chosen = new Set(plan?.steps ?? []);
  if (existsSync(framesDir)) {
    for (const f of readdirSync(framesDir)) {
      const m = PICTURE_FILE.exec(f);
      if (m && (!chosen.has(Number(m[1])) || !c.output.frames.includes(m[2] as 'svg' | 'png'))) removeFile(join(framesDir, f));
    }
  }
  if (!plan) return [];
  const here = new FrameRaster();
  let pixels = Infinity; // of all PNG frames together
  if (c.output.frames.includes('png')) {
    // one palette for every frame, quantised once from the last frame at the frames' size (from
    // the last GIF page, a third of the pixels, it saved about 30 ms but lacked blends of the mesh
    // lines over dark cells that earlier frames need: they came out grey)
    const last = plan.steps[plan.steps.length - 1]!;
    const pic = framePicture(c, stepsRead.get(plan)?.get(last) ?? readStep(dir, last), readCurveRows(dir), plan, c.output.pngWidth);
    const q = await here.palette(pic, sharedLayersKey(pic));
    plan.palette = Array.from(q.palette);
    pixels = q.width * q.height * plan.steps.length;
  }
  if (opt.prune) for (const k of storedSteps(framesDir)) if (!chosen.has(k)) removeFile(join(framesDir, `${stepName(k)}.bin`));
  const compiled = import.meta.url.endsWith('.js');
  // a worker costs its start in processor time (modules, sharp, its own shared overlay and warm-up:
  // about 0.35 s measured); it is started only for SVG frames or when its half of the PNG frames
  // costs several times that
  const auto = c.output.frames.includes('svg') || pixels >= WORKER_FROM_PIXELS ? 2 : 0;
  const n = compiled ? Math.min(Math.max(0, Math.floor(opt.workers ?? auto)), availableParallelism(), 2, plan.steps.length) : 0;
  let thumbs: FrameDrawn[];
  if (n === 0) thumbs = await drawFrameSteps(dir, plan, plan.steps, here);
  else {
    // interleaved shares: early frames (small cracks) and late ones cost about the same in each;
    // this thread, idle otherwise, draws the first share (one worker fewer to start)
    const shares = Array.from({ length: n }, (_, w) => plan.steps.filter((_, i) => i % n === w));
    const away = shares.slice(n > 1 ? 1 : 0).map((steps) => onWorker({ dir, plan, steps })); // started first
    const mine = n > 1 ? drawFrameSteps(dir, plan, shares[0]!, here) : Promise.resolve([]);
    const [a, b] = await Promise.all([mine, Promise.all(away)]);
    thumbs = [...a, ...b.flat()];
  }
  const drawn = new Map(thumbs.map((t) => [t.step, t]));
  const palette = plan.palette ? Uint8Array.from(plan.palette) : null;
  return plan.steps.map((k) => {
    const base = join(framesDir, stepName(k)), d = drawn.get(k), page = d?.page;
    const f: FrameFile = { step: k, thumb: d?.thumb, ...(page && palette ? { page: { ...page, palette } } : {}) };
    if (c.output.frames.includes('svg')) f.svg = `${base}.svg`;
    if (c.output.frames.includes('png')) f.png = `${base}.png`;
    return f;
  });
}

function onWorker(job: { dir: string; plan: FramePlan; steps: number[] }): Promise<FrameDrawn[]> {
  return new Promise((resolve, reject) => {
    const w = new Worker(new URL('./frameworker.js', import.meta.url), { workerData: job });
    let done = false;
    w.once('message', (m: { error?: string; thumbs?: FrameDrawn[] }) => { done = true; if (m.error) reject(new Error(m.error)); else resolve(m.thumbs ?? []); });
    w.once('error', (e) => { done = true; reject(e); });
    w.once('exit', (code) => { if (!done) reject(new Error(`the frame worker stopped with code ${code}`)); });
  });
}
