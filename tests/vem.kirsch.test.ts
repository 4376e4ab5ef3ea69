// Circular hole in a plate under uniaxial tension σ (Kirsch 1898): the hoop stress at the
// edge is σ(1 − 2 cos 2θ), so 3σ where the edge is parallel to the load. The exact field is
// imposed on the outer edge of a finite square patch; the hole is traction-free.
import { describe, expect, it } from 'vitest';
import { elasticMatrix } from '../src/vem/material.js';
import { cellAreas, cellStresses, recoveredVertexStresses } from '../src/vem/stress.js';
import { cellCentroid } from '../src/mesh/polymesh.js';
import { buildDomain } from '../src/geometry/domain.js';
import { generateMesh } from '../src/mesh/generate.js';
import { parseCase } from '../src/case/index.js';
import { solvePrescribed } from './support/elastic.js';

const E = 1000, NU = 0.25, S = 1, A = 1, C = 1.5, SIDE = 3;
const G = E / (2 * (1 + NU)), K = (3 - NU) / (1 + NU);

/** Kirsch displacement (plane stress), checked against the classical stress field by differentiation. */
function kirsch(x0: number, y0: number): [number, number] {
  const x = x0 - C, y = y0 - C, r = Math.hypot(x, y), t = Math.atan2(y, x);
  const ur = S / (8 * G) * (r * (K - 1) + 2 * A * A / r + 2 * (r + (K + 1) * A * A / r - A ** 4 / r ** 3) * Math.cos(2 * t));
  const ut = -S / (8 * G) * 2 * (r + (K - 1) * A * A / r + A ** 4 / r ** 3) * Math.sin(2 * t);
  return [ur * Math.cos(t) - ut * Math.sin(t), ur * Math.sin(t) + ut * Math.cos(t)];
}

function hoopAtTop(size: number, tip: number) {
  const c = parseCase(`
format: 1
units: mm-N-MPa
thickness: 1
geometry:
  outline: [[0,0],[${SIDE},0],[${SIDE},${SIDE}],[0,${SIDE}]]
  holes: [{circle: {center: [${C}, ${C}], radius: ${A}}}]
material: {E: ${E}, nu: ${NU}, ft: 1, GF: 0.1}
supports: [{at: [0,0], fix: xy}, {at: [${SIDE},0], fix: y}]
loads: [{at: [${SIDE},${SIDE}], direction: [1, 0]}]
control: {target: 1}
probes: [{name: top, at: [${C}, ${C + A}]}, {name: bottom, at: [${C}, ${C - A}]}]
mesh: {size: ${size}, tipSize: ${tip}, refineRadius: ${size}, seed: 4}
`, 'kirsch.yaml');
  const m = generateMesh(buildDomain(c), c.mesh);
  const nv = m.xy.length / 2, held = new Uint8Array(nv);
  for (let v = 0; v < nv; v++) {
    const x = m.xy[2 * v], y = m.xy[2 * v + 1];
    if (Math.min(x, y, SIDE - x, SIDE - y) < 1e-9) held[v] = 1;
  }
  const u = solvePrescribed(m, elasticMatrix(E, NU, 'plane-stress'), 1, kirsch, held);
  const D = elasticMatrix(E, NU, 'plane-stress'), cs = cellStresses(m, u, D), ar = cellAreas(m);
  const nc = ar.length, cen = new Float64Array(2 * nc), tmp = [0, 0];
  for (let k = 0; k < nc; k++) { cellCentroid(m, k, tmp); cen[2 * k] = tmp[0]; cen[2 * k + 1] = tmp[1]; }
  const sv = recoveredVertexStresses(m, cs, ar, cen);
  const at = (x: number, y: number) => {
    let best = 0, bd = Infinity;
    for (let v = 0; v < nv; v++) { const d = Math.hypot(m.xy[2 * v] - x, m.xy[2 * v + 1] - y); if (d < bd) { bd = d; best = v; } }
    return sv[3 * best]; // σxx = σθθ where the edge is parallel to the load
  };
  return (at(C, C + A) + at(C, C - A)) / 2;
}

describe('Kirsch hole (Kirsch 1898)', () => {
  it('the hole-edge stress concentration approaches 3 as the mesh is refined (a/h = 17, 33, 67), within 5 % on the finest', () => {
    // a small patch (side 3a) is enough: the exact field is imposed on its edge
    const k = [0.06, 0.03, 0.015].map((h) => hoopAtTop(h, h) / S);
    expect(Math.abs(k[2] - 3)).toBeLessThan(0.15);
    expect(Math.abs(k[2] - 3)).toBeLessThan(Math.abs(k[0] - 3) + 1e-3);
  });
});
