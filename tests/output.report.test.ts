import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { fieldSvg, meshSvg } from '../src/output/field.js';
import { svgToPng } from '../src/output/png.js';
import { curveSvg, specimenSymbols } from '../src/output/runfiles.js';
import { workOfFractureEstimate } from '../src/output/warnings.js';
import { CAUTION, chooseFrames, crackAngle, externalReferences, inlineSvg, reportHtml, writeReport, type FrameFile, type ReportData } from '../src/output/report.js';
import { fixtureCase, fixtureRun } from './output.fixture.js';

const dir = mkdtempSync(join(tmpdir(), 'rupta-report-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const STEPS = 7;
const c = fixtureCase();
const run = fixtureRun(STEPS);
const base: ReportData = {
  c, result: run.result, initialMesh: run.mesh, curveSvg: curveSvg(c, run.result.rows),
  timings: { mesh: 0.25, solve: 1.25, total: 3.5 }, workOfFracture: workOfFractureEstimate(c, run.result),
  generatedAt: new Date(Date.UTC(2026, 0, 2, 3, 4)), strip: [],
};
const html = reportHtml(base);

/** The text of the results-table row with this id, tags removed. */
function rowText(page: string, id: string): string {
  const m = new RegExp(`<tr id="${id}">(.*?)</tr>`, 's').exec(page);
  expect(m, id).not.toBeNull();
  return m![1].replace(/<[^>]+>/g, ' ').replace(/\s+/g, ' ').trim();
}

describe('reportHtml', () => {
  it('holds the results table with peak, openings at peak, GF estimate, crack length and angle', () => {
    expect(html).toContain('<table id="results">');
    expect(rowText(html, 'peak-load')).toBe('Peak load 2.00 kN (step 3, the first maximum of the curve)');
    expect(html).toMatch(/Load-point displacement at peak<\/th><td>0\.045 mm/);
    expect(html).toMatch(/CMOD at peak<\/th><td>0\.03 mm/);
    // work of fracture over the ligament (RILEM TC 50-FMC 1985): W0 = 140 − 5 N·mm (the elastic energy
    // still stored taken off), A = (100 − 25)·50 mm²
    expect(rowText(html, 'gf')).toMatch(/^G F estimate \(work \/ ligament area, a lower bound\) 0\.036 N\/mm, 32\.7 % of the input G F/);
    expect(rowText(html, 'crack-length')).toBe('Final crack length 35.0 mm');
    // straight up from a vertical notch: 90° from +x, on the notch line (symmetry, common practice)
    expect(rowText(html, 'crack-angle')).toBe('Crack angle 90.0° from +x, start to tip, 0.0° off the notch line');
  });

  it('summarises the model: geometry, material with l_ch, mesh and dof counts, run time', () => {
    // l_ch = E·GF/ft² = 32000 · 0.11 / 3.1² (Hillerborg, Modéer, Petersson 1976)
    expect(rowText(html, 'lch')).toBe('Characteristic length l ch = E·G F /f t ² 366.3 mm');
    for (const s of ['400 mm × 100 mm', '50 mm thick, plane stress', '(200, 0) to (200, 25) mm: 25 mm long, 2 mm wide', 'E = 32000 MPa, ν = 0.2',
      '64 polygons, 85 vertices', '170 initial, 190 final, 190 at most', 'crack-mouth opening to 0.2 mm in 20 increments']) expect(html, s).toContain(s);
    expect(rowText(html, 'run-time')).toBe('Whole run 3.50 s');
    expect(html).toContain('2026-01-02 03:04 UTC');
  });

  it('states the caution, and warns when the run did not complete', () => {
    expect(html).toContain(`These ${CAUTION}.`);
    expect(CAUTION).toBe('predictions are model results that support, never replace, physical testing and design checks under the local codes by a licensed engineer');
    expect(html).not.toContain('id="status-note"');
    const stopped = reportHtml({ ...base, result: { ...run.result, status: 'stopped', reason: 'step 8 did not converge <badly>' } });
    expect(stopped).toContain('id="status-note"');
    expect(stopped).toContain('step 8 did not converge &lt;badly&gt;');
  });

  it('is self-contained: no outside address anywhere, the curve inline without namespace and with its own ids', () => {
    expect(html).not.toContain('http');
    expect(externalReferences(html)).toEqual([]);
    expect(html).not.toMatch(/<script/i);
    expect(html).toMatch(/<figure id="curve"><svg /);
    expect(html).toContain('id="curve-panel-1"');
    expect(html).toContain('clip-path="url(#curve-p1-plot-area)"');
    expect(html).toContain('Fixture beam &lt;F-1&gt; &amp; co');
    // the checker itself finds what it should
    expect(externalReferences('<img src="http://x/y.png"><a href="notes.txt">n</a><a href="#top">t</a><div style="background:url(data:,)"></div>')).toEqual(['http://x/y.png', 'notes.txt']);
  });

  it('reports a run without crack growth or gauge plainly', () => {
    const flat = fixtureRun(0, { gauge: false });
    const page = reportHtml({ ...base, result: flat.result, curveSvg: null, workOfFracture: null });
    expect(rowText(page, 'crack-angle')).toBe('Crack angle — (no crack grew)');
    expect(page).toMatch(/CMOD at peak<\/th><td>— \(no gauge\)/);
    expect(page).not.toContain('id="curve"');
    const elastic = reportHtml({ ...base, c: fixtureCase({}, { crack: undefined }), result: flat.result, curveSvg: null, workOfFracture: null, finalPicture: 'data:,' });
    expect(rowText(elastic, 'crack-angle')).toBe('Crack angle — (elastic analysis)');
    expect(elastic).toMatch(/<figcaption>Last step: major principal stress over the tensile strength, deformed shape magnified as stated\.<\/figcaption>/);
  });
});

describe('report helpers', () => {
  it('measures crack angles counter-clockwise from +x', () => {
    expect(crackAngle([[0, 0], [1, 1]])).toBeCloseTo(45, 12);
    expect(crackAngle([[0, 0], [3, 1], [-1, 0]])).toBeCloseTo(180, 12);
    expect(crackAngle([[0, 0]])).toBeNull();
  });
  it('picks evenly spaced frames with the peak, skipping the unloaded state', () => {
    const frames: FrameFile[] = Array.from({ length: 30 }, (_, i) => ({ step: i }));
    const pick = chooseFrames(frames, { ...run.result, peak: { ...run.result.peak, step: 13 } }, 6).map((f) => f.step);
    expect(pick[0]).toBe(1);
    expect(pick[pick.length - 1]).toBe(29);
    expect(pick).toContain(13);
    expect(pick.length).toBeLessThanOrEqual(6);
    expect(chooseFrames(frames.slice(0, 3), run.result, 6).map((f) => f.step)).toEqual([0, 1, 2]);
  });
  it('makes SVG fit for inlining', () => {
    const s = inlineSvg('<?xml version="1.0"?>\n<svg xmlns="http://www.w3.org/2000/svg" width="10" height="5" viewBox="0 0 10 5"><g id="a" clip-path="url(#b)"/></svg>', 'k-', 'A & B');
    expect(s).toBe('<svg viewBox="0 0 10 5" role="img" aria-label="A &amp; B" style="width:100%;height:auto"><g id="k-a" clip-path="url(#k-b)"/></svg>');
  });
});

describe('writeReport', () => {
  const path = join(dir, 'report.html');
  beforeAll(async () => {
    const frames: FrameFile[] = [];
    for (const k of [1, 3, 5, 7]) {
      const s = run.events[k].snapshot();
      const svg = fieldSvg({ mesh: s.mesh, values: Float64Array.from({ length: s.cellStress.length / 3 }, (_, i) => s.cellStress[3 * i] / 3.1), valueLabel: 'σ₁ / ft',
        range: [-1, 1], diverging: true, displacement: s.u, cracks: s.cracks, cohesive: s.cohesive, ...specimenSymbols(c), caption: [`Step ${k}.`], widthPx: 1000 });
      const f: FrameFile = { step: k, svg: join(dir, `step-${k}.svg`) };
      writeFileSync(f.svg!, svg);
      // one frame only as PNG, to take the other road
      if (k === 5) { f.png = join(dir, `step-${k}.png`); await svgToPng(svg, f.png, 600); f.svg = undefined; }
      frames.push(f);
    }
    await writeReport(path, { ...base, frames, finalSvg: null, meshSvg: meshSvg(run.mesh, { ...specimenSymbols(c), title: 'mesh' }) });
  }, 20000);

  it('embeds every frame to step through, 900 px wide or as wide as a smaller PNG, the last one shown first', async () => {
    const page = readFileSync(path, 'utf8');
    const data = JSON.parse(/<script type="application\/json" id="stepper-data">(.*?)<\/script>/s.exec(page)![1]) as { step: number; src: string; caption: string }[];
    expect(data.map((f) => f.step)).toEqual([1, 3, 5, 7]);
    const widths = await Promise.all(data.map(async (f) => (await sharp(Buffer.from(f.src.replace(/^data:image\/png;base64,/, ''), 'base64')).metadata()).width));
    expect(widths).toEqual([900, 900, 600, 900]);
    expect(data[1].caption).toBe('Step 3: 2.00 kN, CMOD 0.030 mm, crack 15.0 mm');
    expect(page).toContain(`<img id="stepper-frame" src="${data[3].src}"`);
    expect(page).toMatch(/<figure id="mesh-picture"><svg [^>]*aria-label="Initial mesh"/);
    expect(page).toContain('id="mesh-cells"');
    expect(page).not.toContain('http');
    expect(externalReferences(page)).toEqual([]);
  });

  const chromium = '/usr/bin/chromium';
  const have = existsSync(chromium);
  if (!have) console.warn(`skipping the headless-browser check of report.html: ${chromium} is absent (Debian package "chromium")`);
  const browse = (url: string, what: string[]): { status: number | null; stderr: string; stdout: string } => {
    const profile = mkdtempSync(join(tmpdir(), 'rupta-chromium-'));
    try {
      const r = spawnSync(chromium, ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update',
        '--disable-sync', '--no-first-run', `--user-data-dir=${profile}`, '--enable-logging=stderr', '--v=0', ...what, url], { encoding: 'utf8', timeout: 20000 });
      return { status: r.status, stderr: r.stderr ?? '', stdout: r.stdout ?? '' };
    } finally { rmSync(profile, { recursive: true, force: true }); }
  };
  const consoleLines = (stderr: string): string[] => stderr.split('\n').filter((l) => /:CONSOLE[:(]/.test(l));

  it.skipIf(!have)(`renders in headless Chromium with no console messages${have ? '' : ` (skipped: ${chromium} is absent)`}`, async () => {
    const dom = browse(`file://${path}`, ['--dump-dom']);
    expect(dom.status).toBe(0);
    expect(consoleLines(dom.stderr)).toEqual([]);
    expect(dom.stdout).toContain('<table id="results">');
    expect(dom.stdout).toContain('curve-panel-2');
    // the detector hears a page that does log
    const bad = join(dir, 'bad.html');
    writeFileSync(bad, '<!DOCTYPE html><html><head><meta charset="utf-8"><link rel="icon" href="data:,"></head><body><script>console.error("boom")</script></body></html>');
    expect(consoleLines(browse(`file://${bad}`, ['--dump-dom']).stderr).join('\n')).toContain('boom');
    // and the page is drawn: a screenshot of the top holds ink, not a blank sheet
    const shot = join(dir, 'shot.png');
    const s = browse(`file://${path}`, ['--window-size=1000,1400', `--screenshot=${shot}`]);
    expect(s.status).toBe(0);
    const { data, info } = await sharp(shot).raw().toBuffer({ resolveWithObject: true });
    let ink = 0;
    for (let k = 0; k < data.length; k += info.channels) if (data[k] + data[k + 1] + data[k + 2] < 450) ink++;
    expect(ink / (info.width * info.height)).toBeGreaterThan(0.01);
  }, 60000);
});
