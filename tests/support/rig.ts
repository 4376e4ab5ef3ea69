// Elastic solves of a whole case's rig (supports, platens, spreaders) through the same
// selection, System and Newton path as a run, for tests of boundary conditions.
import { parseCase } from '../../src/case/index.js';
import type { CaseModel } from '../../src/case/model.js';
import { buildDomain } from '../../src/geometry/domain.js';
import { generateMesh } from '../../src/mesh/generate.js';
import type { PolyMesh } from '../../src/mesh/polymesh.js';
import { selectDriven, compactDriven, type Driven } from '../../src/solver/driven.js';
import { System } from '../../src/solver/system.js';
import { NewtonWork, solveStep } from '../../src/solver/newton.js';
import { elasticMatrix } from '../../src/vem/material.js';

export interface RigSolve { c: CaseModel; mesh: PolyMesh; driven: Driven; sys: System; u: Float64Array; f: Float64Array; load: number; lambda: number }

/** Mesh the case and solve it elastically at the control target (displacement or force control). */
export function solveRig(text: string, mesh?: PolyMesh): RigSolve {
  const c = parseCase(text, 'rig.yaml');
  const m = mesh ?? generateMesh(buildDomain(c), c.mesh);
  const nv = m.xy.length >> 1;
  let x0 = Infinity, x1 = -Infinity;
  for (let i = 0; i < m.xy.length; i++) { x0 = Math.min(x0, m.xy[i]); x1 = Math.max(x1, m.xy[i]); }
  const driven = selectDriven(c, m, 1e-6 * (x1 - x0));
  const co = Int32Array.from({ length: nv }, (_, i) => i);
  const empty = { plus: new Int32Array(0), minus: new Int32Array(0), nx: new Float64Array(0), ny: new Float64Array(0), area: new Float64Array(0) };
  const sys = new System(m, elasticMatrix(c.material.E, c.material.nu, c.model), c.thickness, empty, compactDriven(driven, co));
  const work = new NewtonWork(sys);
  const st = { uf: new Float64Array(sys.nFree), lambda: 0 };
  const kind = c.control.by === 'force' ? 'force' : 'displacement';
  const r = solveStep(sys, null, new Float64Array(0), new Float64Array(0), kind, c.control.target, st,
    { maxIter: 4, tolF: 1e-9 * c.material.E, tolG: 1e-12 * c.control.target, floor: 0 }, work);
  if (!r.converged) throw new Error(`elastic solve failed: ${r.reason}`);
  return { c, mesh: m, driven, sys, u: work.u.slice(), f: work.f.slice(), load: sys.loadForce(work.f), lambda: st.lambda };
}

/** Vertices within r of p. */
export function near(m: PolyMesh, p: [number, number], r: number): number[] {
  const out: number[] = [];
  for (let v = 0; v < m.xy.length >> 1; v++) if (Math.hypot(m.xy[2 * v] - p[0], m.xy[2 * v + 1] - p[1]) <= r) out.push(v);
  return out;
}
