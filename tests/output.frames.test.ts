import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { RunFiles, curveSvg } from '../src/output/runfiles.js';
import { curveInsetSvg } from '../src/output/inset.js';
import { plotPanelsSvg } from '../src/output/plot.js';
import { fixtureCase, fixtureRun } from './output.fixture.js';
import { evenlySpaced, strideFor } from '../src/output/frames.js';
import { redrawRun } from '../src/output/redraw.js';
import { allNodes, byId, parseXml, textOf, texts, type XmlNode } from './output.xml.js';

const dir = mkdtempSync(join(tmpdir(), 'rupta-frames-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const STEPS = 7;
const c = fixtureCase({ vtk: true });
const run = fixtureRun(STEPS);
let summary: Record<string, unknown>;

beforeAll(async () => {
  const files = new RunFiles(dir, c, { force: true });
  for (const e of run.events) files.step(e);
  summary = await files.finish(run.result, { meshSeconds: 0.1, totalSeconds: 2, initialMesh: run.mesh, final: run.events[STEPS].snapshot() });
}, 30000);

const frame = (k: number): string => join(dir, 'frames', `step-${String(k).padStart(4, '0')}`);

/** Last point of a path's data, in px. */
function lastPoint(d: string): [number, number] {
  const m = [...d.matchAll(/[ML]([-\d.]+) ([-\d.]+)/g)].pop()!;
  return [Number(m[1]), Number(m[2])];
}

describe('frames of a run', () => {
  it('writes one SVG and one PNG per step, each SVG well formed with every layer', () => {
    const names = readdirSync(join(dir, 'frames'));
    expect(names.filter((f) => f.endsWith('.svg'))).toHaveLength(STEPS + 1);
    expect(names.filter((f) => f.endsWith('.png'))).toHaveLength(STEPS + 1);
    const root = parseXml(readFileSync(frame(5) + '.svg', 'utf8'));
    for (const id of ['title', 'cells', 'undeformed', 'mesh', 'outline', 'cracks', 'cohesive', 'supports', 'loads', 'colorbar', 'damagebar', 'scalebar', 'caption', 'inset']) {
      expect(byId(root, id), id).toBeDefined();
    }
    // mesh lines drawn, notch and crack both present, a support symbol per support and an arrow per load
    expect(byId(root, 'mesh')!.children).toHaveLength(1);
    expect(allNodes(byId(root, 'cracks')!).filter((e) => e.attrs.class === 'notch')).toHaveLength(1);
    expect(allNodes(byId(root, 'cracks')!).filter((e) => e.attrs.class === 'crack')).toHaveLength(1);
    expect(allNodes(byId(root, 'supports')!).filter((e) => /support/.test(e.attrs.class ?? ''))).toHaveLength(2);
    expect(allNodes(byId(root, 'loads')!).filter((e) => e.attrs.class === 'load')).toHaveLength(1);
    // cohesive segments shaded by damage from 0 (tip) to 1 (mouth): more than one damage level
    expect(allNodes(byId(root, 'cohesive')!).filter((e) => /^damage-/.test(e.attrs.class ?? '')).length).toBeGreaterThan(1);
  });

  it('labels the colour bar, the scale bar, the inset axes and the caption', () => {
    const t = texts(parseXml(readFileSync(frame(5) + '.svg', 'utf8')));
    for (const s of ['σ₁ / ft', 'cohesive damage', 'CMOD (mm)', 'Load (N)', '50 mm', 'Fixture beam &lt;F-1&gt; &amp; co']) expect(t, s).toContain(s);
    const caption = t.join('\n');
    expect(caption).toMatch(/Step 5: load 1\.03 kN, load-point displacement 0\.0750 mm, CMOD 0\.0500 mm, crack length 25\.0 mm\./);
    expect(caption).toMatch(/Displacements magnified ×\d+/);
  });

  it('marks the current step at the end of the inset curve, and the inset grows with the run', () => {
    const inset = (k: number): XmlNode => byId(parseXml(readFileSync(frame(k) + '.svg', 'utf8')), 'inset')!;
    for (const k of [2, 5, STEPS]) {
      const g = inset(k), nodes = allNodes(g);
      const curve = nodes.find((e) => e.attrs.class === 'inset-curve')!;
      const dot = nodes.find((e) => e.attrs.class === 'current')!;
      expect(curve.attrs.d.split('L')).toHaveLength(k + 1); // steps 0..k
      const [x, y] = lastPoint(curve.attrs.d);
      expect(Math.abs(Number(dot.attrs.cx) - x)).toBeLessThan(0.1);
      expect(Math.abs(Number(dot.attrs.cy) - y)).toBeLessThan(0.1);
    }
    // the dot of step 3 (the peak) is higher on the page than that of the softened step 7
    const cy = (k: number): number => Number(allNodes(inset(k)).find((e) => e.attrs.class === 'current')!.attrs.cy);
    expect(cy(3)).toBeLessThan(cy(STEPS));
  });

  it('renders every PNG frame at output.pngWidth', async () => {
    for (const k of [0, 3, STEPS]) {
      const m = await sharp(frame(k) + '.png').metadata();
      expect(m.format).toBe('png');
      expect(m.width).toBe(320);
    }
  });

  it('joins the frames into a GIF with one page per frame and a held last frame', async () => {
    const m = await sharp(join(dir, 'animation.gif'), { animated: true }).metadata();
    expect(m.format).toBe('gif');
    expect(m.pages).toBe(STEPS + 1);
    expect(m.width).toBe(320);
    expect(m.delay![STEPS]).toBeGreaterThan(m.delay![0]);
  });

  it('draws the GIF pages with the frames: a frame narrower than the animation is its page pixel for pixel', async () => {
    const gif = await sharp(join(dir, 'animation.gif'), { pages: -1 }).removeAlpha().raw().toBuffer({ resolveWithObject: true });
    const page = gif.info.width * gif.info.pageHeight! * 3;
    for (const k of [0, 4, STEPS]) {
      const png = await sharp(frame(k) + '.png').removeAlpha().raw().toBuffer({ resolveWithObject: true });
      expect([png.info.width, png.info.height]).toEqual([gif.info.width, gif.info.pageHeight]);
      expect(Buffer.compare(png.data, gif.data.subarray(k * page, (k + 1) * page)), `page ${k}`).toBe(0);
    }
  });

  it('writes the VTK series and the summary alongside', () => {
    expect(readdirSync(join(dir, 'vtk')).filter((f) => f.endsWith('.vtu'))).toHaveLength(STEPS + 1);
    expect(existsSync(join(dir, 'vtk', 'steps.pvd'))).toBe(true);
    expect(summary.status).toBe('complete');
  });
});

describe('steady frames', () => {
  it('gives every frame the same pixel size, one magnification and the inset axes of the whole run', async () => {
    const sizes = new Set<string>(), mags = new Set<string>(), ticks = new Set<string>();
    for (let k = 0; k <= STEPS; k++) {
      const m = await sharp(frame(k) + '.png').metadata();
      sizes.add(`${m.width}x${m.height}`);
      const root = parseXml(readFileSync(frame(k) + '.svg', 'utf8'));
      sizes.add(`svg ${root.attrs.width}x${root.attrs.height}`);
      mags.add(texts(byId(root, 'caption')!).find((t) => /magnified/.test(t))!);
      ticks.add(texts(byId(root, 'inset')!).join('|'));
    }
    expect(sizes.size).toBe(2); // one PNG size and one SVG size
    expect(mags.size).toBe(1);
    expect(ticks.size).toBe(1);
    // the rest of the run is drawn faint ahead of the current step
    expect(allNodes(byId(parseXml(readFileSync(frame(2) + '.svg', 'utf8')), 'inset')!).some((e) => e.attrs.class === 'inset-rest')).toBe(true);
  });

  it('caps the frames at output.maxFrames, evenly spaced, the last step always among them, and keeps little step data', async () => {
    const d = join(dir, 'capped');
    const cc = fixtureCase({ frames: ['png'], maxFrames: 5, animation: 'none', pngWidth: 200 });
    const r = fixtureRun(30);
    const files = new RunFiles(d, cc, { force: true });
    for (const e of r.events) files.step(e);
    await files.finish(r.result, { meshSeconds: 0, totalSeconds: 1, initialMesh: r.mesh, final: r.events[30].snapshot() });
    const names = readdirSync(join(d, 'frames'));
    const steps = names.filter((f) => f.endsWith('.png')).map((f) => Number(f.slice(5, 9))).sort((a, b) => a - b);
    expect(steps.length).toBeLessThanOrEqual(5);
    expect(steps[0]).toBe(0);
    expect(steps[steps.length - 1]).toBe(30);
    const gaps = steps.slice(1).map((k, i) => k - steps[i]);
    for (const g of gaps.slice(0, -1)) expect(g).toBe(gaps[0]);
    expect(gaps[gaps.length - 1]).toBeLessThanOrEqual(gaps[0]);
    expect(names.filter((f) => f.endsWith('.bin')).length).toBeLessThanOrEqual(2 * 5 + 1);
  });

  it('thins stored states by doubling the stride and spaces the drawn frames evenly', () => {
    expect(strideFor(10, 1, 40)).toBe(1);
    expect(strideFor(80, 1, 40)).toBe(2);
    expect(strideFor(79, 1, 40)).toBe(1);
    expect(strideFor(500, 3, 10)).toBe(48);
    expect(evenlySpaced([0, 2, 4, 6, 8, 10, 12], 4)).toEqual([0, 4, 8, 12]);
    expect(evenlySpaced([0, 2, 4, 6, 8, 10, 11], 4)).toEqual([0, 4, 8, 11]);
    expect(evenlySpaced([0, 2, 4, 6, 8, 10, 11], 3)).toEqual([0, 6, 11]);
    expect(evenlySpaced([0, 1, 2], 5)).toEqual([0, 1, 2]);
  });

  it('redraws frames byte for byte, with the animation and the report, from the run folder alone', async () => {
    const before = new Map<string, Buffer>();
    for (const f of readdirSync(join(dir, 'frames'))) if (/\.(png|svg)$/.test(f)) before.set(f, readFileSync(join(dir, 'frames', f)));
    rmSync(join(dir, 'report.html'));
    rmSync(join(dir, 'animation.gif'));
    for (const f of before.keys()) rmSync(join(dir, 'frames', f));
    const r = await redrawRun(dir);
    expect(r.frames).toBe(STEPS + 1);
    for (const [f, bytes] of before) expect(readFileSync(join(dir, 'frames', f)).equals(bytes), f).toBe(true);
    expect(existsSync(join(dir, 'animation.gif'))).toBe(true);
    expect(readFileSync(join(dir, 'report.html'), 'utf8')).toContain('Fixture beam');
  });
});

describe('curve pictures', () => {
  it('puts load–displacement and load–CMOD side by side, each with the peak marked', async () => {
    const root = parseXml(readFileSync(join(dir, 'curve.svg'), 'utf8'));
    for (const id of ['title', 'panel-1', 'panel-2', 'p1-axes', 'p1-series', 'p1-marks', 'p2-axes', 'p2-series', 'p2-marks']) expect(byId(root, id), id).toBeDefined();
    expect(texts(byId(root, 'panel-1')!)).toContain('Load-point displacement (mm)');
    expect(texts(byId(root, 'panel-2')!)).toContain('CMOD (mm)');
    for (const p of ['p1-marks', 'p2-marks']) expect(textOf(byId(root, p)!)).toBe('peak 2.00 kN');
    // clip paths stay distinct per panel
    const clips = allNodes(root).filter((e) => e.name === 'clipPath').map((e) => e.attrs.id);
    expect(new Set(clips).size).toBe(2);
    expect((await sharp(join(dir, 'curve.png')).metadata()).width).toBe(320);
  });

  it('overlays further curves with a legend, on the CMOD panel by default', () => {
    const lab = { label: 'lab B2', x: [0, 0.03, 0.06], y: [0, 1900, 1200], style: 'points' as const };
    const root = parseXml(curveSvg(c, run.result.rows, [lab]));
    expect(texts(byId(root, 'p2-legend')!)).toEqual(['rupta prediction', 'lab B2']);
    expect(byId(root, 'p1-legend')!.children).toHaveLength(0);
    const both = parseXml(curveSvg(c, run.result.rows, { displacement: [lab], cmod: [lab] }));
    expect(texts(byId(both, 'p1-legend')!)).toContain('lab B2');
  });

  it('draws one panel against load-point displacement without a gauge', () => {
    const root = parseXml(curveSvg(c, fixtureRun(5, { gauge: false }).result.rows));
    expect(byId(root, 'panel-2')).toBeUndefined();
    expect(texts(root)).toContain('Load-point displacement (mm)');
    expect(texts(root)).not.toContain('CMOD (mm)');
    expect(textOf(byId(root, 'marks')!)).toBe('peak 2.00 kN');
  });

  it('lays out any number of panels in one well-formed picture', () => {
    const p = { series: [{ label: 'a', x: [0, 1], y: [0, 1] }], xLabel: 'x (mm)', yLabel: 'F (N)' };
    const root = parseXml(plotPanelsSvg({ panels: [p, p, p], widthPx: 1500 }));
    expect(root.attrs.width).toBe('1500');
    expect(allNodes(root).filter((e) => e.attrs.class === 'panel')).toHaveLength(3);
  });
});

describe('curveInsetSvg', () => {
  it('keeps the axes from a known opening range and copes with a single point', () => {
    const g = parseXml(curveInsetSvg({ x: [0, 0.1], y: [0, 500], xLabel: 'CMOD (mm)', yLabel: 'Load (N)', xMax: 1 }, 0, 0, 300, 180, 1));
    expect(texts(g)).toContain('1.0');
    const one = parseXml(curveInsetSvg({ x: [0], y: [0], xLabel: 'a', yLabel: 'b' }, 10, 10, 300, 180, 1));
    expect(allNodes(one).some((e) => e.attrs.class === 'current')).toBe(true);
  });
});

describe('other output settings', () => {
  it('makes a WebP animation from PNG-only frames', async () => {
    const d = join(dir, 'webp');
    const cw = fixtureCase({ frames: ['png'], animation: 'webp', pngWidth: 200 });
    const r = fixtureRun(3);
    const files = new RunFiles(d, cw, { force: true });
    for (const e of r.events) files.step(e);
    await files.finish(r.result, { meshSeconds: 0, totalSeconds: 1, initialMesh: r.mesh, final: r.events[3].snapshot() });
    expect(readdirSync(join(d, 'frames')).filter((f) => !f.endsWith('.bin')).sort()).toEqual(['step-0000.png', 'step-0001.png', 'step-0002.png', 'step-0003.png']);
    const m = await sharp(join(d, 'animation.webp'), { animated: true }).metadata();
    expect(m.format).toBe('webp');
    expect(m.pages).toBe(4);
    expect(m.width).toBe(200);
    expect(existsSync(join(d, 'animation.gif'))).toBe(false);
    expect(readFileSync(join(d, 'report.html'), 'utf8')).toMatch(/<div class="stepper" id="stepper">/);
  });

  it('writes VTK but no frames for an elastic analysis', async () => {
    const d = join(dir, 'elastic');
    const ce = fixtureCase({ vtk: true }, { crack: undefined });
    const r = fixtureRun(1);
    const files = new RunFiles(d, ce, { force: true });
    for (const e of r.events) files.step(e);
    await files.finish(r.result, { meshSeconds: 0, totalSeconds: 1, initialMesh: r.mesh, final: r.events[1].snapshot() });
    expect(existsSync(join(d, 'frames'))).toBe(false);
    expect(readdirSync(join(d, 'vtk')).sort()).toEqual(['step-0000.vtu', 'step-0001.vtu', 'steps.pvd']);
    expect(existsSync(join(d, 'report.html'))).toBe(true);
  });
});
