// The files of one run: curve and probe tables that grow row by row, a frame per step,
// and at the end the summary, the curve plots, the mesh and the field pictures.
import { existsSync, readFileSync, readdirSync, rmSync } from 'node:fs';
import { basename, join } from 'node:path';
import type { CaseModel } from '../case/model.js';
import type { PolyMesh } from '../mesh/polymesh.js';
import type { AnalysisResult, Snapshot, StepEvent, StepRow } from '../fracture/analysis.js';
import { InputError } from '../errors.js';
import { RowWriter, csvCell, ensureDir, writeFileAtomic } from './files.js';
import { fieldSvg, meshSvg } from './field.js';
import { plotPanelsSvg, plotSvg, type PlotOptions, type Series } from './plot.js';
import { svgToPng, framesToAnimation } from './png.js';
import { VtkSeries } from './vtk.js';
import { writeReport } from './report.js';
import { CASE_FILE, FrameStore, drawFrames, readRunInfo, specimenSymbols, type FrameFile, type RunCaseFile } from './frames.js';
import { VERSION, sha256 } from '../version.js';
import { cracksCsv, cracksDxf } from './exports.js';
import { s1OverFt } from './stepdata.js';
import { GAUGE_HEADER, GaugeReader } from './gauges.js';
import { curvePeaks, fmtLoad, runWarnings, wedgeRatio, workOfFractureEstimate } from './warnings.js';

export { specimenSymbols, s1OverFt };

export const CURVE_HEADER = 'step,control,load_N,displacement_mm,cmod_mm,crack_length_mm,tip_x_mm,tip_y_mm,external_work_Nmm,elastic_energy_Nmm,dissipated_Nmm,iterations';
export const PROBE_HEADER = 'step,probe,x_mm,y_mm,ux_mm,uy_mm,sxx_MPa,syy_MPa,sxy_MPa,s1_MPa';
export const TIPS_HEADER = 'step,crack,tip,x_mm,y_mm,KI_MPa_sqrtm,KII_MPa_sqrtm,kink_deg';

/** A run has crack tips to report when it has a sharp slit or grows cracks. */
export const hasTips = (c: CaseModel): boolean => !!c.crack || c.geometry.notches.some((n) => n.width === 0);

export interface RunFilesOptions {
  force?: boolean;
  /** The case file the run was started from (its hash goes into case.json and the report). */
  caseFile?: string;
  /** Go on with the run in the folder: the rows of its checkpoint (the tables are cut back to its last step). */
  resume?: StepRow[];
}

/** Files of one step in frames/ and vtk/ (the only ones --force and a resume delete). */
const STEP_FILE = /^step-(\d{4,})\.(svg|png|bin|vtu)$/;

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

export class RunFiles {
  private curve: RowWriter;
  private probes: RowWriter;
  private tips: RowWriter | null = null;
  /** gauges.csv, when the case names extra gauges. */
  private gauges: RowWriter | null = null;
  private gaugeReader: GaugeReader | null = null;
  private store: FrameStore | null = null;
  private pending: Promise<void>[] = [];
  private vtk: VtkSeries | null = null;
  readonly framesDir: string;

  constructor(readonly dir: string, readonly c: CaseModel, opt: RunFilesOptions = {}) {
    const resume = opt.resume ?? null;
    // the mesh preview of `rupta mesh` is no run: running into its folder is what the user expects
    if (existsSync(dir) && readdirSync(dir).some((f) => f !== 'mesh.svg') && !opt.force && !resume) {
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
    // the case as run: redrawing frames and report needs nothing but the folder
    const caseHash: RunCaseFile['caseHash'] = opt.caseFile && existsSync(opt.caseFile)
      ? { sha256: sha256(readFileSync(opt.caseFile)), of: 'case file', file: basename(opt.caseFile) }
      : { sha256: sha256(JSON.stringify(c)), of: 'validated case' };
    const info: RunCaseFile = { format: 1, rupta: VERSION, caseHash, case: c };
    writeFileAtomic(join(dir, CASE_FILE), JSON.stringify(info, null, 1) + '\n');
    if (c.crack && c.output.frames.length > 0) this.store = new FrameStore(this.framesDir, c.material.ft, c.output.every, c.output.maxFrames);
    if (resume) {
      // the tables as they stood at the checkpoint; the rows after it are computed again
      writeFileAtomic(join(dir, 'curve.csv'), CURVE_HEADER + '\n' + resume.map((r) => curveCells(r).map(csvCell).join(',') + '\n').join(''));
      writeFileAtomic(join(dir, 'probes.csv'), tableUpTo(join(dir, 'probes.csv'), PROBE_HEADER, last));
      if (hasTips(c)) writeFileAtomic(join(dir, 'tips.csv'), tableUpTo(join(dir, 'tips.csv'), TIPS_HEADER, last));
      if (c.gauges?.length) writeFileAtomic(join(dir, 'gauges.csv'), tableUpTo(join(dir, 'gauges.csv'), GAUGE_HEADER, last));
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

  /** Rows at once; the state of the step is kept for the frames, which are drawn once the run has ended. */
  step(ev: StepEvent): void {
    const r = ev.row;
    this.curve.append(curveCells(r));
    for (const p of ev.probes) this.probes.append([p.step, p.probe, p.x_mm, p.y_mm, p.ux_mm, p.uy_mm, p.sxx_MPa, p.syy_MPa, p.sxy_MPa, p.s1_MPa]);
    if (this.tips) for (const t of ev.tips) this.tips.append([t.step, t.crack, t.tip, t.x_mm, t.y_mm, t.KI_MPa_sqrtm, t.KII_MPa_sqrtm, t.kink_deg]);
    if (this.gauges && this.gaugeReader) {
      const s = ev.snapshot();
      for (const g of this.gaugeReader.read(s.mesh, s.u)) this.gauges.append([r.step, g.gauge, g.opening_mm, g.sliding_mm]);
    }
    const vtkNow = this.vtk && r.step % this.c.output.every === 0;
    if (!vtkNow && !this.store) return;
    const snap = ev.snapshot();
    if (this.vtk && vtkNow) {
      this.vtk.write(r.step, { mesh: snap.mesh, u: snap.u, cellStress: snap.cellStress, cohesive: snap.cohesive, nuZ: this.c.model === 'plane-strain' ? this.c.material.nu : 0 });
    }
    this.store?.add(snap);
  }

  /** Everything written once the analysis has ended. */
  async finish(result: AnalysisResult, extra: { meshSeconds: number; totalSeconds: number; initialMesh: PolyMesh; final: Snapshot | null }): Promise<Record<string, unknown>> {
    this.curve.close();
    this.probes.close();
    this.tips?.close();
    this.gauges?.close();
    const c = this.c;
    // frames on worker threads while this thread draws the other pictures
    const framesDrawn = drawFrames(this.dir, { prune: result.status === 'complete' });
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
    // the numbers first, the pictures after them
    const summary = summaryOf(c, result, extra.meshSeconds, extra.totalSeconds, extra.final);
    writeFileAtomic(join(this.dir, 'summary.json'), JSON.stringify(summary, null, 2) + '\n');
    if (c.crack) {
      writeFileAtomic(join(this.dir, 'cracks.csv'), cracksCsv(result.crackPaths));
      writeFileAtomic(join(this.dir, 'cracks.dxf'), cracksDxf(c, result.crackPaths));
    }
    await Promise.all(this.pending);
    this.pending = [];
    const frames = await framesDrawn;
    // the animation (libvips threads) and the page at once
    await Promise.all([
      writeAnimation(this.dir, c, frames),
      writeReport(join(this.dir, 'report.html'), {
        c, result, initialMesh: extra.initialMesh, frames, finalSvg, meshSvg: meshPicture, run: readRunInfo(this.dir),
        curveSvg: result.rows.length > 1 ? curveSvg(c, result.rows) : null,
        timings: { mesh: extra.meshSeconds, solve: result.timings_s.solve, total: extra.totalSeconds },
        workOfFracture: workOfFractureEstimate(c, result),
        warnings: summary.warnings as string[],
      }),
    ]);
    return summary;
  }
}

/** The animation of a run's frames (PNG frames only), or none as the case asks. */
export async function writeAnimation(dir: string, c: CaseModel, frames: FrameFile[]): Promise<void> {
  const pngs = frames.flatMap((f) => (f.png ? [f.png] : []));
  if (c.crack && c.output.animation !== 'none' && pngs.length > 1) {
    await framesToAnimation(pngs, join(dir, `animation.${c.output.animation}`), { format: c.output.animation, maxFrames: c.output.maxFrames, maxWidth: 720 });
  }
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
