// Every template with its default options writes a case that validates, meshes and runs
// its first few load steps (steps of the shipped size, the run cut short, no pictures).
import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { caseFromData, parseCase } from '../src/case/index.js';
import { Analysis } from '../src/fracture/analysis.js';
import { LefmAnalysis } from '../src/fracture/lefm.js';
import { meshCase } from '../src/run.js';
import { templates } from '../src/templates/index.js';

const STEPS = 3;

describe.each(templates.map((t) => [t.name, t] as const))('template %s with its defaults', (name, t) => {
  const text = t.build({});

  it(`validates, meshes and runs ${STEPS} steps`, async () => {
    const full = parseCase(text, `${name}-example.yaml`);
    expect(full.crack, 'a crack section').toBeDefined();
    const raw = parse(text) as { control: { target: number; increments: number }; output: unknown };
    const step = raw.control.target / raw.control.increments;
    if (full.crack?.model !== 'lefm') { raw.control.target = STEPS * step; raw.control.increments = STEPS; }
    raw.output = { frames: [], animation: 'none', vtk: false };
    const c = caseFromData(raw, `${name}-short`);

    const { mesh } = meshCase(c);
    expect(mesh.cellStart.length - 1).toBeGreaterThan(50);
    // the brittle mode goes from critical state to critical state, not by control increments
    const lefm = c.crack?.model === 'lefm';
    const a = lefm ? new LefmAnalysis(c, mesh) : new Analysis(c, mesh);
    if (lefm) a.stopRequested = () => a.rows.length > STEPS;
    const res = await a.run(() => {});
    expect(res.status, res.reason).toBe(lefm ? 'interrupted' : 'complete');
    expect(res.rows.length).toBeGreaterThanOrEqual(STEPS + 1);
    const last = res.rows.at(-1)!;
    if (!lefm) expect(last.control).toBeCloseTo(STEPS * step, 9);
    expect(Math.abs(last.load_N)).toBeGreaterThan(0);
    for (const r of res.rows) expect(Number.isFinite(r.load_N) && Number.isFinite(r.external_work_Nmm), `step ${r.step}`).toBe(true);
    expect(res.probes.length).toBe(c.probes.length);
    for (const p of res.probes) expect(Number.isFinite(p.s1_MPa), p.probe).toBe(true);
  }, 60_000);
});
