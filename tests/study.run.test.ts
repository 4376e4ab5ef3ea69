// A seed study of a coarse beam through the local pool: one ordinary run folder per
// variant, study.csv with a row each, the band picture; and a study stopped part-way
// goes on with only the variants it had not finished.
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { stringify } from 'yaml';
import { runPool } from '../src/study/local.js';
import { collectVariant, studyCsv } from '../src/study/collect.js';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parse } from 'yaml';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ensureBuilt, coarseDemoYaml } from './support/cli.js';
import { studyFromData } from '../src/study/spec.js';
import { runStudy, type StudyEvent } from '../src/study/study.js';
import { externalReferences } from '../src/output/report.js';

let dir = '';
const base = () => parse(coarseDemoYaml((c) => { c.control.increments = 15; c.output.pngWidth = 400; })) as Record<string, unknown>;

beforeAll(() => {
  ensureBuilt();
  dir = mkdtempSync(join(tmpdir(), 'rupta-study-'));
}, 120_000);
afterAll(() => { if (dir) rmSync(dir, { recursive: true, force: true }); });

describe('rupta study on this machine', () => {
  it('runs a 4-seed study into four run folders, a 4-row study.csv and a band picture', async () => {
    const spec = studyFromData({ study: 1, title: 'Four seeds', case: base(), vary: { 'mesh.seed': [1, 2, 3, 4] } }, 'seeds', dir);
    const events: StudyEvent[] = [];
    const out = join(dir, 'seeds');
    const r = await runStudy(spec, { out, jobs: 2, onEvent: (e) => events.push(e), png: true });
    expect(r.counts.complete).toBe(4);
    for (const id of ['v0001', 'v0002', 'v0003', 'v0004']) {
      // an ordinary run folder: the pinned files of a run
      for (const f of ['curve.csv', 'summary.json', 'report.html']) expect(existsSync(join(out, 'runs', id, f)), `${id}/${f}`).toBe(true);
    }
    const csv = readFileSync(join(out, 'study.csv'), 'utf8').trimEnd().split('\n');
    expect(csv).toHaveLength(5);
    expect(csv[0]).toMatch(/^variant,mesh\.seed,status,peak_load_N,/);
    const peaks = csv.slice(1).map((l) => Number(l.split(',')[3]));
    // four meshes give four peaks of the same beam: all positive, close but not identical
    for (const p of peaks) expect(p).toBeGreaterThan(0);
    expect(new Set(peaks).size).toBe(4);
    expect(Math.max(...peaks) / Math.min(...peaks)).toBeLessThan(1.2);
    const band = readFileSync(join(out, 'band.svg'), 'utf8');
    expect(band.match(/class="curve"|class="series" data-label="variants/g)?.length).toBe(4);
    expect(band).toContain('class="band"');
    expect(existsSync(join(out, 'band.png'))).toBe(true);
    for (const f of ['paths.svg', 'peaks.svg', 'study.html']) expect(existsSync(join(out, f)), f).toBe(true);
    expect(events.filter((e) => e.kind === 'end')).toHaveLength(4);
    // one self-contained page: pictures inline, the only addresses are links to the variants' own reports
    const html = readFileSync(join(out, 'study.html'), 'utf8');
    expect(externalReferences(html).filter((a) => !/^runs\/v\d{4}\/report\.html$/.test(a))).toEqual([]);
    expect(html.match(/<svg\b/g)?.length).toBe(3);
    // a second start without --resume or --force is refused, with one sentence
    await expect(runStudy(spec, { out })).rejects.toThrow(/already holds a study: give --resume/);
  }, 300_000);

  it('goes on after an interruption with only the variants it had not finished', async () => {
    const spec = studyFromData({ study: 1, case: base(), vary: { 'mesh.seed': [5, 6, 7] } }, 'resume', dir);
    const out = join(dir, 'resume');
    let stop = false;
    const first: StudyEvent[] = [];
    const r1 = await runStudy(spec, { out, jobs: 1, png: false, onEvent: (e) => { first.push(e); if (e.kind === 'end') stop = true; }, stopRequested: () => stop });
    expect(r1.finished).toBe(false);
    expect(r1.rows[0]!.status).toBe('complete');
    expect(r1.rows.slice(1).some((x) => x.status === 'missing' || x.status === 'interrupted')).toBe(true);
    const kept = statSync(join(out, 'runs', 'v0001', 'summary.json')).mtimeMs;
    const second: StudyEvent[] = [];
    const r2 = await runStudy(spec, { out, jobs: 2, resume: true, png: false, onEvent: (e) => second.push(e) });
    expect(r2.counts.complete).toBe(3);
    const plan = second.find((e) => e.kind === 'plan');
    expect(plan).toMatchObject({ total: 3, kept: 1, toRun: 2 });
    expect(second.filter((e) => e.kind === 'start').map((e) => (e as { id: string }).id).sort()).toEqual(['v0002', 'v0003']);
    expect(statSync(join(out, 'runs', 'v0001', 'summary.json')).mtimeMs).toBe(kept);
    expect(readFileSync(join(out, 'study.csv'), 'utf8').trimEnd().split('\n')).toHaveLength(4);
  }, 300_000);

  it('records a variant that fails and goes on with the others', async () => {
    const out = join(dir, 'failing');
    for (const sub of ['cases', 'runs', 'logs']) mkdirSync(join(out, sub), { recursive: true });
    writeFileSync(join(out, 'cases', 'v0001.yaml'), stringify(base()));
    // a case the program refuses when the variant runs (no material), as a broken variant file would be
    const broken = base(); delete broken.material;
    writeFileSync(join(out, 'cases', 'v0002.yaml'), stringify(broken));
    const pool = runPool(out, [{ id: 'v0002', resume: false }, { id: 'v0001', resume: false }], 1, {});
    const ends = await pool.done;
    expect(ends.map((e) => [e.id, e.code])).toEqual([['v0002', 2], ['v0001', 0]]);
    const v = (id: string) => ({ index: 0, id, values: {}, data: {} });
    const bad = collectVariant(out, v('v0002'), 'refused');
    expect(bad.row.status).toBe('missing');
    expect(collectVariant(out, v('v0001')).row.status).toBe('complete');
    expect(studyCsv([bad.row])).toMatch(/^variant,status,.*\nv0002,missing,,.*,refused\n$/s);
    expect(readFileSync(join(out, 'logs', 'v0002.txt'), 'utf8')).toMatch(/^rupta: material/);
  }, 120_000);
});
