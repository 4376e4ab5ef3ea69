// Kirsch hole set-up shared by the order-1 and order-2 tests and the benchmark: a square patch of side 3a
// with the exact displacement (Kirsch 1898) on its outer edge and a traction-free hole.
import { elasticMatrix } from '../../src/vem/material.js';
import { cellAreas, cellStresses, recoveredVertexStresses } from '../../src/vem/stress.js';
import { cellCentroid, type PolyMesh } from '../../src/mesh/polymesh.js';
import { buildDomain } from '../../src/geometry/domain.js';
import { generateMesh } from '../../src/mesh/generate.js';
import { parseCase } from '../../src/case/index.js';
import { kirsch } from '../../src/vem/closedform.js';
import { stressAt2 } from '../../src/vem/system2.js';
import { solvePrescribed } from './elastic.js';
import { solvePrescribed2 } from './order2.js';

const E = 1000, NU = 0.25, S = 1, A = 1, CX = 1.5, SIDE = 3;
const C = elasticMatrix(E, NU, 'plane-stress'), exact = kirsch(S, A, CX, CX, E, NU);

export function plate(size: number): PolyMesh {
  const c = parseCase(`
format: 1
units: mm-N-MPa
thickness: 1
geometry:
  outline: [[0,0],[${SIDE},0],[${SIDE},${SIDE}],[0,${SIDE}]]
  holes: [{circle: {center: [${CX}, ${CX}], radius: ${A}}}]
material: {E: ${E}, nu: ${NU}, ft: 1, GF: 0.1}
supports: [{at: [0,0], fix: xy}, {at: [${SIDE},0], fix: y}]
loads: [{at: [${SIDE},${SIDE}], direction: [1, 0]}]
control: {target: 1}
probes: [{name: top, at: [${CX}, ${CX + A}]}, {name: bottom, at: [${CX}, ${CX - A}]}]
mesh: {size: ${size}, tipSize: ${size}, refineRadius: ${size}, seed: 4}
`, 'kirsch.yaml');
  return generateMesh(buildDomain(c), c.mesh);
}
const outer = (m: PolyMesh, v: number) => Math.min(m.xy[2 * v], m.xy[2 * v + 1], SIDE - m.xy[2 * v], SIDE - m.xy[2 * v + 1]) < 1e-9;
const nearest = (m: PolyMesh, x: number, y: number) => {
  let best = 0, bd = Infinity;
  for (let v = 0; v < m.xy.length / 2; v++) { const d = Math.hypot(m.xy[2 * v] - x, m.xy[2 * v + 1] - y); if (d < bd) { bd = d; best = v; } }
  return best;
};

/** Order 1: recovered vertex stress σxx at the top and bottom of the hole, averaged. */
export function concentration1(m: PolyMesh): { k: number; unknowns: number; solve_s: number } {
  const t0 = performance.now();
  const nv = m.xy.length / 2, held = new Uint8Array(nv);
  for (let v = 0; v < nv; v++) held[v] = outer(m, v) ? 1 : 0;
  const u = solvePrescribed(m, C, 1, exact, held), solve_s = (performance.now() - t0) / 1000;
  const cs = cellStresses(m, u, C), ar = cellAreas(m), nc = ar.length, cen = new Float64Array(2 * nc), tmp = [0, 0];
  for (let k = 0; k < nc; k++) { cellCentroid(m, k, tmp); cen[2 * k] = tmp[0]; cen[2 * k + 1] = tmp[1]; }
  const sv = recoveredVertexStresses(m, cs, ar, cen);
  const k = (sv[3 * nearest(m, CX, CX + A)] + sv[3 * nearest(m, CX, CX - A)]) / 2 / S;
  return { k, unknowns: 2 * (nv - held.reduce((a, b) => a + b, 0)), solve_s };
}

/** Order 2: σxx of the projection at the hole-edge vertex, averaged over its cells, top and bottom. */
export function concentration2(m: PolyMesh): { k: number; unknowns: number; solve_s: number } {
  const t0 = performance.now();
  const sol = solvePrescribed2(m, C, 1, exact, [0, 0], (e, L) => L.edgeCells[e] === 1 && outer(m, L.edgeVerts[2 * e]) && outer(m, L.edgeVerts[2 * e + 1]));
  const solve_s = (performance.now() - t0) / 1000;
  const s = [0, 0, 0];
  const at = (v: number) => {
    let sum = 0, cnt = 0;
    for (let c = 0; c < m.cellStart.length - 1; c++) for (let k = m.cellStart[c]; k < m.cellStart[c + 1]; k++) {
      if (m.cellVerts[k] !== v) continue;
      stressAt2(sol.field, c, C, m.xy[2 * v], m.xy[2 * v + 1], s); sum += s[0]; cnt++;
    }
    return sum / cnt;
  };
  return { k: (at(nearest(m, CX, CX + A)) + at(nearest(m, CX, CX - A))) / 2 / S, unknowns: sol.nFree, solve_s };
}

