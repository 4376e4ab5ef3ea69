// A series of specimens: statistics in compare (hand-computed), the ±1 SD band and specimen
// ids in the picture and the report section. (The fit of a synthetic series is in lab.fit.test.ts.)
import { describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { compareCurves, compareJson, compareSvg, compareTable, meanBand, specimenLabels, stat, type RunCurve } from '../src/lab/compare.js';
import { compareSectionHtml } from '../src/lab/report.js';
import type { LabCurve } from '../src/lab/import.js';

const f64 = (a: number[]) => Float64Array.from(a);
// three triangles: peaks 900, 1000, 1100 N at openings 0.1, 0.1, 0.2 mm, all back to zero at 1 mm
const tri = (name: string, id: string, P: number, xp: number): LabCurve => ({
  name, specimen: id, x: f64([0, xp, 1]), y: f64([0, P, 0]), xLabel: 'displacement', yLabel: 'load', xUnit: 'mm', yUnit: 'N', xKind: 'displacement', notes: [],
});
const labs = [tri('a.csv', 'B-1', 900, 0.1), tri('b.csv', 'B-2', 1000, 0.1), tri('c.csv', 'B-3', 1100, 0.2)];
const run: RunCurve = { load: f64([0, 1000, 0]), displacement: f64([0, 0.1, 1]), cmod: null, title: 'prediction', ligamentArea_mm2: 1000 };

describe('series statistics in compare (hand computations, sample SD with n − 1)', () => {
  const r = compareCurves(run, labs);

  it('mean, SD and CoV of the peak: 1000 ± 100 N, 10 %', () => {
    expect(r.series!.n).toBe(3);
    expect(r.series!.peak_N!.mean).toBeCloseTo(1000, 9);
    expect(r.series!.peak_N!.sd).toBeCloseTo(100, 9);
    expect(r.series!.peak_N!.cov).toBeCloseTo(0.1, 9);
  });

  it('opening at peak: 0.1333 ± 0.0577 mm', () => {
    expect(r.series!.openingAtPeak_mm!.mean).toBeCloseTo(0.4 / 3, 9);
    expect(r.series!.openingAtPeak_mm!.sd).toBeCloseTo(Math.sqrt((2 * (0.1 - 0.4 / 3) ** 2 + (0.2 - 0.4 / 3) ** 2) / 2), 9);
  });

  it('work of fracture: the triangles\' areas 450, 500, 550 N·mm, and GF over the 1000 mm² ligament', () => {
    expect(r.series!.workOfFracture_Nmm!.mean).toBeCloseTo(500, 9);
    expect(r.series!.workOfFracture_Nmm!.sd).toBeCloseTo(50, 9);
    expect(r.series!.GF_Nmm!.mean).toBeCloseTo(0.5, 9);
  });

  it('the table prints the series line; the picture has the band and the specimen ids in its legend', () => {
    expect(compareTable(r)).toMatch(/series of 3 specimens \(mean ± 1 SD, n − 1\): peak 1000\.0 ± 100\.0 N \(CoV 10\.0 %\)/);
    const svg = compareSvg(r);
    expect(svg).toMatch(/class="series band" data-label="±1 SD of specimens"/);
    for (const id of ['B-1', 'B-2', 'B-3']) expect(svg).toContain(`>${id}</text>`);
  });

  it('the report section (from compare.json as written) has a row per specimen and the series line', () => {
    const html = compareSectionHtml(JSON.parse(JSON.stringify(compareJson(r))));
    for (const id of ['B-1', 'B-2', 'B-3', 'mean of specimens']) expect(html).toContain(`<td>${id}</td>`);
    expect(html).toContain('<td>3 specimens, mean ± 1 SD</td><td>1000.0 ± 100.0 (CoV 10.0 %)</td>');
  });

  it('a specimen id used twice is told apart by its file name; a file without id goes by its name', () => {
    expect(specimenLabels([tri('a.csv', 'X', 1, 0.1), tri('b.csv', 'X', 1, 0.1), { ...tri('c.csv', 'Y', 1, 0.1), specimen: null }])).toEqual(['X (a.csv)', 'X (b.csv)', 'c.csv']);
  });

  it('the band at the common openings: SD of 900, 1000, 1100 N at 0.1 mm is 100 N', () => {
    const b = meanBand(labs.map((l) => ({ x: l.x, y: l.y })), 11);
    expect(b.x[1]).toBeCloseTo(0.1, 12);
    // at 0.1 mm: 900, 1000 and the third triangle half way up, 550 N
    expect(b.y[1]).toBeCloseTo((900 + 1000 + 550) / 3, 9);
    expect(b.sd[1]).toBeCloseTo(stat([900, 1000, 550])!.sd, 9);
  });
});
