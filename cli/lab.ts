// The lab commands: compare a run with measured curves, fit material parameters to one.
import type { Command } from 'commander';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { loadCase, caseWarnings } from '../src/case/index.js';
import type { Softening } from '../src/case/model.js';
import { InputError } from '../src/errors.js';
import { readLabCurve, type LabColumns, type LabCurve } from '../src/lab/import.js';
import { compareCurves, compareJson, compareSvg, compareTable, readRunCurve, type Curve, type XAxis } from '../src/lab/compare.js';
import type { Corrections } from '../src/lab/correct.js';
import { FIT_HISTORY_HEADER, FIT_PARAMS, fitCase, fitHistoryRow, fitJson, fitSvg, fitTable, fittedCaseText, type FitParam, type FitSetup } from '../src/lab/fit.js';
import { FIT_CHECKPOINT_FILE, decodeFitCheckpoint, fitCheckpointHeader, fitCheckpointLine, setupDifference, type FitCheckpoint } from '../src/lab/fitcheckpoint.js';
import { LineWriter, lstatOrNull, RowWriter } from '../src/output/files.js';
import { OutputFolder, defaultOutDir, safeFolderName } from '../src/output/folder.js';
import { shellQuote } from '../src/output/shell.js';
import { readTextFile } from '../src/io/read.js';
import { svgToPng } from '../src/output/png.js';
import { refreshRunReport } from '../src/output/redraw.js';

const COMPARE_FILES = ['compare.json', 'compare.svg', 'compare.png'];
/** Biggest fit checkpoint read back (a few hundred simulations of thousands of steps). */
const MAX_FIT_CHECKPOINT_BYTES = 256 * 1024 * 1024;

function xAxisOf(v: string | undefined): XAxis | undefined {
  if (v === undefined) return undefined;
  if (v === 'cmod' || v === 'displacement') return v;
  throw new InputError(`--x must be cmod or displacement (found "${v}")`);
}

function positive(name: string, v: string | undefined): number | undefined {
  if (v === undefined) return undefined;
  const x = Number(v);
  if (!(x > 0) || !Number.isFinite(x)) throw new InputError(`${name} must be a positive number (found "${v}")`);
  return x;
}

/** A column option: a 1-based number or a header name. */
function columnOf(v: string | undefined): string | number | undefined {
  if (v === undefined) return undefined;
  return /^\d+$/.test(v.trim()) ? Number(v.trim()) : v;
}

interface LabReadOptions { xColumn?: string; loadColumn?: string; xUnit?: string; loadUnit?: string; x?: string }
interface CorrectionOptions { compliance?: string; toe?: boolean; preload?: string }

function labColumns(o: LabReadOptions): LabColumns {
  return { x: columnOf(o.xColumn), y: columnOf(o.loadColumn), xUnit: o.xUnit, yUnit: o.loadUnit };
}

/** The corrections asked for, and whether the compliance is to be estimated. */
function correctionsOf(o: CorrectionOptions): { corrections: Corrections; estimate: boolean } {
  const corrections: Corrections = { toe: o.toe === true };
  let estimate = false;
  if (o.compliance !== undefined) {
    if (o.compliance.trim() === 'estimate') estimate = true;
    else {
      const v = Number(o.compliance);
      if (!(v >= 0) || !Number.isFinite(v) || o.compliance.trim() === '') throw new InputError(`--compliance must be the machine compliance in mm/kN (0 or more) or "estimate" (found "${o.compliance}")`);
      if (v > 10) throw new InputError(`--compliance ${v} mm/kN is beyond any testing machine (a soft one is about 0.01–0.1 mm/kN): give it in mm/kN`);
      corrections.compliance_mm_per_N = v / 1000;
    }
  }
  if (o.preload !== undefined) {
    const v = Number(o.preload);
    if (!(v >= 0) || !Number.isFinite(v) || o.preload.trim() === '') throw new InputError(`--preload must be the seating load in N, 0 or more (found "${o.preload}")`);
    corrections.preload_N = v;
  }
  return { corrections, estimate };
}

/** The CMOD reading of the same test, for --compliance estimate; null when the file has none. */
function cmodReading(path: string, o: LabReadOptions): Curve | null {
  try {
    const c = readLabCurve(path, { y: columnOf(o.loadColumn), yUnit: o.loadUnit });
    return c.xKind === 'cmod' ? { x: c.x, y: c.y } : null;
  } catch (e) {
    if (e instanceof InputError) return null;
    throw e;
  }
}

/** The column and unit options shared by compare and fit. */
function labReadOptions(cmd: Command): Command {
  return cmd
    .option('--x-column <name|n>', 'column of the opening: a header name (e.g. "Weg", "COD") or a number from 1 (default: found by name)')
    .option('--load-column <name|n>', 'column of the load: a header name (e.g. "Kraft") or a number from 1 (default: found by name)')
    .option('--x-unit <unit>', 'unit of the opening column when the header gives none: mm, µm, cm, m or in')
    .option('--load-unit <unit>', 'unit of the load column when the header gives none: N, kN, daN, lbf or kip')
    .option('--compliance <mm/kN|estimate>', 'testing machine compliance taken out of a crosshead displacement, in mm/kN, or "estimate" from the file\'s CMOD column')
    .option('--toe', 'toe correction: zero the opening where the straight part of the rising branch meets zero load')
    .option('--preload <N>', 'seating load (N) on which the readings were zeroed: added back to loads and openings');
}

export const LAB_FORMAT_HELP = `
Measured curves: delimited text as testing machines export it (comma, semicolon, tab or blanks;
decimal commas; header and comment lines; a units line under the names). Columns are found by
name in English, German, French and Spanish: load (load, force, Kraft, Last, charge, effort,
fuerza, carga) and opening, CMOD first (CMOD, COD, opening, Rissöffnung, ouverture, apertura,
clip) then displacement (displacement, deflection, crosshead, stroke, position, Weg, Traverse,
Durchbiegung, déplacement, flèche, desplazamiento, flecha). Units in the header ("Kraft [kN]",
"CMOD (µm)", "Load/lbf") or by --x-unit/--load-unit: N, kN, daN, lbf, kip; mm, µm, cm, m, in.
A header line "Specimen; B-3" (Probe, Prüfkörper, Éprouvette, Probeta) names the specimen.
The opening's meaning (CMOD or displacement) chooses the predicted curve it is compared with.
Example:
  Specimen;B-3
  Zeit [s];Kraft [kN];Weg [mm];COD [mm]
  0,0;0,000;0,000;0,0000
  0,5;0,412;0,011;0,0021
`;

/** A whole-number option at least min; fractions and words are refused. */
function wholeOf(name: string, v: string | undefined, min: number): number | undefined {
  if (v === undefined) return undefined;
  const x = Number(v);
  if (v.trim() === '' || !Number.isInteger(x) || x < min) throw new InputError(`${name} must be a whole number, ${min} or more (found "${v}")`);
  return x;
}

function paramsOf(v: string | undefined): FitParam[] | undefined {
  if (v === undefined) return undefined;
  const out = v.split(',').map((s) => s.trim()).filter((s) => s !== '');
  for (const p of out) if (!(FIT_PARAMS as readonly string[]).includes(p)) throw new InputError(`--params: "${p}" is not a parameter that can be fitted; choose from E, ft, GF (comma separated)`);
  return out as FitParam[];
}

function softeningOf(v: string | undefined): Softening | undefined {
  if (v === undefined) return undefined;
  if (v === 'linear' || v === 'bilinear' || v === 'exponential') return v;
  throw new InputError(`--softening must be linear, bilinear or exponential (found "${v}")`);
}

export function registerLabCommands(program: Command): void {
  labReadOptions(program
    .command('compare')
    .description('overlay measured load–opening curves on a run and tabulate peak, opening at peak, RMSE, area and GF, with series statistics')
    .argument('<run-dir>', 'output folder of a rupta run (with curve.csv and summary.json)')
    .argument('<lab...>', 'measured curves (text files of load and opening columns, see below)')
    .option('--x <axis>', 'compare the measured opening as cmod or displacement (default from its column name)')
    .option('--ligament-area <mm2>', 'ligament area for GF in mm² (default from summary.json)')
    .option('--out <dir>', 'folder for compare.json, compare.svg and compare.png (default the run folder)')
    .option('--force', 'overwrite an earlier comparison in that folder')
    .option('--json', 'print the comparison as JSON'))
    .addHelpText('after', LAB_FORMAT_HELP)
    .action(async (dir: string, labs: string[], o: LabReadOptions & CorrectionOptions & { ligamentArea?: string; out?: string; force?: boolean; json?: boolean }) => {
      const run = readRunCurve(dir);
      const cols = labColumns(o);
      const curves: LabCurve[] = labs.map((p) => readLabCurve(p, cols));
      const { corrections, estimate } = correctionsOf(o);
      if (o.out !== undefined && o.out.trim() === '') throw new InputError('--out needs the name of a folder (found an empty one)');
      const out = o.out ?? dir;
      const earlierCompare = () => COMPARE_FILES.find((f) => lstatOrNull(join(out, f)) !== null);
      if (!o.force && earlierCompare()) throw new InputError(`${join(out, earlierCompare()!)} already holds a comparison: give --force to replace it, or --out for another folder`);
      const r = compareCurves(run, curves, {
        xAxis: xAxisOf(o.x), ligamentArea_mm2: positive('--ligament-area', o.ligamentArea), corrections,
        estimateFrom: estimate ? labs.map((p) => cmodReading(p, o)) : undefined,
      });
      // written like a run's files: inside the folder only, no links followed, under its lock
      const folder = OutputFolder.open(out);
      folder.lock();
      let reported = false;
      const json = compareJson(r);
      try {
        if (!o.force && earlierCompare()) throw new InputError(`${join(out, earlierCompare()!)} already holds a comparison: give --force to replace it, or --out for another folder`);
        for (const f of COMPARE_FILES) folder.file(f);
        folder.write('compare.json', JSON.stringify(json, null, 2) + '\n');
        const svg = compareSvg(r);
        folder.write('compare.svg', svg);
        await svgToPng(svg, folder.file('compare.png'), 1200);
        // a run folder's report gathers the comparison at once
        reported = await refreshRunReport(out);
      } finally {
        folder.release();
      }
      if (o.json) process.stdout.write(JSON.stringify(json, null, 2) + '\n');
      else {
        process.stdout.write(compareTable(r));
        for (const c of curves) for (const n of c.notes) process.stdout.write(`read ${c.name}: ${n}\n`);
        process.stdout.write(`wrote ${join(out, 'compare.svg')}, compare.png and compare.json${reported ? ', and report.html again' : ''}\n`);
      }
    });

  labReadOptions(program
    .command('fit')
    .description('calibrate E, ft and GF of a case so that its curve matches one measured curve or a series')
    .argument('<case>', 'case file (YAML or JSON)')
    .requiredOption('--lab <file>', 'measured curve (text file of load and opening columns); repeat for a series', (v: string, prev: string[]) => [...prev, v], [] as string[])
    .option('--series <how>', 'several --lab curves: all (fit them together, default) or mean (fit their mean curve)')
    .option('--params <list>', 'parameters to fit, comma separated (default E,ft,GF)')
    .option('--softening <law>', 'softening law for the fit: linear, bilinear or exponential (default the case\'s)')
    .option('--x <axis>', 'opening of the measured curve: cmod or displacement (default from its column name)')
    .option('--mesh-size <mm>', 'cell size of the fitting mesh (default the case\'s own mesh)')
    .option('--increments <n>', 'control increments of each candidate run (default the case\'s, at least 6 steps up to the measured peak)')
    .option('--max-evals <n>', 'simulations allowed in all, every one counted (default 80)')
    .option('--seeds <n>', 'extra mesh seeds run at the optimum for the model\'s scatter in the ±95 % ranges (default 2)')
    .option('--sim-timeout <s>', 'time limit of one simulation in seconds (default 8 × the median so far, at least 30)')
    .option('--workers <n>', 'worker threads, 0 for none (default 2)')
    .option('--out <dir>', 'output folder (default out/<case name>-fit)')
    .option('--force', 'replace the files of an earlier fit in that folder')
    .option('--resume', 'go on with an interrupted fit in that folder: the simulations it finished are taken from its fit-checkpoint.jsonl, not run again')
    .option('--quiet', 'no progress on stderr')
    .option('--json', 'print the result as JSON'))
    .addHelpText('after', LAB_FORMAT_HELP)
    .action(async (file: string, o: LabReadOptions & CorrectionOptions & { lab: string[]; series?: string; params?: string; softening?: string; meshSize?: string; increments?: string; maxEvals?: string; seeds?: string; simTimeout?: string; workers?: string; out?: string; force?: boolean; quiet?: boolean; json?: boolean; resume?: boolean }) => {
      const c = loadCase(file);
      for (const w of caseWarnings(c)) process.stderr.write(`rupta: warning: ${w}\n`);
      const labs = o.lab.map((p) => readLabCurve(p, labColumns(o)));
      if (o.series !== undefined && o.series !== 'all' && o.series !== 'mean') throw new InputError(`--series must be all or mean (found "${o.series}")`);
      const { corrections, estimate } = correctionsOf(o);
      const workers = wholeOf('--workers', o.workers, 0);
      const inc = wholeOf('--increments', o.increments, 2), maxEvals = wholeOf('--max-evals', o.maxEvals, 1), seeds = wholeOf('--seeds', o.seeds, 0);
      if (o.out !== undefined && o.out.trim() === '') throw new InputError('--out needs the name of a folder (found an empty one)');
      if (o.resume && o.force) throw new InputError('--resume goes on with the fit in the output folder and --force starts it afresh: give one of them, not both');
      const dir = o.out ?? defaultOutDir(c.name, '-fit');
      const stem = safeFolderName(c.name);
      const caseName = `${stem}-fitted.yaml`, bestName = `${stem}-best-so-far.yaml`;
      // an earlier fit's results must not sit beside a new fit's history
      const results = [caseName, bestName, 'fit.json', 'fit-report.txt', 'fit.svg', 'fit.png'];
      const checkpointPath = join(dir, FIT_CHECKPOINT_FILE);
      let earlierStart: FitCheckpoint | null = null;
      if (o.resume) {
        if (lstatOrNull(checkpointPath) === null) throw new InputError(`${dir} holds no interrupted fit to go on with (no ${FIT_CHECKPOINT_FILE}; a fit that ran to its end removes it): start the fit without --resume`);
        earlierStart = decodeFitCheckpoint(readTextFile(checkpointPath, 'the fit checkpoint', MAX_FIT_CHECKPOINT_BYTES), checkpointPath);
      } else if (!o.force) {
        const earlier = [caseName, bestName, 'fit.json', 'fit-history.csv', FIT_CHECKPOINT_FILE].find((f) => lstatOrNull(join(dir, f)) !== null);
        const resumable = lstatOrNull(checkpointPath) !== null;
        if (earlier) throw new InputError(`${dir} already holds a fit (${earlier}): give --force to replace it${resumable ? ', --resume to go on with it' : ''}, or --out for another folder`);
      }
      // the folder is taken once the inputs are checked, just before the first simulation, so a refused input leaves it as it was
      let folder: OutputFolder | null = null;
      let history = null as RowWriter | null, journal = null as LineWriter | null;
      const onStart = (setup: FitSetup): void => {
        folder = OutputFolder.open(dir);
        folder.lock();
        for (const f of [...results, 'fit-history.csv', FIT_CHECKPOINT_FILE]) folder.file(f);
        if (earlierStart) {
          const d = setupDifference(earlierStart.setup, setup);
          if (d) throw new InputError(`--resume: the fit in ${dir} was started otherwise (${d}); give the same case, measured curves and options, or --force to start afresh`);
        }
        // the whole lines kept (one cut off by a kill is dropped), then each simulation as it ends
        folder.write(FIT_CHECKPOINT_FILE, earlierStart ? earlierStart.text : fitCheckpointHeader(setup) + '\n');
        journal = new LineWriter(folder.file(FIT_CHECKPOINT_FILE), { append: true });
        for (const f of results) folder.remove(f);
        // written again from the start: the simulations taken from the checkpoint give the same rows
        history = new RowWriter(folder.file('fit-history.csv'), FIT_HISTORY_HEADER);
      };
      // the first signal ends the fit after the simulations in hand, keeping the best so far; a second one quits at once
      let stop = false;
      const onSignal = () => { if (stop) process.exit(3); stop = true; };
      process.on('SIGINT', onSignal);
      process.on('SIGTERM', onSignal);
      const tty = Boolean(process.stderr.isTTY);
      let lastLine = 0, secs = 0;
      let r;
      try {
        r = await fitCase(c, labs, {
          params: paramsOf(o.params), softening: softeningOf(o.softening), xAxis: xAxisOf(o.x), series: o.series as 'all' | 'mean' | undefined, corrections,
          complianceFrom: estimate ? o.lab.map((p) => cmodReading(p, o)) : undefined,
          meshSize: positive('--mesh-size', o.meshSize), increments: inc, maxEvals, workers, seeds, simTimeout_s: positive('--sim-timeout', o.simTimeout),
          stopRequested: () => stop,
          onStart,
          replay: earlierStart?.sims,
          onSimulation: (sim) => journal!.line(fitCheckpointLine(sim)),
          onEval: (e) => {
            history!.append(fitHistoryRow(e));
            if (o.quiet) return;
            secs += e.seconds;
            const per = secs / e.index / Math.max(1, workers ?? 2);
            const b = e.bestMaterial;
            const line = `${e.count}/${e.limit} simulations (${e.phase})  best RMSE ${Number.isFinite(e.best) ? (100 * e.best).toFixed(2) + ' % of peak' : '—'}`
              + (Number.isFinite(e.best) ? `  E ${b.E.toPrecision(4)} ft ${b.ft.toPrecision(3)} GF ${b.GF.toPrecision(3)}` : '')
              + `  ≤ ${Math.ceil((e.limit - e.count) * per)} s left at the limit`;
            const now = performance.now();
            if (tty) process.stderr.write(`\r\x1b[2K${line}`);
            else if (now - lastLine > 5000) { process.stderr.write(line + '\n'); lastLine = now; }
          },
        });
      } catch (e) {
        (folder as OutputFolder | null)?.release();
        throw e;
      } finally {
        history?.close();
        (journal as LineWriter | null)?.close();
        process.off('SIGINT', onSignal);
        process.off('SIGTERM', onSignal);
        if (!o.quiet && tty) process.stderr.write('\n');
      }
      const f = folder as OutputFolder | null;
      if (!f) throw new Error('the fit ended without taking its output folder');
      const json = fitJson(r);
      const table = fitTable(r);
      let wroteCase: string | null = null;
      try {
        f.write('fit.json', JSON.stringify(json, null, 2) + '\n');
        f.write('fit-report.txt', table);
        if (r.curves.fitted.x.length > 0) {
          const svg = fitSvg(r);
          f.write('fit.svg', svg);
          await svgToPng(svg, f.file('fit.png'), 1200);
        }
        if (r.status === 'fitted') wroteCase = caseName;
        else if (r.status !== 'failed' && Number.isFinite(r.objective)) wroteCase = bestName;
        if (wroteCase) f.write(wroteCase, fittedCaseText(readFileSync(file, 'utf8'), r));
        // with --out at a run folder, its report gathers the fit
        await refreshRunReport(dir);
        // the final writes are done: only a fit that ran to its end loses its checkpoint
        if (r.status !== 'interrupted') f.remove(FIT_CHECKPOINT_FILE);
      } finally {
        f.release();
      }
      if (o.json) process.stdout.write(JSON.stringify(json, null, 2) + '\n');
      else {
        process.stdout.write(table);
        process.stdout.write(`wrote ${wroteCase ? `${join(dir, wroteCase)} and ` : ''}the report (fit.json, fit-report.txt, fit-history.csv${r.curves.fitted.x.length ? ', fit.svg, fit.png' : ''}) in ${dir}\n`);
      }
      if (r.status !== 'fitted') {
        process.stderr.write(`rupta: the fit ${r.status === 'failed' ? 'failed' : r.status === 'limit' ? 'stopped at --max-evals' : 'was interrupted'}: ${r.reason}${r.status === 'interrupted' ? `; go on with the same command and --resume (its simulations are kept in ${shellQuote(join(dir, FIT_CHECKPOINT_FILE))})` : ''}\n`);
        process.exitCode = 3;
      }
    });
}
