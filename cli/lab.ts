// The lab commands: compare a run with measured curves, fit material parameters to one.
import type { Command } from 'commander';
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { loadCase } from '../src/case/index.js';
import type { Softening } from '../src/case/model.js';
import { InputError } from '../src/errors.js';
import { readLabCurve, type LabColumns, type LabCurve } from '../src/lab/import.js';
import { compareCurves, compareJson, compareSvg, compareTable, readRunCurve, type Curve, type XAxis } from '../src/lab/compare.js';
import type { Corrections } from '../src/lab/correct.js';
import { FIT_PARAMS, fitCase, fitHistoryCsv, fitJson, fitSvg, fitTable, fittedCaseText, type FitParam } from '../src/lab/fit.js';
import { writeFileAtomic } from '../src/output/files.js';
import { svgToPng } from '../src/output/png.js';

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
      const out = o.out ?? dir;
      if (!o.force && existsSync(join(out, 'compare.json'))) throw new InputError(`${join(out, 'compare.json')} already holds a comparison: give --force to replace it, or --out for another folder`);
      const r = compareCurves(run, curves, {
        xAxis: xAxisOf(o.x), ligamentArea_mm2: positive('--ligament-area', o.ligamentArea), corrections,
        estimateFrom: estimate ? labs.map((p) => cmodReading(p, o)) : undefined,
      });
      const json = compareJson(r);
      writeFileAtomic(join(out, 'compare.json'), JSON.stringify(json, null, 2) + '\n');
      const svg = compareSvg(r);
      writeFileAtomic(join(out, 'compare.svg'), svg);
      await svgToPng(svg, join(out, 'compare.png'), 1200);
      if (o.json) process.stdout.write(JSON.stringify(json, null, 2) + '\n');
      else {
        process.stdout.write(compareTable(r));
        for (const c of curves) for (const n of c.notes) process.stdout.write(`read ${c.name}: ${n}\n`);
        process.stdout.write(`wrote ${join(out, 'compare.svg')}, compare.png and compare.json\n`);
      }
    });

  program
    .command('fit')
    .description('calibrate E, ft and GF of a case so that its curve matches a measured one')
    .argument('<case>', 'case file (YAML or JSON)')
    .requiredOption('--lab <file>', 'measured curve (text file of load and opening columns)')
    .option('--params <list>', 'parameters to fit, comma separated (default E,ft,GF)')
    .option('--softening <law>', 'softening law for the fit: linear, bilinear or exponential (default the case\'s)')
    .option('--x <axis>', 'opening of the measured curve: cmod or displacement (default from its column name)')
    .option('--mesh-size <mm>', 'cell size of the fitting mesh (default coarser than the case)')
    .option('--increments <n>', 'control increments of each candidate run (default the case\'s, at least 6 steps up to the measured peak)')
    .option('--max-evals <n>', 'simulations allowed in all (default 80)')
    .option('--workers <n>', 'worker threads, 0 for none (default 2)')
    .option('--out <dir>', 'output folder (default out/<case name>-fit)')
    .option('--quiet', 'no progress on stderr')
    .option('--json', 'print the result as JSON')
    .action(async (file: string, o: { lab: string; params?: string; softening?: string; x?: string; meshSize?: string; increments?: string; maxEvals?: string; workers?: string; out?: string; quiet?: boolean; json?: boolean }) => {
      const c = loadCase(file);
      const lab = readLabCurve(o.lab);
      const workers = o.workers === undefined ? undefined : Number(o.workers);
      if (workers !== undefined && !(Number.isInteger(workers) && workers >= 0)) throw new InputError(`--workers must be a whole number, 0 or more (found "${o.workers}")`);
      const inc = positive('--increments', o.increments), maxEvals = positive('--max-evals', o.maxEvals);
      const r = await fitCase(c, lab, {
        params: paramsOf(o.params), softening: softeningOf(o.softening), xAxis: xAxisOf(o.x),
        meshSize: positive('--mesh-size', o.meshSize), increments: inc && Math.round(inc), maxEvals: maxEvals && Math.round(maxEvals), workers,
        onEval: o.quiet ? undefined : (e) => process.stderr.write(`\r${e.index} runs (${e.phase}), RMSE ${Number.isFinite(e.objective) ? (100 * e.objective).toFixed(2) + ' % of peak' : '—'}   `),
      });
      if (!o.quiet) process.stderr.write('\n');
      const dir = o.out ?? join('out', `${c.name}-fit`);
      const caseOut = join(dir, `${c.name}-fitted.yaml`);
      writeFileAtomic(caseOut, fittedCaseText(readFileSync(file, 'utf8'), r));
      const svg = fitSvg(r);
      writeFileAtomic(join(dir, 'fit.svg'), svg);
      await svgToPng(svg, join(dir, 'fit.png'), 1200);
      writeFileAtomic(join(dir, 'fit-history.csv'), fitHistoryCsv(r));
      const json = fitJson(r);
      writeFileAtomic(join(dir, 'fit.json'), JSON.stringify(json, null, 2) + '\n');
      const table = fitTable(r);
      writeFileAtomic(join(dir, 'fit-report.txt'), table);
      if (o.json) process.stdout.write(JSON.stringify(json, null, 2) + '\n');
      else {
        process.stdout.write(table);
        process.stdout.write(`wrote ${caseOut} and the report (fit.svg, fit.png, fit-history.csv, fit.json, fit-report.txt) in ${dir}\n`);
      }
    });
}
