// The files of one run: curve and probe tables that grow row by row, a frame per step,
// and at the end the summary, the curve plots, the mesh and the field pictures.
import { existsSync, readFileSync, readdirSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import type { CaseModel } from '../case/model.js';
import type { PolyMesh } from '../mesh/polymesh.js';
import type { AnalysisResult, Snapshot, StepEvent, StepRow } from '../fracture/analysis.js';
import { InputError } from '../errors.js';
import { RowWriter, csvCell, ensureDir, writeFileAtomic } from './files.js';
import { fieldSvg, meshSvg, type FieldPicture } from './field.js';
import { plotPanelsSvg, plotSvg, type PlotOptions, type Series } from './plot.js';
import { svgToPng, framesToAnimation } from './png.js';
import type { CurveInset } from './inset.js';
import { VtkSeries } from './vtk.js';
import { writeReport, type FrameFile } from './report.js';
import { GAUGE_HEADER, GaugeReader } from './gauges.js';
import { curvePeaks, fmtLoad, runWarnings, wedgeRatio, workOfFractureEstimate } from './warnings.js';

export const CURVE_HEADER = 'step,control,load_N,displacement_mm,cmod_mm,crack_length_mm,tip_x_mm,tip_y_mm,external_work_Nmm,elastic_energy_Nmm,dissipated_Nmm,iterations';
export const PROBE_HEADER = 'step,probe,x_mm,y_mm,ux_mm,uy_mm,sxx_MPa,syy_MPa,sxy_MPa,s1_MPa';
export const TIPS_HEADER = 'step,crack,tip,x_mm,y_mm,KI_MPa_sqrtm,KII_MPa_sqrtm,kink_deg';

/** A run has crack tips to report when it has a sharp slit or grows cracks. */
export const hasTips = (c: CaseModel): boolean => !!c.crack || c.geometry.notches.some((n) => n.width === 0);

export interface RunFilesOptions {
  force?: boolean;
  /** Go on with the run in the folder: the rows of its checkpoint (the tables are cut back to its last step). */
  resume?: StepRow[];
}

/** Files of one step in frames/ and vtk/ (the only ones --force and a resume delete). */
const STEP_FILE = /^step-(\d{4,})\.(svg|png|vtu)$/;

const curveCells = (r: StepRow) => [r.step, r.control, r.load_N, r.displacement_mm, r.cmod_mm, r.crack_length_mm, r.tip_x_mm, r.tip_y_mm,
  r.external_work_Nmm, r.elastic_energy_Nmm, r.dissipated_Nmm, r.iterations];

/** Remove the step files of a run's sub-folder after step `after` (all of them for −1); nothing else in it is touched. */
function removeStepFiles(dir: string, after: number): void {
  if (!existsSync(dir)) return;
  for (const f of readdirSync(dir)) {
    const m = STEP_FILE.exec(f);
    if (m && Number(m[1]) > after) rmSync(join(dir, f), { force: true });
  }
}

/** Complete lines of a table whose first cell (the step) is at most `last`, header first. */
function tableUpTo(path: string, header: string, last: number): string {
  let out = header + '\n';
  if (!existsSync(path)) return out;
  const text = readFileSync(path, 'utf8');
  const lines = text.split('\n');
  lines.pop(); // the part after the last newline is not a whole row
  for (let i = 1; i < lines.length; i++) if (Number(lines[i].slice(0, lines[i].indexOf(','))) <= last) out += lines[i] + '\n';
  return out;
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

/** Major principal stress per cell divided by ft. */
export function s1OverFt(cellStress: Float64Array, ft: number): Float64Array {
  const n = cellStress.length / 3, out = new Float64Array(n);
  for (let c = 0; c < n; c++) {
    const sxx = cellStress[3 * c], syy = cellStress[3 * c + 1], sxy = cellStress[3 * c + 2];
    out[c] = ((sxx + syy) / 2 + Math.hypot((sxx - syy) / 2, sxy)) / ft;
  }
  return out;
}

// a load that rounds to zero is printed without a sign

export class RunFiles {
  private curve: RowWriter;
  private probes: RowWriter;
  private tips: RowWriter | null = null;
  /** gauges.csv, when the case names extra gauges. */
  private gauges: RowWriter | null = null;
  private gaugeReader: GaugeReader | null = null;
  private framePngs: string[] = [];
  private frames: FrameFile[] = [];
  private pending: Promise<void>[] = [];
  private rows: StepRow[] = [];
  private vtk: VtkSeries | null = null;
  readonly framesDir: string;

  constructor(readonly dir: string, readonly c: CaseModel, opt: RunFilesOptions = {}) {
    const resume = opt.resume ?? null;
    if (existsSync(dir) && readdirSync(dir).length > 0 && !opt.force && !resume) {
      throw new InputError(`the output folder ${dir} already holds a run; pass --force to overwrite it, --resume to go on with it, or --out to choose another folder`);
    }
    this.framesDir = join(dir, 'frames');
    const last = resume ? resume[resume.length - 1]?.step ?? -1 : -1;
    // an overwritten run loses its step files and checkpoint; a resumed one those after its checkpoint
    if (opt.force || resume) {
      removeStepFiles(this.framesDir, last);
      removeStepFiles(join(dir, 'vtk'), last);
    }
    if (opt.force && !resume) {
      rmSync(join(dir, 'checkpoint.json'), { force: true });
      rmSync(join(dir, 'vtk', 'steps.pvd'), { force: true });
    }
    ensureDir(dir);
    if (c.crack && c.output.frames.length > 0) ensureDir(this.framesDir);
    if (resume) {
      // the tables as they stood at the checkpoint; the rows after it are computed again
      writeFileAtomic(join(dir, 'curve.csv'), CURVE_HEADER + '\n' + resume.map((r) => curveCells(r).map(csvCell).join(',') + '\n').join(''));
      writeFileAtomic(join(dir, 'probes.csv'), tableUpTo(join(dir, 'probes.csv'), PROBE_HEADER, last));
      if (hasTips(c)) writeFileAtomic(join(dir, 'tips.csv'), tableUpTo(join(dir, 'tips.csv'), TIPS_HEADER, last));
      if (c.gauges?.length) writeFileAtomic(join(dir, 'gauges.csv'), tableUpTo(join(dir, 'gauges.csv'), GAUGE_HEADER, last));
      this.seedFrames(resume);
    }
    this.curve = new RowWriter(join(dir, 'curve.csv'), CURVE_HEADER, { keepExisting: !!resume });
    this.probes = new RowWriter(join(dir, 'probes.csv'), PROBE_HEADER, { keepExisting: !!resume });
    if (hasTips(c)) this.tips = new RowWriter(join(dir, 'tips.csv'), TIPS_HEADER, { keepExisting: !!resume });
    else rmSync(join(dir, 'tips.csv'), { force: true });
    if (c.gauges?.length) {
      this.gauges = new RowWriter(join(dir, 'gauges.csv'), GAUGE_HEADER, { keepExisting: !!resume });
      this.gaugeReader = new GaugeReader(c.gauges);
    }
    if (c.output.vtk) {
      this.vtk = new VtkSeries(join(dir, 'vtk'));
      if (resume) {
        // the collection file lists the steps already written
        const kept = resume.filter((r) => existsSync(join(dir, 'vtk', `step-${String(r.step).padStart(4, '0')}.vtu`)))
          .map((r) => ({ step: r.step, file: `step-${String(r.step).padStart(4, '0')}.vtu` }));
        (this.vtk as unknown as { entries: { step: number; file: string }[] }).entries = kept;
      }
    }
  }

  /** Rows, frames and PNG list of the steps before a resume, as the uninterrupted run had them. */
  private seedFrames(rows: StepRow[]): void {
    this.rows = rows.slice();
    const o = this.c.output;
    if (!this.c.crack || o.frames.length === 0) return;
    for (const r of rows) {
      if (r.step % o.every !== 0) continue;
      const name = join(this.framesDir, `step-${String(r.step).padStart(4, '0')}`);
      const frame: FrameFile = { step: r.step };
      if (o.frames.includes('svg') && existsSync(`${name}.svg`)) frame.svg = `${name}.svg`;
      if (o.frames.includes('png') && existsSync(`${name}.png`)) { frame.png = `${name}.png`; this.framePngs.push(frame.png); }
      if (frame.svg || frame.png) this.frames.push(frame);
    }
  }

  /** Rows at once; the frame is drawn now and rasterised in the background. */
  step(ev: StepEvent): void {
    const r = ev.row;
    this.curve.append(curveCells(r));
    for (const p of ev.probes) this.probes.append([p.step, p.probe, p.x_mm, p.y_mm, p.ux_mm, p.uy_mm, p.sxx_MPa, p.syy_MPa, p.sxy_MPa, p.s1_MPa]);
    if (this.tips) for (const t of ev.tips) this.tips.append([t.step, t.crack, t.tip, t.x_mm, t.y_mm, t.KI_MPa_sqrtm, t.KII_MPa_sqrtm, t.kink_deg]);
    this.rows.push(r);
    if (this.gauges && this.gaugeReader) {
      const s = ev.snapshot();
      for (const g of this.gaugeReader.read(s.mesh, s.u)) this.gauges.append([r.step, g.gauge, g.opening_mm, g.sliding_mm]);
    }
    const o = this.c.output;
    if (r.step % o.every !== 0) return;
    const wantFrame = !!this.c.crack && o.frames.length > 0;
    if (!wantFrame && !this.vtk) return;
    const snap = ev.snapshot();
    if (this.vtk) {
      this.vtk.write(r.step, { mesh: snap.mesh, u: snap.u, cellStress: snap.cellStress, cohesive: snap.cohesive, nuZ: this.c.model === 'plane-strain' ? this.c.material.nu : 0 });
    }
    if (!wantFrame) return;
    const svg = this.frameSvg(snap);
    const name = `step-${String(r.step).padStart(4, '0')}`;
    const frame: FrameFile = { step: r.step };
    this.frames.push(frame);
    if (o.frames.includes('svg')) { frame.svg = join(this.framesDir, `${name}.svg`); writeFileAtomic(frame.svg, svg); }
    if (o.frames.includes('png')) {
      const png = join(this.framesDir, `${name}.png`);
      frame.png = png;
      this.framePngs.push(png);
      this.pending.push(svgToPng(svg, png, o.pngWidth));
      if (this.pending.length > 4) { const p = this.pending; this.pending = [Promise.all(p).then(() => undefined)]; }
    }
  }

  frameSvg(s: Snapshot): string {
    const r = s.row;
    const caption = [
      `Step ${r.step}: load ${fmtLoad(r.load_N)}, load-point displacement ${r.displacement_mm.toFixed(4)} mm` +
        (r.cmod_mm !== null ? `, CMOD ${r.cmod_mm.toFixed(4)} mm` : '') + `, crack length ${r.crack_length_mm.toFixed(1)} mm.`,
    ];
    return fieldSvg({
      mesh: s.mesh, values: s1OverFt(s.cellStress, this.c.material.ft), valueLabel: 'σ₁ / ft', range: [-1, 1], diverging: true,
      displacement: s.u, showMesh: true, cracks: s.cracks, cohesive: s.cohesive, ...specimenSymbols(this.c),
      inset: frameInset(this.rows, r.step), title: this.c.title, caption, widthPx: 1000,
    });
  }

  /** Everything written once the analysis has ended. */
  async finish(result: AnalysisResult, extra: { meshSeconds: number; totalSeconds: number; initialMesh: PolyMesh; final: Snapshot | null }): Promise<Record<string, unknown>> {
    this.curve.close();
    this.probes.close();
    this.tips?.close();
    this.gauges?.close();
    const c = this.c;
    // mesh picture of the initial mesh
    const meshPicture = meshSvg(extra.initialMesh, { ...specimenSymbols(c), title: `${c.title}: mesh` });
    writeFileAtomic(join(this.dir, 'mesh.svg'), meshPicture);
    let finalSvg: string | null = null;
    if (extra.final) {
      const f = extra.final;
      const svg = finalSvg = fieldSvg({
        mesh: f.mesh, values: s1OverFt(f.cellStress, c.material.ft), valueLabel: 'σ₁ / ft', diverging: true,
        displacement: f.u, cracks: f.cracks, cohesive: f.cohesive, ...specimenSymbols(c),
        title: `${c.title}: major principal stress`, caption: [`Step ${f.row.step}, load ${fmtLoad(f.row.load_N)}.`], widthPx: 1000,
      });
      writeFileAtomic(join(this.dir, 'field-s1.svg'), svg);
      this.pending.push(svgToPng(svg, join(this.dir, 'field-s1.png'), c.output.pngWidth));
    }
    if (result.rows.length > 1) {
      const svg = curveSvg(c, result.rows);
      writeFileAtomic(join(this.dir, 'curve.svg'), svg);
      this.pending.push(svgToPng(svg, join(this.dir, 'curve.png'), c.output.pngWidth));
    }
    await Promise.all(this.pending);
    this.pending = [];
    if (c.crack && c.output.animation !== 'none' && this.framePngs.length > 1) {
      await framesToAnimation(this.framePngs, join(this.dir, `animation.${c.output.animation}`), { format: c.output.animation, maxFrames: 60, maxWidth: 720 });
    }
    const summary = summaryOf(c, result, extra.meshSeconds, extra.totalSeconds, extra.final);
    writeFileAtomic(join(this.dir, 'summary.json'), JSON.stringify(summary, null, 2) + '\n');
    await writeReport(join(this.dir, 'report.html'), {
      c, result, initialMesh: extra.initialMesh, frames: this.frames, finalSvg, meshSvg: meshPicture,
      curveSvg: result.rows.length > 1 ? curveSvg(c, result.rows) : null,
      timings: { mesh: extra.meshSeconds, solve: result.timings_s.solve, total: extra.totalSeconds },
      workOfFracture: workOfFractureEstimate(c, result),
      warnings: summary.warnings as string[],
    });
    return summary;
  }
}

/** The opening the frames plot: CMOD when there is a gauge, else the load-point displacement. */
function frameInset(rows: StepRow[], step: number): CurveInset | undefined {
  if (rows.length === 0) return undefined;
  const gauge = rows.some((r) => r.cmod_mm !== null);
  const x = rows.map((r) => (gauge ? r.cmod_mm ?? NaN : r.displacement_mm));
  const y = rows.map((r) => r.load_N);
  let k = rows.length - 1;
  while (k > 0 && rows[k].step > step) k--;
  return { x, y, current: k, xLabel: gauge ? 'CMOD (mm)' : 'Displacement (mm)', yLabel: 'Load (N)' };
}

/** Lab or other curves to overlay: a list goes with the opening the prediction is plotted against (CMOD when there is a gauge). */
export type CurveOverlays = Series[] | { displacement?: Series[]; cmod?: Series[] };

/** Load against load-point displacement, and beside it load against CMOD when there is a gauge; the peak marked in each. */
export function curveSvg(c: CaseModel, rows: StepRow[], more: CurveOverlays = []): string {
  const hasGauge = rows.some((r) => r.cmod_mm !== null);
  const extra = Array.isArray(more) ? (hasGauge ? { cmod: more } : { displacement: more }) : more;
  const y = rows.map((r) => r.load_N);
  const pk = curvePeaks(rows), ip = pk.peakIndex, il = pk.laterIndex;
  const panel = (x: number[], xLabel: string, title: string, over: Series[]): PlotOptions => ({
    series: [{ label: 'rupta prediction', x, y }, ...over], xLabel, yLabel: 'Load (N)', title,
    marks: [{ x: x[ip], y: y[ip], label: `peak ${fmtLoad(y[ip])}` }, ...(il >= 0 ? [{ x: x[il], y: y[il], label: `later ${fmtLoad(y[il])}` }] : [])],
  });
  // a wedge: load_N is the splitting force, and the machine's vertical force rides beside it
  const k = c.wedge ? wedgeRatio(c.wedge.angle) : 0;
  const vertical: Series[] = c.wedge ? [{ label: `vertical machine force (wedge ${c.wedge.angle}°)`, x: rows.map((r) => r.displacement_mm), y: y.map((v) => k * v) }] : [];
  const disp = panel(rows.map((r) => r.displacement_mm), c.wedge ? 'Opening at the load line (mm)' : 'Load-point displacement (mm)', c.wedge ? 'Splitting force' : 'Load point', [...vertical, ...(extra.displacement ?? [])]);
  if (!hasGauge) return plotSvg({ ...disp, title: c.title });
  const cmod = panel(rows.map((r) => r.cmod_mm ?? NaN), 'CMOD (mm)', 'Crack mouth', extra.cmod ?? []);
  return plotPanelsSvg({ panels: [disp, cmod], title: c.title });
}

export function summaryOf(c: CaseModel, r: AnalysisResult, meshSeconds: number, totalSeconds: number, final: Snapshot | null = null): Record<string, unknown> {
  // the peak is the curve's first maximum; a later, higher one is reported beside it
  const pk = curvePeaks(r.rows);
  return {
    format: 1,
    title: c.title,
    status: r.status,
    reason: r.reason,
    peak: r.rows.length > 0 ? pk.peak : r.peak,
    ...(pk.later ? { laterMaximum: pk.later } : {}),
    ...(c.wedge ? { wedge: { angle_deg: c.wedge.angle, verticalPerSplitting: wedgeRatio(c.wedge.angle), peakVertical_N: wedgeRatio(c.wedge.angle) * pk.peak.load_N } } : {}),
    warnings: runWarnings(c, r, final),
    crackPaths: r.crackPaths,
    steps: Math.max(0, r.rows.length - 1),
    dofs: r.dofs,
    mesh: r.mesh,
    probes: r.probes,
    timings_s: { mesh: round(meshSeconds), solve: round(r.timings_s.solve), total: round(totalSeconds) },
    workOfFracture: workOfFractureEstimate(c, r),
  };
}

const round = (x: number) => Math.round(x * 1000) / 1000;
