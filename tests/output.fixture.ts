// A small made-up run (case, snapshots, result) for the output tests, without the solver.
import { caseFromData, type CaseModel } from '../src/case/index.js';
import type { AnalysisResult, CohesiveSegment, Snapshot, StepEvent, StepRow } from '../src/fracture/analysis.js';
import { cellCentroid, cellCount, vertexCount, type PolyMesh } from '../src/mesh/polymesh.js';
import { gridMesh } from './support/grid.js';

export function fixtureCase(output: Record<string, unknown> = {}, extra: Record<string, unknown> = {}): CaseModel {
  return caseFromData({
    format: 1, title: 'Fixture beam <F-1> & co', units: 'mm-N-MPa', thickness: 50,
    geometry: { outline: [[0, 0], [400, 0], [400, 100], [0, 100]], notches: [{ from: [200, 0], to: [200, 25], width: 2 }] },
    material: { E: 32000, nu: 0.2, ft: 3.1, GF: 0.11, softening: 'bilinear' },
    supports: [{ at: [25, 0], fix: 'y' }, { at: [375, 0], fix: 'xy' }],
    loads: [{ at: [200, 100], direction: [0, -1] }],
    control: { by: 'cmod', gauge: { from: [199, 0], to: [201, 0] }, target: 0.2, increments: 20 },
    crack: { start: 'notch-tips', growthStep: 5 },
    mesh: { size: 25, tipSize: 25 },
    output: { frames: ['svg', 'png'], every: 1, animation: 'gif', vtk: false, pngWidth: 320, ...output },
    ...extra,
  }, 'fixture');
}

/** Load rising to a peak at step 3, then softening; the crack grows 5 mm per step straight up from the notch tip. */
export function fixtureRun(steps: number, opts: { gauge?: boolean } = {}): { mesh: PolyMesh; events: StepEvent[]; result: AnalysisResult } {
  const gauge = opts.gauge ?? true;
  const mesh = gridMesh(0, 0, 400, 100, 16, 4);
  const nv = vertexCount(mesh), nc = cellCount(mesh);
  const rows: StepRow[] = [];
  const events: StepEvent[] = [];
  const cen = [0, 0];
  for (let k = 0; k <= steps; k++) {
    const F = k <= 3 ? (2000 * k) / 3 : 2000 * Math.exp(-(k - 3) / 3);
    const a = 5 * k;
    const row: StepRow = {
      step: k, control: 0.01 * k, load_N: k === 0 ? 0 : F, displacement_mm: 0.015 * k, cmod_mm: gauge ? 0.01 * k : null,
      crack_length_mm: a, tip_x_mm: 200, tip_y_mm: 25 + a, external_work_Nmm: 20 * k, elastic_energy_Nmm: 5, dissipated_Nmm: 20 * k - 5, iterations: 3,
    };
    rows.push(row);
    const u = new Float64Array(2 * nv), cs = new Float64Array(3 * nc);
    for (let v = 0; v < nv; v++) {
      const x = mesh.xy[2 * v], y = mesh.xy[2 * v + 1];
      u[2 * v] = 1e-4 * k * (x - 200) * (y - 50) / 100;
      u[2 * v + 1] = -1e-3 * k * Math.sin((Math.PI * x) / 400);
    }
    for (let c = 0; c < nc; c++) {
      cellCentroid(mesh, c, cen);
      cs[3 * c] = (F / 2000) * 3.1 * (50 - cen[1]) / 50 * Math.exp(-Math.abs(cen[0] - 200) / 150);
      cs[3 * c + 1] = 0.1; cs[3 * c + 2] = 0.05 * (cen[0] - 200) / 200;
    }
    const cohesive: CohesiveSegment[] = [];
    for (let s = 0; s < k; s++) cohesive.push({ x1: 200, y1: 25 + 5 * s, x2: 200, y2: 30 + 5 * s, damage: k > 1 ? 1 - s / (k - 1) : 0.5 });
    const cracks: Snapshot['cracks'] = [{ kind: 'notch', points: [[200, 0], [200, 25]] }];
    if (k > 0) cracks.push({ kind: 'crack', points: [[200, 25], [200, 25 + a]] });
    const snap: Snapshot = { step: k, mesh, u, cellStress: cs, cracks, cohesive, row };
    events.push({ row, probes: [], tips: [], snapshot: () => snap });
  }
  let ip = 0;
  rows.forEach((r, i) => { if (r.load_N > rows[ip].load_N) ip = i; });
  const result: AnalysisResult = {
    status: 'complete', reason: 'control target reached', rows,
    peak: { load_N: rows[ip].load_N, displacement_mm: rows[ip].displacement_mm, cmod_mm: rows[ip].cmod_mm, step: ip },
    crackPaths: steps > 0 ? [[[200, 25], [200, 25 + 5 * steps]]] : [],
    dofs: { initial: 2 * nv, final: 2 * nv + 20, max: 2 * nv + 20 },
    mesh: { polygons: nc, vertices: nv },
    probes: [], timings_s: { solve: 1.25 },
  };
  return { mesh, events, result };
}
