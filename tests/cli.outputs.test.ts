// The run folder as a user gets it from the command line: version, mesh then run, frames of one
// size, exports that parse, the redraw command, and the size of the demo's output.
import { mkdtempSync, readFileSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { ROOT, coarseDemoYaml, ensureBuilt, rupta } from './support/cli.js';

const tmp = mkdtempSync(join(tmpdir(), 'rupta-outputs-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));
const run = join(tmp, 'run');
// the coarse demo with the demo's own output settings (PNG frames at its width, the cap, a GIF)
const demoOutput = (parse(readFileSync(join(ROOT, 'cases', 'beam-3pb-demo.yaml'), 'utf8')) as { output: Record<string, unknown> }).output;
let meshOut = '', checkOut = '', runCode = -1, runErr = '';

beforeAll(async () => {
  ensureBuilt();
  writeFileSync(join(tmp, 'beam.yaml'), coarseDemoYaml((c) => { c.output = { ...demoOutput }; }));
  const m = await rupta(['mesh', 'beam.yaml', '--out', run], tmp);
  meshOut = m.stdout;
  checkOut = (await rupta(['check', 'beam.yaml'], tmp)).stdout;
  const r = await rupta(['run', 'beam.yaml', '--out', run, '--quiet'], tmp, 300_000);
  runCode = r.code; runErr = r.stderr;
}, 400_000);

const dirSize = (d: string): number => readdirSync(d, { withFileTypes: true })
  .reduce((s, e) => s + (e.isDirectory() ? dirSize(join(d, e.name)) : statSync(join(d, e.name)).size), 0);

/** DXF group pairs (code, value) of a whole file. */
function dxfPairs(text: string): [number, string][] {
  const lines = text.split('\n');
  if (lines[lines.length - 1] === '') lines.pop();
  expect(lines.length % 2).toBe(0);
  const out: [number, string][] = [];
  for (let i = 0; i < lines.length; i += 2) {
    expect(lines[i].trim(), `group code on line ${i + 1}`).toMatch(/^\d+$/);
    out.push([Number(lines[i]), lines[i + 1]]);
  }
  return out;
}

describe('the command line around a run', () => {
  it('prints its version', async () => {
    const v = await rupta(['--version'], tmp);
    expect(v.code).toBe(0);
    expect(v.stdout.trim()).toBe((JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8')) as { version: string }).version);
  });

  it('runs into a folder that holds only the mesh picture, and check and mesh count the same dofs', () => {
    expect(runErr).toBe('');
    expect(runCode).toBe(0);
    const dofs = (s: string) => /the run starts with (\d+) dofs, (\d+) of them free/.exec(s)?.slice(1);
    expect(dofs(meshOut)).toBeDefined();
    expect(dofs(meshOut)).toEqual(dofs(checkOut));
  });

  it('writes frames of one size, at most output.maxFrames, and names the version and the case hash', async () => {
    const pngs = readdirSync(join(run, 'frames')).filter((f) => f.endsWith('.png'));
    expect(pngs.length).toBeGreaterThan(5);
    expect(pngs.length).toBeLessThanOrEqual(demoOutput.maxFrames as number);
    const sizes = new Set<string>();
    for (const f of pngs) { const m = await sharp(join(run, 'frames', f)).metadata(); sizes.add(`${m.width}x${m.height}`); }
    expect([...sizes]).toEqual([`${demoOutput.pngWidth}x${[...sizes][0].split('x')[1]}`]);
    const info = JSON.parse(readFileSync(join(run, 'case.json'), 'utf8')) as { rupta: string; caseHash: { sha256: string; of: string } };
    expect(info.caseHash.of).toBe('case file');
    const html = readFileSync(join(run, 'report.html'), 'utf8');
    expect(html).toContain(info.caseHash.sha256);
    expect(html).toContain(`rupta ${info.rupta}`);
  });

  it('exports the crack paths as CSV and as an R12 DXF of polylines that parse back to the same points', () => {
    const summary = JSON.parse(readFileSync(join(run, 'summary.json'), 'utf8')) as { crackPaths: [number, number][][] };
    expect(summary.crackPaths.length).toBeGreaterThan(0);
    const csv = readFileSync(join(run, 'cracks.csv'), 'utf8').trim().split('\n');
    expect(csv[0]).toBe('crack,point,x_mm,y_mm');
    const rows = csv.slice(1).map((l) => l.split(',').map(Number));
    expect(rows).toHaveLength(summary.crackPaths.reduce((s, p) => s + p.length, 0));
    for (const [c, k, x, y] of rows) {
      expect(x).toBeCloseTo(summary.crackPaths[c - 1][k][0], 6);
      expect(y).toBeCloseTo(summary.crackPaths[c - 1][k][1], 6);
    }
    const pairs = dxfPairs(readFileSync(join(run, 'cracks.dxf'), 'utf8'));
    expect(pairs.find(([c, v]) => c === 1 && v === 'AC1009')).toBeDefined();
    expect(pairs[pairs.length - 1]).toEqual([0, 'EOF']);
    expect(pairs.filter(([c, v]) => c === 0 && v === 'SECTION')).toHaveLength(pairs.filter(([c, v]) => c === 0 && v === 'ENDSEC').length);
    // read the polylines back: layer, closed flag, vertices
    const lines: { layer: string; closed: boolean; pts: number[][] }[] = [];
    let cur: { layer: string; closed: boolean; pts: number[][] } | null = null, where: 'poly' | 'vertex' | null = null;
    for (const [c, v] of pairs) {
      if (c === 0) {
        if (v === 'POLYLINE') { cur = { layer: '', closed: false, pts: [] }; lines.push(cur); where = 'poly'; }
        else if (v === 'VERTEX') { expect(cur).not.toBeNull(); cur!.pts.push([NaN, NaN]); where = 'vertex'; }
        else if (v === 'SEQEND') { cur = null; where = null; }
        else where = null;
      } else if (cur && where === 'poly') {
        if (c === 8) cur.layer = v;
        if (c === 70) cur.closed = (Number(v) & 1) === 1;
      } else if (cur && where === 'vertex') {
        if (c === 10) cur.pts[cur.pts.length - 1][0] = Number(v);
        if (c === 20) cur.pts[cur.pts.length - 1][1] = Number(v);
      }
    }
    const outline = lines.filter((l) => l.layer === 'OUTLINE');
    expect(outline).toHaveLength(1);
    expect(outline[0].closed).toBe(true);
    expect(outline[0].pts).toEqual([[0, 0], [440, 0], [440, 100], [0, 100]]);
    const cracks = lines.filter((l) => l.layer === 'CRACKS');
    expect(cracks).toHaveLength(summary.crackPaths.length);
    cracks.forEach((l, i) => {
      expect(l.pts).toHaveLength(summary.crackPaths[i].length);
      l.pts.forEach((p, k) => { expect(p[0]).toBeCloseTo(summary.crackPaths[i][k][0], 6); expect(p[1]).toBeCloseTo(summary.crackPaths[i][k][1], 6); });
    });
  });

  it('redraws the frames byte for byte on a worker thread and this one (the run drew them on one), with the animation and the report', async () => {
    const before = new Map<string, Buffer>();
    for (const f of readdirSync(join(run, 'frames'))) if (f.endsWith('.png')) before.set(f, readFileSync(join(run, 'frames', f)));
    for (const f of before.keys()) rmSync(join(run, 'frames', f));
    rmSync(join(run, 'report.html'));
    const r = await rupta(['redraw', run, '--workers', '2'], tmp, 300_000);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout).toContain(`redrew ${before.size} frames`);
    for (const [f, bytes] of before) expect(readFileSync(join(run, 'frames', f)).equals(bytes), f).toBe(true);
    expect(statSync(join(run, 'report.html')).size).toBeGreaterThan(1000);
    const bad = await rupta(['redraw', join(tmp, 'nowhere')], tmp);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/^rupta: the run folder .* does not exist\n$/);
  });

  it('keeps the output of the coarse demo with the demo output settings well under 10 MB', () => {
    // the coarse run has as many frames as the demo (both reach the frame cap), on smaller meshes
    const mb = dirSize(run) / 1e6;
    expect(mb).toBeLessThan(10);
  });

  it('gathers a comparison written into the run folder into its report', async () => {
    const r = await rupta(['compare', run, join(ROOT, 'cases', 'fit-demo-lab.csv')], tmp, 120_000);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain('and report.html again');
    const html = readFileSync(join(run, 'report.html'), 'utf8');
    expect(html).toContain('<h2>Comparison with measurements</h2>');
    expect(html).toContain('id="stepper"'); // the frames stay in the page
  });
});
