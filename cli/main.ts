// The rupta command line: a thin layer over the library (no physics here).
// Exit codes: 0 done, 2 a mistake in the input, 3 a run that stopped early, 1 a fault of ours.
import { Command, CommanderError } from 'commander';
import { join } from 'node:path';
import { loadCase, describeCase, caseWarnings } from '../src/case/index.js';
import { DiskFull, InputError, RunStopped } from '../src/errors.js';
import { runCase, meshCase } from '../src/run.js';
import { meshStats } from '../src/mesh/stats.js';
import { meshSvg } from '../src/output/field.js';
import { specimenSymbols } from '../src/output/runfiles.js';
import { OutputFolder, defaultOutDir } from '../src/output/folder.js';
import { shellQuote } from '../src/output/shell.js';
import { readCheckpointWithCase } from '../src/fracture/checkpoint.js';
import type { CaseModel } from '../src/case/model.js';
import { Analysis } from '../src/fracture/analysis.js';
import { Elastic2Analysis } from '../src/fracture/elastic2.js';
import type { PolyMesh } from '../src/mesh/polymesh.js';
import { checkHeldPieces } from '../src/fracture/pieces.js';
import { Progress } from './progress.js';
import { redrawRun } from '../src/output/redraw.js';
import { VERSION } from '../src/version.js';

/** A whole number of at least 1 from an option, or the one-sentence error. */
function wholeNumber(name: string, v: string): number {
  const x = Number(v);
  if (!(Number.isInteger(x) && x >= 1 && x <= 100000)) throw new InputError(`${name} must be a whole number from 1 to 100000 (found "${v}")`);
  return x;
}
import { registerLabCommands } from './lab.js';
import { registerNewCommand } from './new.js';
import { registerStudyCommand } from './study.js';

/** What check and mesh count the starting dofs on: the order-2 node mesh for elastic order-2 cases, else the loop's mesh. */
const countingAnalysis = (c: CaseModel, mesh: PolyMesh): Analysis | Elastic2Analysis =>
  c.mesh.order === 2 && !c.crack ? new Elastic2Analysis(c, mesh) : new Analysis(c, mesh);

interface RunFlags { out?: string; force?: boolean; resume?: boolean; quiet?: boolean; json?: boolean; exportMatrix?: string }

/** One run (fresh, resumed or finished) with progress, signals and the closing lines. */
async function runAndReport(c: CaseModel, file: string | null, o: RunFlags): Promise<void> {
  const progress = new Progress(!o.quiet, c);
  // the first signal ends the run after the step in hand, with every file complete; a second one quits at once
  let interrupted = false;
  const onSignal = () => {
    if (interrupted) process.exit(3);
    interrupted = true;
  };
  process.on('SIGINT', onSignal);
  process.on('SIGTERM', onSignal);
  const { dir, result, summary } = await runCase(c, {
    out: o.out, force: o.force, resume: o.resume, exportMatrix: o.exportMatrix, caseFile: file ?? undefined,
    onStep: (e, t) => progress.step(e.row, t),
    stopRequested: () => interrupted,
  });
  process.off('SIGINT', onSignal);
  process.off('SIGTERM', onSignal);
  progress.done();
  const again = file !== null ? `rupta run ${shellQuote(file)} --out ${shellQuote(dir)} --resume` : `rupta finish ${shellQuote(dir)}`;
  if (result.status === 'stopped') process.stderr.write(`rupta: the run stopped: ${result.reason}\n`);
  if (result.status === 'interrupted') process.stderr.write(`rupta: ${result.reason}; go on with: ${again}\n`);
  if (o.json) process.stdout.write(JSON.stringify(summary, null, 2) + '\n');
  else if (!o.quiet) {
    const p = result.peak;
    process.stdout.write(`${result.status}: ${result.reason}\n`);
    process.stdout.write(`peak load ${p.load_N.toFixed(1)} N at step ${p.step} (displacement ${p.displacement_mm.toFixed(4)} mm${p.cmod_mm !== null ? `, CMOD ${p.cmod_mm.toFixed(4)} mm` : ''})\n`);
    process.stdout.write(`results in ${dir}\n`);
  }
  if (result.status !== 'complete') process.exitCode = 3;
}

const program = new Command();
program
  .name('rupta')
  .description('Cohesive crack paths and load–opening curves of notched quasi-brittle plates.')
  .configureOutput({ outputError: () => {} }) // main() prints usage errors as one line
  .version(VERSION, '-V, --version', 'print the version of rupta')
  .exitOverride();

program
  .command('run')
  .description('run the analysis of a case file and write curve.csv, summary.json, frames and pictures')
  .argument('<case>', 'case file (YAML or JSON)')
  .option('--out <dir>', 'output folder (default out/<case name>)')
  .option('--force', 'overwrite an existing output folder')
  .option('--resume', 'go on with an interrupted run from its last checkpoint (same --out folder)')
  .option('--quiet', 'no progress on stderr')
  .option('--json', 'print the summary as JSON on stdout')
  .option('--export-matrix <file>', 'also write the constrained stiffness matrix (Matrix Market)')
  .option('--every <n>', 'keep a frame only every n steps (default output.every)')
  .option('--max-frames <n>', 'at most n frames, evenly spaced over the run (default output.maxFrames, 40)')
  .option('--svg', 'also write each frame as SVG')
  .option('--no-frames', 'no frames and no animation')
  .action(async (file: string, o: RunFlags & { every?: string; maxFrames?: string; svg?: boolean; frames: boolean }) => {
    const c = loadCase(file);
    for (const w of caseWarnings(c)) process.stderr.write(`rupta: warning: ${w}\n`);
    if (o.every !== undefined) c.output.every = wholeNumber('--every', o.every);
    if (o.maxFrames !== undefined) c.output.maxFrames = wholeNumber('--max-frames', o.maxFrames);
    if (o.svg && !c.output.frames.includes('svg')) c.output.frames = [...c.output.frames, 'svg'];
    if (!o.frames) c.output.frames = [];
    await runAndReport(c, file, o);
  });

program
  .command('finish')
  .description('complete a run folder whose run was interrupted or whose final writes were cut off, from its checkpoint (no case file needed)')
  .argument('<run-dir>', 'output folder of the run')
  .option('--quiet', 'no progress on stderr')
  .option('--json', 'print the summary as JSON on stdout')
  .action(async (dir: string, o: { quiet?: boolean; json?: boolean }) => {
    const { c } = readCheckpointWithCase(dir);
    await runAndReport(c, null, { out: dir, resume: true, quiet: o.quiet, json: o.json });
  });

program
  .command('check')
  .description('validate a case file, print the model summary and the number of dofs')
  .argument('<case>', 'case file (YAML or JSON)')
  .action((file: string) => {
    const c = loadCase(file);
    for (const w of caseWarnings(c)) process.stderr.write(`rupta: warning: ${w}\n`);
    const { mesh, seconds } = meshCase(c);
    const a = countingAnalysis(c, mesh);
    checkHeldPieces(c, mesh, a.wm);
    const st = meshStats(mesh);
    process.stdout.write(describeCase(c) + '\n');
    const free = a.freeDofs; // counted on the mesh the run starts from (refined at the crack tips)
    process.stdout.write(`Mesh: ${st.polygons} polygons, ${st.vertices} vertices (${seconds.toFixed(2)} s); the run starts with ${a.dofs.initial} dofs, ${free} of them free.\n`);
  });

program
  .command('mesh')
  .description('mesh a case, write mesh.svg into the output folder and print mesh statistics')
  .argument('<case>', 'case file (YAML or JSON)')
  .option('--out <dir>', 'output folder (default out/<case name>)')
  .option('--force', 'overwrite an existing mesh.svg')
  .action((file: string, o: { out?: string; force?: boolean }) => {
    const c = loadCase(file);
    const dir = o.out ?? defaultOutDir(c.name);
    const folder = OutputFolder.open(dir);
    folder.lock();
    try {
      const path = folder.file('mesh.svg');
      if (!o.force && folder.list().includes('mesh.svg')) throw new InputError(`${path} already exists; pass --force to overwrite it or --out to choose another folder`);
      const { mesh, seconds } = meshCase(c);
      folder.write('mesh.svg', meshSvg(mesh, { ...specimenSymbols(c), title: `${c.title}: mesh` }));
      const st = meshStats(mesh);
      // the same count as check: the mesh the run starts from (refined at the crack tips)
      const a = countingAnalysis(c, mesh);
      const free = a.freeDofs; // sets up the starting mesh; dofs.initial is read after it
      process.stdout.write(`${st.polygons} polygons, ${st.vertices} vertices, made in ${seconds.toFixed(2)} s; the run starts with ${a.dofs.initial} dofs, ${free} of them free\n`);
      process.stdout.write(`cell area ${st.minArea.toPrecision(3)}–${st.maxArea.toPrecision(3)} mm², edge ${st.minEdge.toPrecision(3)}–${st.maxEdge.toPrecision(3)} mm, up to ${st.maxVerticesPerCell} vertices per cell\n`);
      process.stdout.write(`wrote ${path}\n`);
    } finally {
      folder.release();
    }
  });

program
  .command('redraw')
  .description('draw the frames, the animation and report.html of a finished run folder again, from its own files (the report takes up compare*.json and fit*.json found there)')
  .argument('<run-dir>', 'output folder of a rupta run')
  .option('--report-only', 'write report.html again (with the comparisons and fits now in the folder), keep the frames as they are')
  .option('--workers <n>', 'threads that draw the frames: 0 this one alone, 1 a worker, 2 this one and a worker (default: a worker only for SVG frames or many megapixels)')
  .action(async (dir: string, o: { reportOnly?: boolean; workers?: string }) => {
    const workers = o.workers === undefined ? undefined : Number(o.workers);
    if (workers !== undefined && !(o.workers!.trim() !== '' && Number.isInteger(workers) && workers >= 0 && workers <= 2)) throw new InputError(`--workers must be 0, 1 or 2 threads (found "${o.workers}")`);
    const { frames } = await redrawRun(dir, { frames: !o.reportOnly, workers });
    process.stdout.write(o.reportOnly ? `wrote report.html in ${dir} (${frames} frame${frames === 1 ? '' : 's'})\n`
      : `redrew ${frames} frame${frames === 1 ? '' : 's'}, the animation and report.html in ${dir}\n`);
  });

registerNewCommand(program);
registerLabCommands(program);
registerStudyCommand(program);

/** A usage error of commander as one line: what is wrong, for which command, where its help is. */
function usageSentence(e: CommanderError, argv: readonly string[]): string {
  // The command (and subcommand) named by the leading words.
  let sub: Command = program, cmd = 'rupta';
  for (const w of argv.filter((a) => !a.startsWith('-'))) {
    const next = sub.commands.find((c) => c.name() === w || c.aliases().includes(w));
    if (!next) break;
    sub = next; cmd += ` ${next.name()}`;
  }
  const [first = '', ...rest] = e.message.replace(/^error:\s*/, '').split('\n');
  let what = first.replace(/'([^']*)'/g, '$1').replace(/\.$/, '')
    .replace(/^too many arguments(?: for \S+)?\. Expected (\d+) arguments? but got (\d+)$/, 'too many arguments (expected $1, found $2)')
    .replace(/^option (.+) argument missing$/, 'option $1 needs a value');
  if (sub !== program) what += ` for ${cmd}`;
  const near = /Did you mean (.+)\?/.exec(rest.join(' '));
  return `${what}${near ? `; did you mean ${near[1]}?` : ''} (see ${cmd} --help)`;
}

/** A fault of rupta itself: one line (the details with RUPTA_DEBUG=1), exit 1, never a raw trace. */
function internal(e: unknown): void {
  const msg = e instanceof Error ? e.message : String(e);
  process.stderr.write(`rupta: internal error: ${msg}\n(set RUPTA_DEBUG=1 for the details)\n`);
  if (process.env.RUPTA_DEBUG && e instanceof Error) process.stderr.write(`${e.stack}\n${e.cause instanceof Error ? `caused by ${e.cause.stack}\n` : ''}`);
}

async function main(): Promise<void> {
  // a rejection nobody awaited (a background picture) is reported like any other fault
  process.on('unhandledRejection', (e) => {
    if (e instanceof DiskFull || e instanceof InputError) process.stderr.write(`rupta: ${e.message}\n`);
    else internal(e);
    process.exit(e instanceof InputError ? 2 : e instanceof DiskFull ? 3 : 1);
  });
  // A reader that stops early (rupta new --list | head) is no fault.
  process.stdout.on('error', (e: NodeJS.ErrnoException) => { if (e.code === 'EPIPE') process.exit(process.exitCode ?? 0); else throw e; });
  try {
    await program.parseAsync(process.argv);
  } catch (e) {
    if (e instanceof CommanderError) {
      if (e.exitCode !== 0 && e.code !== 'commander.help') process.stderr.write(`rupta: ${usageSentence(e, process.argv.slice(2))}\n`);
      process.exitCode = e.exitCode === 0 ? 0 : 2;
      return;
    }
    if (e instanceof InputError) { process.stderr.write(`rupta: ${e.message}\n`); process.exitCode = 2; return; }
    if (e instanceof RunStopped) { process.stderr.write(`rupta: the run stopped: ${e.message}\n`); process.exitCode = 3; return; }
    if (e instanceof DiskFull) { process.stderr.write(`rupta: ${e.message}\n`); process.exitCode = 3; return; }
    internal(e);
    process.exitCode = 1;
  }
}

await main();
