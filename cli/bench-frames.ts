// npm run bench -- --frames [--against DIR]: processor time of the demo beam's analysis against
// that of its pictures (the frames, with a worker thread where drawFrames starts one, and the animation), side by side;
// with --against, the same by another build of rupta (a folder holding its compiled .build/), run
// alternately with this one so both meet the same load on this shared machine. The analysis is a
// run without frames or animation (mesh, solve and the small files); the pictures are drawn again
// from a finished run's folder. CPU time is the process's user + system time, worker threads
// included; figures are medians of --repeat, with the wall times beside them (which depend on the
// machine's load).
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { parseCase } from '../src/case/index.js';
import { runCase } from '../src/run.js';
import { drawFrames } from '../src/output/frames.js';
import { writeAnimation } from '../src/output/runfiles.js';

interface Build { parseCase: typeof parseCase; runCase: typeof runCase; drawFrames: typeof drawFrames; writeAnimation: typeof writeAnimation }

const median = (a: number[]): number => { const s = [...a].sort((x, y) => x - y); return s[s.length >> 1]; };
const cpu = (): number => { const u = process.cpuUsage(); return (u.user + u.system) / 1e6; };
const wall = (): number => performance.now() / 1000;

async function otherBuild(dir: string): Promise<Build> {
  const at = (f: string): string => pathToFileURL(join(resolve(dir), '.build', f)).href;
  return {
    parseCase: (await import(at('src/case/index.js'))).parseCase,
    runCase: (await import(at('src/run.js'))).runCase,
    drawFrames: (await import(at('src/output/frames.js'))).drawFrames,
    writeAnimation: (await import(at('src/output/runfiles.js'))).writeAnimation,
  };
}

/** One measurement by one build: analysis alone, then the pictures of a full run's folder. */
async function once(b: Build, text: string, full: string): Promise<{ analysis: number; frames: number; animation: number; count: number; wallAnalysis: number; wallPictures: number }> {
  const lean = b.parseCase(text.replace(/^output:.*$/m, 'output: {frames: [], animation: none}'), 'bench-demo.yaml');
  const dir = mkdtempSync(join(tmpdir(), 'rupta-bench-frames-'));
  try {
    let t = cpu(), w = wall();
    await b.runCase(lean, { out: dir, force: true });
    const analysis = cpu() - t, wallAnalysis = wall() - w;
    t = cpu(); w = wall();
    const frames = await b.drawFrames(full);
    const f = cpu() - t;
    t = cpu();
    await b.writeAnimation(full, b.parseCase(text, 'bench-demo.yaml'), frames);
    return { analysis, frames: f, animation: cpu() - t, count: frames.length, wallAnalysis, wallPictures: wall() - w };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

export async function benchFrames(repeat: number, against?: string): Promise<void> {
  const text = readFileSync(fileURLToPath(new URL('../../cases/beam-3pb-demo.yaml', import.meta.url)), 'utf8');
  const builds: [string, Build][] = [['this', { parseCase, runCase, drawFrames, writeAnimation }]];
  if (against) builds.unshift(['other', await otherBuild(against)]);
  // a finished run of each build to draw from (each build draws from its own run's folder)
  const folders = new Map<string, string>();
  for (const [who, b] of builds) {
    const dir = mkdtempSync(join(tmpdir(), 'rupta-bench-run-'));
    await b.runCase(b.parseCase(text, 'bench-demo.yaml'), { out: dir, force: true });
    folders.set(who, dir);
  }
  const t = new Map(builds.map(([who]) => [who, { analysis: [] as number[], frames: [] as number[], animation: [] as number[], count: 0, wallAnalysis: [] as number[], wallPictures: [] as number[] }]));
  for (let r = 0; r < repeat; r++) {
    for (const [who, b] of builds) {
      const m = await once(b, text, folders.get(who)!), s = t.get(who)!;
      s.analysis.push(m.analysis); s.frames.push(m.frames); s.animation.push(m.animation); s.count = m.count;
      s.wallAnalysis.push(m.wallAnalysis); s.wallPictures.push(m.wallPictures);
    }
  }
  console.log(`demo beam, CPU seconds (user + system, worker threads included), medians of ${repeat}${against ? `, run alternately with ${resolve(against)}` : ''}`);
  for (const [who] of builds) {
    const s = t.get(who)!, a = median(s.analysis), f = median(s.frames), g = median(s.animation);
    console.log(`  ${who.padEnd(5)} analysis ${a.toFixed(2)} s | pictures ${(f + g).toFixed(2)} s (${s.count} frames ${f.toFixed(2)} s, ${(1000 * f / s.count).toFixed(0)} ms each; animation ${g.toFixed(2)} s) | pictures / analysis ${((f + g) / a).toFixed(2)}`);
    const wa = median(s.wallAnalysis), wp = median(s.wallPictures);
    console.log(`        wall time: analysis ${wa.toFixed(2)} s | pictures ${wp.toFixed(2)} s | pictures / analysis ${(wp / wa).toFixed(2)}`);
  }
  if (against) {
    const o = t.get('other')!, m = t.get('this')!;
    console.log(`  this / other: frames ×${(median(m.frames) / median(o.frames)).toFixed(2)}, animation ×${(median(m.animation) / median(o.animation)).toFixed(2)}, pictures ×${((median(m.frames) + median(m.animation)) / (median(o.frames) + median(o.animation))).toFixed(2)}`);
  }
  for (const d of folders.values()) rmSync(d, { recursive: true, force: true });
}
