// The report takes up the comparisons and fits written into the run folder, read defensively.
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { RunFiles } from '../src/output/runfiles.js';
import { redrawRun, refreshRunReport } from '../src/output/redraw.js';
import { externalReferences } from '../src/output/report.js';
import { fixtureCase, fixtureRun } from './output.fixture.js';

const dir = mkdtempSync(join(tmpdir(), 'rupta-labsections-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

beforeAll(async () => {
  const c = fixtureCase({ frames: ['png'], animation: 'none', pngWidth: 200 });
  const r = fixtureRun(3);
  const files = new RunFiles(dir, c, { force: true });
  for (const e of r.events) files.step(e);
  await files.finish(r.result, { meshSeconds: 0, totalSeconds: 1, initialMesh: r.mesh, final: r.events[3].snapshot() });
  const row = (name: string, peak: number, err: number | null) => ({ name, peak_N: peak, peakError: err, openingAtPeak_mm: 0.03, openingError: err, rmse_N: 40, rmseRel: 0.021, areaRel: 0.05, range_mm: [0, 0.2], workOfFracture_Nmm: 500, GF_Nmm: 0.105, endLoadFraction: 0.05 });
  writeFileSync(join(dir, 'compare.json'), JSON.stringify({
    format: 1, title: 'Fixture', xAxis: 'cmod', xAxisReason: 'the measured column is a CMOD', ligamentArea_mm2: 3750,
    prediction: row('rupta prediction', 2000, null), specimens: [row('B-1', 1900, 0.0526), row('B-2', 2100, -0.0476)], mean: row('mean', 2000, 0),
    series: { n: 2, peak_N: { mean: 2000, sd: 141.4, cov: 0.0707, n: 2 }, openingAtPeak_mm: null, workOfFracture_Nmm: null, GF_Nmm: null },
    notes: ['a note <with> markup'],
  }));
  writeFileSync(join(dir, 'fit.json'), JSON.stringify({
    format: 1, status: 'fitted', reason: 'the optimiser closed', labNames: ['B-1', 'B-2'], xAxis: 'cmod', softening: 'bilinear', evaluations: 24, maxEvals: 40,
    objective: 0.012, startObjective: 0.09, table: [{ name: 'ft', unit: 'MPa', start: 3, fitted: 3.21, relStd: 0.02, wellDetermined: true }],
    warnings: [], notes: ['the ranges include the scatter over mesh seeds'], compliance: [{ mm_per_N: 2e-5, estimated: true }, { mm_per_N: 2e-5, estimated: true }],
  }));
  writeFileSync(join(dir, 'compare-old.json'), '{ not json');
  // a second comparison of its own, and both with a picture whose SVG carries ids of its own
  writeFileSync(join(dir, 'compare-B.json'), readFileSync(join(dir, 'compare.json')));
  const pic = '<svg xmlns="http://www.w3.org/2000/svg" width="20" height="10"><defs><clipPath id="plot-area"><rect width="20" height="10"/></clipPath></defs><g id="series" clip-path="url(#plot-area)"><path d="M0 0L20 10"/></g></svg>';
  writeFileSync(join(dir, 'compare.svg'), pic);
  writeFileSync(join(dir, 'compare-B.svg'), pic);
  await redrawRun(dir, { frames: false });
}, 60000);

it('writes the report again only in the folder of a finished run', async () => {
  expect(await refreshRunReport(dir)).toBe(true);
  expect(await refreshRunReport(join(dir, 'frames'))).toBe(false);
});

describe('report sections for comparisons and fits', () => {
  const page = () => readFileSync(join(dir, 'report.html'), 'utf8');
  it('shows the comparison table, the series statistics and the notes', () => {
    const p = page();
    expect(p).toContain('id="lab-compare"');
    expect(p).toMatch(/<td>B-1<\/td><td>1900\.0<\/td><td>\+5\.3 %<\/td>/);
    expect(p).toMatch(/<td>B-2<\/td><td>2100\.0<\/td><td>-4\.8 %<\/td>/);
    expect(p).toContain('2 specimens, mean ± 1 SD');
    expect(p).toContain('2000.0 ± 141.4 (CoV 7.1 %)');
    expect(p).toContain('a note &lt;with&gt; markup');
  });
  it('shows the fitted values with their spread and the status', () => {
    const p = page();
    expect(p).toContain('id="lab-fit"');
    expect(p).toContain('Fitted against B-1, B-2');
    expect(p).toMatch(/<td>ft<\/td><td>MPa<\/td><td>3<\/td><td>3\.21<\/td><td>±3\.9 %<\/td>/);
    expect(p).toContain('24 of at most 40 simulations');
    expect(p).toContain('From <code>fit.json</code>');
    expect(p).toContain('Machine compliance taken out of the crosshead: 0.0200 mm/kN (estimated), 0.0200 mm/kN (estimated).');
  });
  it('says in one line which file it could not read, and keeps the frames and the page self-contained', () => {
    const p = page();
    expect(p).toMatch(/compare-old\.json could not be read: /);
    expect(p.match(/<h2>Comparison with measurements<\/h2>/g)).toHaveLength(3); // one heading per file
    expect(p).toContain('id="stepper"');
    expect(externalReferences(p)).toEqual([]);
  });
});

it('gives every element of the page its own id when two comparisons share it', () => {
  const p = readFileSync(join(dir, 'report.html'), 'utf8');
  // the start tags' id attributes, outside scripts and styles
  const tags = p.replace(/<script\b[\s\S]*?<\/script>/gi, '').replace(/<style\b[\s\S]*?<\/style>/gi, '');
  const ids = [...tags.matchAll(/<[A-Za-z][^<>]*?\sid="([^"]*)"/g)].map((m) => m[1]);
  expect(ids).toContain('compare-table');
  expect(ids).toContain('compare-B-table');
  expect(ids).toContain('compare-B-picture-plot-area');
  const seen = new Map<string, number>();
  for (const id of ids) seen.set(id, (seen.get(id) ?? 0) + 1);
  expect([...seen].filter(([, n]) => n > 1)).toEqual([]);
  // references to the picture's ids follow them
  expect(tags).toContain('url(#compare-B-picture-plot-area)');
});
