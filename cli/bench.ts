// npm run bench: timings of mesh generation, assembly, ordering + factorization and solve on
// plates of about 10k, 50k, 100k and 200k dofs (both fill-reducing orderings side by side, and the
// SuiteSparse supernodal Cholesky on the same matrix where installed, in CPU time), of a
// crack-growth run of the demo beam and of the double-edge-notched panel (condensed and not), of
// an elastic run with stress intensity factors (about 5k dofs) and of the ceramic bend bar in the brittle mode, run with all its files to separation
// (--no-sif skips these two, --no-plates the plates), and of the checks and meshing of large
// hole, outline and probe counts.
// npm run bench -- --validation: only the checks and meshing of large hole, outline and probe counts.
// npm run bench -- --sif: only the elastic run with stress intensity factors, phase by phase (CPU and wall time).
// npm run bench -- --matrix FILE.mtx: factorize and solve a given SPD matrix with both orderings
// and, where the Debian packages are installed, the SuiteSparse supernodal Cholesky on the same file,
// round by round; with --against DIR also another build's solver on the same file.
// npm run bench -- --join: only the double-edge-notched panel (two cracks join), condensed Newton against
// { condense: false } in the same run (also part of the default run unless --no-growth).
// npm run bench -- --against DIR [--fit]: the demo beam (its 4× finer bulk, the double-edge-notched panel) by this build and another, side by side;
// --fit adds a three-parameter fit of the fit demo by each (--fit-only: the fits alone);
// --examples runs every cohesive example in cases/ by each instead (steps, iterations, peak, crack ends, energy gap;
// --case NAME: those whose file name holds NAME); --steps adaptive|fixed sets this build's step control.
// npm run bench -- --study [--variants N] [--jobs J] [--slurm]: a study's pool (and Slurm) against single runs.
// npm run bench -- --frames [--against DIR]: the demo's analysis against its pictures, in CPU time (see bench-frames.ts).
// npm run bench -- --order: error against unknowns and wall time for element orders 1 and 2, and crack growth at both
// orders on one mesh (also part of the default run).
// Each figure is the median of --repeat runs (default 3): the machine is shared and noisy.
import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { parseCase } from '../src/case/index.js';
import type { CaseModel } from '../src/case/model.js';
import { buildDomain } from '../src/geometry/domain.js';
import { generateMesh } from '../src/mesh/generate.js';
import { Analysis } from '../src/fracture/analysis.js';
import { DISSECTION_FROM_ROWS, analyze, factorize, readMatrixMarket, writeMatrixMarket, type CsrMatrix, type OrderingMethod } from '../src/linalg/index.js';
import { benchMatrix, plateCase, cholmodDriver, cholmodTimes, cpuSeconds, type BenchResult, type ReferenceTiming, type SolverLib } from './bench-matrix.js';
import { runCase } from '../src/run.js';
import { worstEnergyGap } from '../src/output/warnings.js';
import { benchStudy } from './bench-study.js';
import { benchOrder, benchGrowthOrders } from './bench-order.js';
import { validationBench } from './bench-validation.js';
import { benchFrames } from './bench-frames.js';

const median = (a: number[]) => { const s = [...a].sort((x, y) => x - y); return s[s.length >> 1]; };
const now = () => performance.now() / 1000;


const ORDERINGS: OrderingMethod[] = ['mindegree', 'dissection'];
const autoPick = (n: number): OrderingMethod => (n >= DISSECTION_FROM_ROWS ? 'dissection' : 'mindegree');

/** One line per ordering: medians of the factorization runs, and its ratios to the first ordering. */
function orderingLines(runs: Map<OrderingMethod, BenchResult[]>, n: number): string[] {
  const base = runs.get(ORDERINGS[0])!;
  const baseTotal = median(base.map((r) => r.factor_s));
  return ORDERINGS.map((o) => {
    const rs = runs.get(o)!;
    const f = median(rs.map((r) => r.factor_s));
    return `  ${o.padEnd(10)}${o === autoPick(n) ? '*' : ' '} nnz(L) ${(rs[0].nnzL / 1e6).toFixed(3)} M (×${(rs[0].nnzL / base[0].nnzL).toFixed(3)})` +
      `  ordering ${median(rs.map((r) => r.ordering_s)).toFixed(3)} s  symbolic ${median(rs.map((r) => r.symbolic_s)).toFixed(3)} s` +
      `  numeric ${median(rs.map((r) => r.numeric_s)).toFixed(3)} s  total ${f.toFixed(3)} s (×${(f / baseTotal).toFixed(2)})  solve ${median(rs.map((r) => r.solve_s)).toFixed(3)} s`;
  });
}

/**
 * Our factorization (the default ordering at this size) against CHOLMOD's, round by round: each
 * round's ratio is taken within the round (both met the same load), and the medians of the
 * times and of the ratios are printed. Analyse = ordering + symbolic analysis; factorize = numeric.
 */
function versusLines(ours: BenchResult[], ref: ReferenceTiming[], name = 'ours'): string[] {
  const total = (r: BenchResult) => r.ordering_s + r.symbolic_s + r.numeric_s;
  const refTotal = (r: ReferenceTiming) => r.analyse_s + r.factorize_s;
  const rounds = Math.min(ours.length, ref.length);
  const rTotal: number[] = [], rNumeric: number[] = [], rOrder: number[] = [];
  for (let i = 0; i < rounds; i++) {
    rTotal.push(total(ours[i]) / refTotal(ref[i]));
    rNumeric.push(ours[i].numeric_s / ref[i].factorize_s);
    rOrder.push((ours[i].ordering_s + ours[i].symbolic_s) / ref[i].analyse_s);
  }
  return [
    `  SuiteSparse CHOLMOD (supernodal, its default ordering, one BLAS thread): nnz(L) ${(ref[0].nnzL / 1e6).toFixed(3)} M  analyse ${median(ref.map((r) => r.analyse_s)).toFixed(3)} s  factorize ${median(ref.map((r) => r.factorize_s)).toFixed(3)} s  total ${median(ref.map(refTotal)).toFixed(3)} s`,
    `  ${name} / CHOLMOD (medians of the per-round ratios, CPU time): analyse+factorize ×${median(rTotal).toFixed(2)}, factorize alone ×${median(rNumeric).toFixed(2)}, analyse alone ×${median(rOrder).toFixed(2)}, nnz(L) ×${(ours[0].nnzL / ref[0].nnzL).toFixed(3)}`,
  ];
}

function elastic(targetDofs: number, repeat: number, driver: { exe: string } | string): void {
  // Voronoi meshes have about two vertices per cell: dofs ≈ 4 × cells, cells ≈ area / (2.6 h²)
  const h = Math.sqrt((1e6 * 4) / (2.6 * targetDofs));
  const c = plateCase(h);
  const t = { mesh: [] as number[], assembly: [] as number[], factor: [] as number[] };
  const runs = new Map<OrderingMethod, BenchResult[]>(ORDERINGS.map((o) => [o, []]));
  const ref: ReferenceTiming[] = [];
  const dir = mkdtempSync(join(tmpdir(), 'rupta-bench-'));
  let dofs = 0, polys = 0;
  for (let r = 0; r < repeat; r++) {
    let t0 = now();
    const mesh = generateMesh(buildDomain(c), c.mesh);
    t.mesh.push(now() - t0);
    const a = new Analysis(c, mesh);
    t0 = now();
    const K = a.stiffnessMatrix(); // a fresh topology: pattern, element stiffnesses, supports eliminated
    t.assembly.push(now() - t0);
    t0 = cpuSeconds();
    factorize(K, analyze(K)); // what a run does: the default ordering
    t.factor.push(cpuSeconds() - t0);
    for (const o of ORDERINGS) runs.get(o)!.push(benchMatrix(K, o));
    if (typeof driver !== 'string') {
      const file = join(dir, 'plate.mtx');
      if (r === 0) writeMatrixMarket(K, file, 'bench plate');
      ref.push(...cholmodTimes(driver.exe, file, 1));
    }
    dofs = K.n; polys = mesh.cellStart.length - 1;
  }
  rmSync(dir, { recursive: true, force: true });
  console.log(`${String(dofs).padStart(7)} free dofs ${String(polys).padStart(7)} polygons  mesh ${median(t.mesh).toFixed(2)} s  assembly ${median(t.assembly).toFixed(2)} s  analyse+factor (default ordering) ${median(t.factor).toFixed(2)} s CPU`);
  for (const l of orderingLines(runs, dofs)) console.log(l);
  if (ref.length > 0) for (const l of versusLines(runs.get(autoPick(dofs))!, ref)) console.log(l);
}

/** The sparse solver of another build (a folder holding its compiled .build/). */
async function otherSolver(dir: string): Promise<SolverLib> {
  return (await import(pathToFileURL(join(resolve(dir), '.build/src/linalg/index.js')).href)) as SolverLib;
}

/**
 * Both orderings on a Matrix Market file and, where installed, the SuiteSparse supernodal Cholesky,
 * run round by round; with another build, its default ordering on the same file in the same rounds.
 */
async function matrixFile(file: string, repeat: number, againstDir?: string): Promise<void> {
  const driver = cholmodDriver();
  const other = againstDir ? await otherSolver(againstDir) : null;
  const A: CsrMatrix = readMatrixMarket(file);
  const pick = autoPick(A.n);
  const runs = new Map<OrderingMethod, BenchResult[]>(ORDERINGS.map((o) => [o, []]));
  const theirs: BenchResult[] = [];
  const ref: ReferenceTiming[] = [];
  for (let r = 0; r < repeat; r++) {
    if (other) theirs.push(benchMatrix(A, pick, other));
    for (const o of ORDERINGS) runs.get(o)!.push(benchMatrix(A, o));
    if (typeof driver !== 'string') ref.push(...cholmodTimes(driver.exe, file, 1));
  }
  console.log(`${file}: ${A.n} rows (CPU seconds, medians of ${repeat} rounds; * = the default ordering at this size)`);
  for (const l of orderingLines(runs, A.n)) console.log(l);
  const ours = runs.get(pick)!;
  if (other) {
    const ratio = (f: (x: BenchResult) => number) => median(ours.map((x, i) => f(x) / f(theirs[i]))).toFixed(2);
    console.log(`  other build (${againstDir}), ${pick}: nnz(L) ${(theirs[0].nnzL / 1e6).toFixed(3)} M  ordering ${median(theirs.map((x) => x.ordering_s)).toFixed(3)} s  symbolic ${median(theirs.map((x) => x.symbolic_s)).toFixed(3)} s  numeric ${median(theirs.map((x) => x.numeric_s)).toFixed(3)} s  total ${median(theirs.map((x) => x.factor_s)).toFixed(3)} s`);
    console.log(`  this / other (medians of per-round ratios): ordering ×${ratio((x) => x.ordering_s)}, symbolic ×${ratio((x) => x.symbolic_s)}, numeric ×${ratio((x) => x.numeric_s)}, total ×${ratio((x) => x.factor_s)}, nnz(L) ×${(ours[0].nnzL / theirs[0].nnzL).toFixed(3)}`);
    if (ref.length > 0) for (const l of versusLines(theirs, ref, 'other')) console.log(l);
  }
  if (typeof driver === 'string') {
    console.log(`  reference skipped: ${driver}`);
    return;
  }
  for (const l of versusLines(ours, ref)) console.log(l);
}

async function growth(repeat: number): Promise<void> {
  const demo = readFileSync(fileURLToPath(new URL('../../cases/beam-3pb-demo.yaml', import.meta.url)), 'utf8')
    .replace(/^mesh:.*$/m, 'mesh: {size: 5, tipSize: 1, refineRadius: 15, coarsen: true, seed: 1, lloyd: 8}')
    .replace(/^crack:[\s\S]*?(?=^\S)/m, 'crack: {start: notch-tips, growthStep: 1.6, averagingRadius: 3}\n')
    .replace(/^  target: .*$/m, '  target: 2.0')
    .replace(/^output:.*$/m, 'output: {frames: [], animation: none}');
  const c = parseCase(demo, 'bench-beam.yaml');
  const totals: number[] = [];
  let last: { steps: number; growth: number; peak: number; status: string; reason: string; dofs: number[]; stepTimes: number[] } | null = null;
  for (let r = 0; r < repeat; r++) {
    const t0 = now();
    const a = new Analysis(c, generateMesh(buildDomain(c), c.mesh));
    const dofs: number[] = [], stepTimes: number[] = [];
    let tl = now();
    const res = await a.run((e) => { dofs.push(a.dofs.final); stepTimes.push(now() - tl); tl = now(); void e; });
    totals.push(now() - t0);
    last = { steps: res.rows.length - 1, growth: a.growthLog.length, peak: res.peak.load_N, status: res.status, reason: res.reason, dofs, stepTimes };
  }
  const L = last!;
  console.log(`crack growth, demo beam: ${L.steps} steps, ${L.growth} growth events, peak ${L.peak.toFixed(0)} N, ${L.status} (${L.reason})`);
  console.log(`  total ${median(totals).toFixed(1)} s (median of ${repeat}), ${(median(totals) / L.steps * 1000).toFixed(0)} ms per step, dofs ${Math.min(...L.dofs)}–${Math.max(...L.dofs)}`);
  const every = Math.max(1, Math.floor(L.steps / 12));
  const lines: string[] = [];
  for (let i = 1; i < L.dofs.length; i += every) lines.push(`step ${i}: ${L.dofs[i]} dofs, ${(L.stepTimes[i] * 1000).toFixed(0)} ms`);
  console.log('  ' + lines.join('\n  '));
}

/** An elastic plate with a slanted sharp slit: mesh, one solve, K at both tips. */
async function sifElastic(repeat: number): Promise<void> {
  const c = parseCase(`
format: 1
title: bench slit
units: mm-N-MPa
thickness: 1
geometry:
  outline: [[0,0],[200,0],[200,200],[0,200]]
  notches: [{from: [95, 91.34], to: [105, 108.66], width: 0}]
material: {E: 30000, nu: 0.2, ft: 3, GF: 0.1}
supports: [{along: [[0,0],[200,0]], fix: y}, {at: [0,0], fix: x}]
loads: [{along: [[0,200],[200,200]], direction: [0, 1]}]
control: {by: force, target: 200}
mesh: {size: 20, tipSize: 0.5, refineRadius: 8, seed: 1}
output: {frames: []}
`, 'bench-slit.yaml');
  // wall and CPU time (user + system) of each phase: the CPU time is what this run costs,
  // whatever else the shared machine is doing
  const cpu = () => { const u = process.cpuUsage(); return (u.user + u.system) / 1e6; };
  const phases = ['mesh', 'set-up', 'run', 'K'] as const;
  const wall: Record<string, number[]> = {}, used: Record<string, number[]> = {};
  for (const p of [...phases, 'total']) { wall[p] = []; used[p] = []; }
  let dofs = 0, line = '';
  for (let r = 0; r < repeat; r++) {
    const w = [now()], u = [cpu()];
    const mesh = generateMesh(buildDomain(c), c.mesh);
    w.push(now()); u.push(cpu());
    const a = new Analysis(c, mesh);
    w.push(now()); u.push(cpu());
    await a.run(() => {});
    w.push(now()); u.push(cpu());
    const tips = a.tipFactors();
    w.push(now()); u.push(cpu());
    phases.forEach((p, i) => { wall[p].push(w[i + 1] - w[i]); used[p].push(u[i + 1] - u[i]); });
    wall.total.push(w[4] - w[0]); used.total.push(u[4] - u[0]);
    dofs = a.dofs.final;
    line = tips.map((t) => `K_I ${t.KI!.toFixed(2)}, K_II ${t.KII!.toFixed(2)} MPa√mm, spread ${(100 * t.spread!).toFixed(2)} %`).join('; ');
  }
  const f = (p: string) => `${p} ${median(used[p]).toFixed(2)} s cpu / ${median(wall[p]).toFixed(2)} s wall`;
  console.log(`elastic run with stress intensity factors: ${dofs} dofs, ${f('total')} (${phases.map(f).join(', ')}); ${line}`);
}

/** The ceramic bend-bar example (crack.model lefm) with all its files, to separation. */
async function brittle(repeat: number): Promise<void> {
  const c = parseCase(readFileSync(fileURLToPath(new URL('../../cases/ceramic-bend-bar-example.yaml', import.meta.url)), 'utf8'), 'ceramic-bend-bar-example.yaml');
  const total: number[] = [];
  let note = '';
  for (let r = 0; r < repeat; r++) {
    const dir = mkdtempSync(join(tmpdir(), 'rupta-bench-'));
    const t0 = now();
    const out = await runCase(c, { out: dir, force: true });
    total.push(now() - t0);
    const res = out.result;
    note = `${res.rows.length - 1} critical states, solve ${res.timings_s.solve.toFixed(1)} s, ${res.status}: ${res.reason}`;
    rmSync(dir, { recursive: true, force: true });
  }
  console.log(`ceramic bend bar (lefm, frames, animation and report): total ${median(total).toFixed(1)} s (median of ${repeat}); ${note}`);
}

/** The double-edge-notched panel example without pictures: two cracks that meet, so the condensation runs across their junction. */
function denPanel(): string {
  return readFileSync(fileURLToPath(new URL('../../cases/den-tension-example.yaml', import.meta.url)), 'utf8')
    .replace(/^output:.*$/m, 'output: {frames: [], animation: none}');
}

/** Steps, iterations, peak, last tip and crack length of a run: what two runs of one case should share. */
function runSummary(res: Awaited<ReturnType<Analysis['run']>>, iters: number): string {
  const last = res.rows[res.rows.length - 1];
  const tip = [...res.rows].reverse().find((row) => row.tip_x_mm !== null);
  return `${res.rows.length - 1} steps, ${iters} iterations, peak ${res.peak.load_N.toFixed(2)} N, tip [${tip?.tip_x_mm?.toFixed(2)}, ${tip?.tip_y_mm?.toFixed(2)}] mm, crack ${last.crack_length_mm.toFixed(2)} mm`;
}

/**
 * The double-edge-notched panel by this build with the Newton on the condensed crack faces and
 * with `{ condense: false }` (all free unknowns), run alternately: CPU-time medians and their
 * ratio, what condensation buys once two cracks have joined.
 */
async function joined(repeat: number): Promise<void> {
  const c = parseCase(denPanel(), 'den-tension-example.yaml');
  const t = { on: [] as number[], off: [] as number[] };
  const out: Record<string, string> = {};
  for (let r = 0; r < repeat; r++) {
    for (const who of ['off', 'on'] as const) {
      const t0 = cpuSeconds();
      const a = new Analysis(c, generateMesh(buildDomain(c), c.mesh), { condense: who === 'on' });
      let iters = 0;
      const res = await a.run((e) => { iters += e.row.iterations; });
      t[who].push(cpuSeconds() - t0);
      out[who] = `${runSummary(res, iters)}, ${a.growthLog.length} growth events, ${res.status}`;
    }
  }
  const mo = median(t.on), mx = median(t.off);
  console.log(`double-edge-notched panel (two cracks join), CPU seconds, medians of ${repeat}, run alternately: condensed ${mo.toFixed(2)} s, condense: false ${mx.toFixed(2)} s, ratio ×${(mo / mx).toFixed(2)}`);
  console.log(`  condensed:       ${out.on}\n  condense: false: ${out.off}`);
}

/**
 * The demo beam to 5 % of its peak, the same beam with a bulk mesh four times finer (same
 * tip cells) and the double-edge-notched panel (two cracks join), run alternately by this build and by another build of rupta (a folder holding its
 * compiled .build/), so both meet the same load on this shared machine. Times are the process's
 * CPU time (user + system) per run; the ratios are of the medians.
 */
async function against(dir: string, repeat: number): Promise<void> {
  const root = resolve(dir);
  const other = {
    Analysis: (await import(pathToFileURL(join(root, '.build/src/fracture/analysis.js')).href)).Analysis as typeof Analysis,
    parseCase: (await import(pathToFileURL(join(root, '.build/src/case/index.js')).href)).parseCase as typeof parseCase,
    buildDomain: (await import(pathToFileURL(join(root, '.build/src/geometry/domain.js')).href)).buildDomain as typeof buildDomain,
    generateMesh: (await import(pathToFileURL(join(root, '.build/src/mesh/generate.js')).href)).generateMesh as typeof generateMesh,
  };
  const ours = { Analysis, parseCase, buildDomain, generateMesh };
  const demo = readFileSync(fileURLToPath(new URL('../../cases/beam-3pb-demo.yaml', import.meta.url)), 'utf8')
    .replace(/^output:.*$/m, 'output: {frames: [], animation: none}');
  const variants = [
    ['demo beam', demo],
    ['demo beam, bulk 4× finer', demo.replace(/^mesh:.*$/m, 'mesh: {size: 5, tipSize: 2, refineRadius: 20, coarsen: true, seed: 1, lloyd: 8}')],
    ['double-edge-notched panel (two cracks join)', denPanel()],
  ] as const;
  console.log(`this build against ${root} (CPU seconds, medians of ${repeat}, run alternately)`);
  const cpu = () => { const u = process.cpuUsage(); return (u.user + u.system) / 1e6; };
  for (const [name, text] of fitOnly ? [] : variants) {
    const t = { ours: [] as number[], other: [] as number[] };
    const out: Record<string, string> = {};
    for (let r = 0; r < repeat; r++) {
      for (const [who, lib] of [['other', other], ['ours', ours]] as const) {
        const c = lib.parseCase(text, 'bench-demo.yaml');
        const t0 = cpu();
        const a = new lib.Analysis(c, lib.generateMesh(lib.buildDomain(c), c.mesh), who === 'ours' ? thisSteps : {});
        let iters = 0;
        const res = await a.run((e) => { iters += e.row.iterations; });
        t[who].push(cpu() - t0);
        out[who] = runSummary(res, iters);
      }
    }
    const mo = median(t.ours), mx = median(t.other);
    console.log(`${name}: this ${mo.toFixed(2)} s, other ${mx.toFixed(2)} s, ratio ×${(mo / mx).toFixed(2)}`);
    console.log(`  this:  ${out.ours}\n  other: ${out.other}`);
  }
  if (withFit) await againstFit(root, cpu, repeat);
}

/**
 * Every cohesive example in cases/ (pictures off) by this build and another, alternately:
 * steps, Newton iterations, peak, the crack's end points, the worst energy gap of a step
 * (share of the work), and CPU-time medians with their ratio. What a change of step control
 * must keep: the peak within 0.5 % and the crack ends within a tip cell.
 */
async function againstExamples(dir: string, repeat: number): Promise<void> {
  const root = resolve(dir);
  const load = async (base: string) => ({
    Analysis: (await import(pathToFileURL(join(base, 'src/fracture/analysis.js')).href)).Analysis as typeof Analysis,
    parseCase: (await import(pathToFileURL(join(base, 'src/case/index.js')).href)).parseCase as typeof parseCase,
    buildDomain: (await import(pathToFileURL(join(base, 'src/geometry/domain.js')).href)).buildDomain as typeof buildDomain,
    generateMesh: (await import(pathToFileURL(join(base, 'src/mesh/generate.js')).href)).generateMesh as typeof generateMesh,
  });
  const builds = [['other', await load(join(root, '.build'))], ['this', await load(fileURLToPath(new URL('..', import.meta.url)))]] as const;
  const folder = fileURLToPath(new URL('../../cases/', import.meta.url));
  const only = args.indexOf('--case') >= 0 ? args[args.indexOf('--case') + 1] : undefined;
  const names = readdirSync(folder).filter((f) => f.endsWith('.yaml') && (!only || f.includes(only))).sort();
  const cpu = () => { const u = process.cpuUsage(); return (u.user + u.system) / 1e6; };
  console.log(`examples, this build against ${root} (CPU seconds, medians of ${repeat}, run alternately)`);
  const ratios: number[] = [];
  for (const name of names) {
    const text = readFileSync(join(folder, name), 'utf8').replace(/^output:.*$/m, 'output: {frames: [], animation: none}');
    const probe = builds[1][1].parseCase(text, name);
    if (!probe.crack || probe.crack.model === 'lefm') continue;
    const t: Record<string, number[]> = { other: [], this: [] };
    const say: Record<string, { line: string; peak: number; ends: [number, number][] }> = {};
    for (let r = 0; r < repeat; r++) {
      for (const [who, lib] of builds) {
        const c = lib.parseCase(text, name);
        const t0 = cpu();
        const a = new lib.Analysis(c, lib.generateMesh(lib.buildDomain(c), c.mesh), who === 'this' ? thisSteps : {});
        let iters = 0;
        const res = await a.run((e) => { iters += e.row.iterations; });
        t[who]!.push(cpu() - t0);
        const gap = worstEnergyGap(res.rows);
        const ends = res.crackPaths.flatMap((p) => (p.length > 1 ? [p[0]!, p[p.length - 1]!] : []));
        say[who] = {
          peak: res.peak.load_N, ends,
          line: `${res.rows.length - 1} steps (${(a as unknown as { attempts?: { tried: number; cut: number } }).attempts?.cut ?? '?'} attempts cut), ${iters} iterations, peak ${res.peak.load_N.toFixed(2)} N at ${res.peak.cmod_mm ?? res.peak.displacement_mm} mm, `
            + `worst energy gap ${gap ? (100 * gap.share).toFixed(2) : '-'} %, ${res.status}`,
        };
      }
    }
    const mo = median(t.this!), mx = median(t.other!);
    ratios.push(mo / mx);
    const a = say.this!, b = say.other!;
    let endMove = 0;
    if (a.ends.length === b.ends.length) for (let i = 0; i < a.ends.length; i++) endMove = Math.max(endMove, Math.hypot(a.ends[i]![0] - b.ends[i]![0], a.ends[i]![1] - b.ends[i]![1]));
    const tip = builds[1][1].parseCase(text, name).mesh.tipSize;
    console.log(`${name}: this ${mo.toFixed(2)} s, other ${mx.toFixed(2)} s, ratio ×${(mo / mx).toFixed(2)}; peak ${(100 * (a.peak / b.peak - 1)).toFixed(2)} %, crack ends moved ${a.ends.length === b.ends.length ? `${endMove.toFixed(2)} mm (tip cell ${tip} mm)` : 'n/a (crack count differs)'}`);
    console.log(`  this:  ${a.line}\n  other: ${b.line}`);
  }
  if (ratios.length) console.log(`median CPU ratio over the examples ×${median(ratios).toFixed(2)}`);
}

/**
 * A three-parameter fit (E, ft, GF) of the fit demo to its synthetic lab curve by the other
 * build and this one, alternately, `repeat` times each, on two worker threads: medians of the
 * process's CPU time (worker threads included) and of the wall time, and their ratios.
 */
async function againstFit(root: string, cpu: () => number, repeat: number): Promise<void> {
  const lab = fileURLToPath(new URL('../../cases/fit-demo-lab.csv', import.meta.url));
  const text = readFileSync(fileURLToPath(new URL('../../cases/fit-demo.yaml', import.meta.url)), 'utf8');
  const builds = [['other', join(root, '.build')], ['this', fileURLToPath(new URL('..', import.meta.url))]] as const;
  const t: Record<string, { cpu: number[]; wall: number[]; say: string }> = { other: { cpu: [], wall: [], say: '' }, this: { cpu: [], wall: [], say: '' } };
  for (let k = 0; k < repeat; k++) {
    for (const [who, dir] of builds) {
      const fit = (await import(pathToFileURL(join(dir, 'src/lab/fit.js')).href)).fitCase as typeof import('../src/lab/fit.js').fitCase;
      const pc = (await import(pathToFileURL(join(dir, 'src/case/index.js')).href)).parseCase as typeof parseCase;
      const rl = (await import(pathToFileURL(join(dir, 'src/lab/import.js')).href)).readLabCurve as typeof import('../src/lab/import.js').readLabCurve;
      const c0 = cpu(), w0 = now();
      const r = await fit(pc(text, 'fit-demo.yaml'), [rl(lab)], { params: ['E', 'ft', 'GF'], workers: 2 });
      t[who]!.cpu.push(cpu() - c0); t[who]!.wall.push(now() - w0);
      const v = r.material as unknown as Record<string, number>;
      t[who]!.say = `${r.evaluations} simulations, E ${v.E?.toFixed(0)} MPa, ft ${v.ft?.toFixed(3)} MPa, GF ${v.GF?.toFixed(4)} N/mm, RMSE ${(100 * r.objective).toFixed(2)} % of the peak`;
      console.log(`  three-parameter fit (${who}, round ${k + 1}): CPU ${t[who]!.cpu[k]!.toFixed(1)} s, wall ${t[who]!.wall[k]!.toFixed(1)} s, ${t[who]!.say}`);
    }
  }
  const o = t.other!, m = t.this!;
  console.log(`three-parameter fit, medians of ${repeat}: this CPU ${median(m.cpu).toFixed(1)} s, wall ${median(m.wall).toFixed(1)} s; other CPU ${median(o.cpu).toFixed(1)} s, wall ${median(o.wall).toFixed(1)} s; ratio CPU ×${(median(m.cpu) / median(o.cpu)).toFixed(2)}, wall ×${(median(m.wall) / median(o.wall)).toFixed(2)}`);
  console.log(`  this:  ${m.say}\n  other: ${o.say}`);
}

const args = process.argv.slice(2);
const mi = args.indexOf('--matrix');
const ri = args.indexOf('--repeat');
const repeat = ri >= 0 ? Math.max(1, Number(args[ri + 1]) || 3) : 3;
const opt = (name: string, d: number) => { const i = args.indexOf(name); return i >= 0 ? Math.max(1, Number(args[i + 1]) || d) : d; };
const ai = args.indexOf('--against');
const fitOnly = args.includes('--fit-only');
/** `--steps adaptive|fixed`: this build's step control in --against runs (default: each case's own). */
const si = args.indexOf('--steps');
const thisSteps = si >= 0 && (args[si + 1] === 'adaptive' || args[si + 1] === 'fixed') ? { steps: args[si + 1] as 'adaptive' | 'fixed' } : {};
const withFit = fitOnly || args.includes('--fit');
if (args.includes('--help') || args.includes('-h')) {
  // the usage is this file's opening comment, kept in one place
  const src = readFileSync(fileURLToPath(new URL('../../cli/bench.ts', import.meta.url)), 'utf8');
  console.log(src.slice(0, src.indexOf('\nimport ')).replace(/^\/\/ ?/gm, ''));
} else if (args.includes('--frames')) {
  await benchFrames(repeat, ai >= 0 ? args[ai + 1] : undefined);
} else if (args.includes('--order')) {
  benchOrder(repeat);
  await benchGrowthOrders(repeat);
} else if (mi >= 0) {
  const file = args[mi + 1];
  if (!file) { process.stderr.write('rupta bench: --matrix needs a Matrix Market file\n'); process.exit(2); }
  const dir = ai >= 0 ? args[ai + 1] : undefined;
  if (ai >= 0 && !dir) { process.stderr.write('rupta bench: --against needs a folder holding another build of rupta (.build/)\n'); process.exit(2); }
  await matrixFile(file, repeat, dir);
} else if (ai >= 0) {
  const dir = args[ai + 1];
  if (!dir) { process.stderr.write('rupta bench: --against needs a folder holding another build of rupta (.build/)\n'); process.exit(2); }
  if (args.includes('--examples')) await againstExamples(dir, repeat);
  else await against(dir, repeat);
} else if (args.includes('--study')) {
  await benchStudy(opt('--variants', 16), opt('--jobs', 2), args.includes('--slurm'));
} else if (args.includes('--validation')) {
  validationBench();
} else if (args.includes('--sif')) {
  await sifElastic(repeat);
} else if (args.includes('--join')) {
  await joined(repeat);
} else {
  console.log(`rupta benchmark (medians of ${repeat} runs; this machine is shared, compare ratios)`);
  if (!args.includes('--no-plates')) {
    const driver = cholmodDriver();
    if (typeof driver === 'string') console.log(`SuiteSparse reference skipped: ${driver}`);
    for (const d of [10_000, 50_000, 100_000, 200_000]) elastic(d, repeat, driver);
  }
  if (!args.includes('--no-sif')) { await sifElastic(repeat); await brittle(Math.min(repeat, 2)); }
  if (!args.includes('--no-growth')) { await growth(Math.min(repeat, 2)); await joined(repeat); }
  validationBench();
  benchOrder(repeat);
  await benchGrowthOrders(repeat);
}
