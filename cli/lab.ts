// The lab commands: compare a run with measured curves, fit material parameters to one.
import type { Command } from 'commander';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { loadCase } from '../src/case/index.js';
import type { Softening } from '../src/case/model.js';
import { InputError } from '../src/errors.js';
import { readLabCurve } from '../src/lab/import.js';
import { compareCurves, compareJson, compareSvg, compareTable, readRunCurve, type XAxis } from '../src/lab/compare.js';
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
  program
    .command('compare')
    .description('overlay measured load–opening curves on a run and tabulate peak, opening at peak, RMSE, area and GF')
    .argument('<run-dir>', 'output folder of a rupta run (with curve.csv and summary.json)')
    .argument('<lab...>', 'measured curves (text files of load and opening columns)')
    .option('--x <axis>', 'opening to compare against: cmod or displacement (default cmod when the run has a gauge)')
    .option('--ligament-area <mm2>', 'ligament area for GF in mm² (default from summary.json)')
    .option('--json', 'print the comparison as JSON')
    .action(async (dir: string, labs: string[], o: { x?: string; ligamentArea?: string; json?: boolean }) => {
      const run = readRunCurve(dir);
      const curves = labs.map((p) => readLabCurve(p));
      const r = compareCurves(run, curves, { xAxis: xAxisOf(o.x), ligamentArea_mm2: positive('--ligament-area', o.ligamentArea) });
      const json = compareJson(r);
      writeFileAtomic(join(dir, 'compare.json'), JSON.stringify(json, null, 2) + '\n');
      const svg = compareSvg(r);
      writeFileAtomic(join(dir, 'compare.svg'), svg);
      await svgToPng(svg, join(dir, 'compare.png'), 1200);
      if (o.json) process.stdout.write(JSON.stringify(json, null, 2) + '\n');
      else {
        process.stdout.write(compareTable(r));
        for (const c of curves) for (const n of c.notes) process.stdout.write(`read ${c.name}: ${n}\n`);
        process.stdout.write(`wrote ${join(dir, 'compare.svg')}, compare.png and compare.json\n`);
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
