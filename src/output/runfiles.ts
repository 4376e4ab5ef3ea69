// The files of one run: curve and probe tables that grow row by row, a frame per step,
// and at the end the summary, the curve plots, the mesh and the field pictures.
import { readFileSync } from 'node:fs';
import { basename, join } from 'node:path';
import type { CaseModel } from '../case/model.js';
import type { PolyMesh } from '../mesh/polymesh.js';
import type { AnalysisResult, Snapshot, StepEvent, StepRow } from '../fracture/analysis.js';
import { InputError } from '../errors.js';
import { RowWriter, csvCell, lstatOrNull, writeFileAtomic } from './files.js';
import { OutputFolder } from './folder.js';
import { fieldSvg, meshSvg } from './field.js';
import { plotPanelsSvg, plotSvg, type PlotOptions, type Series } from './plot.js';
import { animationDelays, svgToPng, framesToAnimation } from './png.js';
import { gifOf } from './gif.js';
import { VtkSeries } from './vtk.js';
import { writeReport } from './report.js';
import { ANIMATION_WIDTH, CASE_FILE, FrameStore, drawFrames, readRunInfo, specimenSymbols, type FrameFile, type RunCaseFile } from './frames.js';
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
function removeStepFiles(folder: OutputFolder, sub: string, after: number): void {
  for (const f of folder.list(sub)) {
    const m = STEP_FILE.exec(f);
    if (m && Number(m[1]) > after) folder.remove(join(sub, f));
  }
}

/** Complete lines of a table whose first cell (the step) is at most `last`, header first. */
function tableUpTo(path: string, header: string, last: number): { text: string; rows: number } {
  let text = header + '\n', rows = 0;
  if (lstatOrNull(path)?.isFile() !== true) return { text, rows };
  const lines = readFileSync(path, 'utf8').split('\n');
  lines.pop(); // the part after the last newline is not a whole row
  for (let i = 1; i < lines.length; i++) if (Number(lines[i].slice(0, lines[i].indexOf(','))) <= last) { text += lines[i] + '\n'; rows++; }
  return { text, rows };
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
  /** The first failure of a picture drawn in the background, handed on by flush(). */
  private failure: unknown = null;
  private readonly folder: OutputFolder;
  private vtk: VtkSeries | null = null;
  readonly framesDir: string;

  constructor(readonly dir: string, readonly c: CaseModel, opt: RunFilesOptions = {}) {
    const resume = opt.resume ?? null;
    const folder = this.folder = OutputFolder.open(dir);
    // the mesh preview of `rupta mesh` is no run: running into its folder is what the user expects
    if (!opt.force && !resume && folder.holdsFiles(['mesh.svg'])) {
      throw new InputError(`the output folder ${dir} already holds a run; pass --force to overwrite it, --resume to go on with it, or --out to choose another folder`);
    }
    const last = resume ? resume[resume.length - 1]?.step ?? -1 : -1;
    // what a writer killed mid-write left behind
    for (const sub of ['', 'frames', 'vtk']) folder.removeTemps(sub);
    // every name written below is checked first: a link, pipe or device in the folder is refused, never followed
    for (const f of ['curve.csv', 'probes.csv', 'tips.csv', 'gauges.csv', 'summary.json', 'report.html', 'mesh.svg', 'curve.svg', 'curve.png',
      'field-s1.svg', 'field-s1.png', 'animation.gif', 'animation.webp', 'checkpoint.json', 'cracks.csv', 'cracks.dxf', CASE_FILE]) folder.file(f);
    this.framesDir = c.crack && c.output.frames.length > 0 ? folder.subdir('frames') : join(dir, 'frames');
    // an overwritten run loses its step files and checkpoint; a resumed one those after its checkpoint
    if (opt.force || resume) {
      removeStepFiles(folder, 'frames', last);
      removeStepFiles(folder, 'vtk', last);
    }
    if (opt.force && !resume) {
      folder.remove('checkpoint.json');
      folder.remove(join('vtk', 'steps.pvd'));
    }
    // the case as run: redrawing frames and report needs nothing but the folder
    const caseHash: RunCaseFile['caseHash'] = opt.caseFile && lstatOrNull(opt.caseFile) !== null
      ? { sha256: sha256(readFileSync(opt.caseFile)), of: 'case file', file: basename(opt.caseFile) }
      : { sha256: sha256(JSON.stringify(c)), of: 'validated case' };
    const info: RunCaseFile = { format: 1, rupta: VERSION, caseHash, case: c };
    folder.write(CASE_FILE, JSON.stringify(info, null, 1) + '\n');
    if (c.crack && c.output.frames.length > 0) this.store = new FrameStore(this.framesDir, c.material.ft, c.output.every, c.output.maxFrames);
    if (resume) {
      // the tables as they stood at the checkpoint; the rows after it are computed again
      const probes = tableUpTo(folder.file('probes.csv'), PROBE_HEADER, last);
      const want = (last + 1) * c.probes.length;
      if (probes.rows !== want) {
        throw new InputError(`probes.csv in ${dir} holds ${probes.rows} rows up to the checkpoint's step ${last} where ${want} were written, so a resumed run could not reproduce it; run the case again with --force`);
      }
      folder.write('curve.csv', CURVE_HEADER + '\n' + resume.map((r) => curveCells(r).map(csvCell).join(',') + '\n').join(''));
      folder.write('probes.csv', probes.text);
      if (hasTips(c)) folder.write('tips.csv', tableUpTo(folder.file('tips.csv'), TIPS_HEADER, last).text);
      if (c.gauges?.length) folder.write('gauges.csv', tableUpTo(folder.file('gauges.csv'), GAUGE_HEADER, last).text);
    }
    this.curve = new RowWriter(folder.file('curve.csv'), CURVE_HEADER, { keepExisting: !!resume });
    this.probes = new RowWriter(folder.file('probes.csv'), PROBE_HEADER, { keepExisting: !!resume });
    if (hasTips(c)) this.tips = new RowWriter(folder.file('tips.csv'), TIPS_HEADER, { keepExisting: !!resume });
    else folder.remove('tips.csv');
    if (c.gauges?.length) {
      this.gauges = new RowWriter(folder.file('gauges.csv'), GAUGE_HEADER, { keepExisting: !!resume });
      this.gaugeReader = new GaugeReader(c.gauges);
    }
    if (c.output.vtk) {
      this.vtk = new VtkSeries(folder.subdir('vtk'));
      if (resume) {
        // the collection file lists the steps already written
        const kept = resume.filter((r) => lstatOrNull(join(dir, 'vtk', `step-${String(r.step).padStart(4, '0')}.vtu`))?.isFile())
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

  /** A picture drawn in the background: its failure is kept (never an unhandled rejection) and raised by flush(). */
  private background(p: Promise<void>): void {
    this.pending.push(p.catch((e: unknown) => { this.failure ??= e; }));
  }

  /** Wait for the pictures drawn in the background. */
  async flush(): Promise<void> {
    await Promise.all(this.pending);
    this.pending = [];
    if (this.failure) throw this.failure;
  }

  /** Close the tables without the final writes (a run refused or broken off before its end). */
  close(): void {
    this.curve.close();
    this.probes.close();
    this.tips?.close();
    this.gauges?.close();
  }

  /**
   * Everything written once the analysis has ended (the caller removes the checkpoint only
   * after this has returned, so a folder cut off here can still be finished).
   */
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
    this.folder.write('mesh.svg', meshPicture);
    let finalSvg: string | null = null;
    if (extra.final) {
      const f = extra.final;
      const svg = finalSvg = fieldSvg({
        mesh: f.mesh, values: s1OverFt(f.cellStress, c.material.ft), valueLabel: 'σ₁ / ft', diverging: true,
        displacement: f.u, cracks: f.cracks, cohesive: f.cohesive, ...specimenSymbols(c),
        title: `${c.title}: major principal stress`, caption: [`Step ${f.row.step}, load ${fmtLoad(f.row.load_N)}.`], widthPx: 1000,
      });
      this.folder.write('field-s1.svg', svg);
      this.background(svgToPng(svg, this.folder.file('field-s1.png'), c.output.pngWidth));
    }
    if (result.rows.length > 1) {
      const svg = curveSvg(c, result.rows);
      this.folder.write('curve.svg', svg);
      this.background(svgToPng(svg, this.folder.file('curve.png'), c.output.pngWidth));
    }
    // the numbers first, the pictures after them
    const summary = summaryOf(c, result, extra.meshSeconds, extra.totalSeconds, extra.final);
    this.folder.write('summary.json', JSON.stringify(summary, null, 2) + '\n');
    if (c.crack) {
      this.folder.write('cracks.csv', cracksCsv(result.crackPaths));
      this.folder.write('cracks.dxf', cracksDxf(c, result.crackPaths));
    }
    await this.flush();
    const frames = await framesDrawn;
    // the animation (libvips threads) and the page at once
    await Promise.all([
      writeAnimation(this.dir, c, frames),
      writeReport(this.folder.file('report.html'), {
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
    const path = join(dir, `animation.${c.output.animation}`);
    // the GIF's pages drawn with the frames: no PNG to decode and resize again
    const pages = frames.flatMap((f) => (f.png && f.page ? [f.page] : []));
    const one = pages[0];
    if (c.output.animation === 'gif' && one && pages.length === pngs.length && pages.length <= c.output.maxFrames &&
      pages.every((p) => p.width === one.width && p.height === one.height && p.palette.length === one.palette.length)) {
      writeFileAtomic(path, gifOf(pages.map((p) => p.ix), one.width, one.height, one.palette, animationDelays(pages.length)));
    } else await framesToAnimation(pngs, path, { format: c.output.animation, maxFrames: c.output.maxFrames, maxWidth: ANIMATION_WIDTH });
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
