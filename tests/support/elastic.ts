// Elastic solves for tests: a prescribed displacement field on chosen vertices (all others
// free), through the same System and Newton path as a run (displacement control, λ = 1).
import type { PolyMesh } from '../../src/mesh/polymesh.js';
import { System } from '../../src/solver/system.js';
import { NewtonWork, solveStep } from '../../src/solver/newton.js';
import { boundaryVertices } from '../../src/solver/driven.js';
import { buildDomain } from '../../src/geometry/domain.js';
import { generateMesh } from '../../src/mesh/generate.js';
import { parseCase } from '../../src/case/index.js';

export type Field = (x: number, y: number) => [number, number];

/** Solve with u = exact(x) on the boundary vertices (or on `held`), return the full displacement. */
export function solvePrescribed(m: PolyMesh, D: Float64Array, t: number, exact: Field, held?: Uint8Array): Float64Array {
  const on = held ?? boundaryVertices(m);
  const load: number[] = [], w: number[] = [];
  for (let v = 0; v < on.length; v++) {
    if (!on[v]) continue;
    const u = exact(m.xy[2 * v], m.xy[2 * v + 1]);
    load.push(2 * v, 2 * v + 1); w.push(u[0], u[1]);
  }
  const sys = new System(m, D, t, { plus: new Int32Array(0), minus: new Int32Array(0), nx: new Float64Array(0), ny: new Float64Array(0), area: new Float64Array(0) },
    { fixed: new Int32Array(0), load: Int32Array.from(load), loadW: Float64Array.from(w), gauge: new Int32Array(0), gaugeW: new Float64Array(0) });
  const work = new NewtonWork(sys);
  const st = { uf: new Float64Array(sys.nFree), lambda: 0 };
  const r = solveStep(sys, null, new Float64Array(0), new Float64Array(0), 'displacement', 1, st, { maxIter: 3, tolF: 1e-9, tolG: 1e-12, floor: 0 }, work);
  if (!r.converged) throw new Error(`elastic solve failed: ${r.reason}`);
  return work.u.slice();
}

/** A graded Voronoi mesh of a rectangle (with optional probe points that become vertices). */
export function rectangleMesh(w: number, h: number, size: number, seed: number, lloyd = 8, extra = ''): PolyMesh {
  const c = parseCase(`
format: 1
units: mm-N-MPa
thickness: 1
geometry: {outline: [[0,0],[${w},0],[${w},${h}],[0,${h}]]${extra}}
material: {E: 1000, nu: 0.3, ft: 1, GF: 0.1}
supports: [{at: [0,0], fix: xy}, {at: [${w},0], fix: y}]
loads: [{at: [${w},${h}], direction: [0, 1]}]
control: {target: 1}
mesh: {size: ${size}, tipSize: ${size}, refineRadius: ${size}, seed: ${seed}, lloyd: ${lloyd}}
`, 'mesh.yaml');
  return generateMesh(buildDomain(c), c.mesh);
}
