// Gauges anywhere on the face: on an exact linear displacement field (the patch test of
// Beirão da Veiga et al. 2013: the first-order virtual element method reproduces it exactly)
// a gauge from a to b reads opening (u(b) − u(a))·e and sliding (u(b) − u(a))·e⊥, with e the
// unit vector from a to b and e⊥ = e turned 90° to the left.
import { describe, expect, it } from 'vitest';
import { parseCase } from '../src/case/index.js';
import { buildDomain } from '../src/geometry/domain.js';
import { generateMesh } from '../src/mesh/generate.js';
import { elasticMatrix } from '../src/vem/material.js';
import { selectDriven } from '../src/solver/driven.js';
import { GaugeReader } from '../src/output/gauges.js';
import { solvePrescribed } from './support/elastic.js';

const lin = (x: number, y: number): [number, number] => [1e-3 * (0.4 + 2 * x - 0.5 * y), 1e-3 * (-0.3 + 0.7 * x + 1.5 * y)];

const text = (control: string, gauges: string) => `
format: 1
units: mm-N-MPa
thickness: 1
geometry: {outline: [[0,0],[60,0],[60,30],[0,30]], notches: [{from: [30, 0], to: [30, 10], width: 2}]}
material: {E: 1000, nu: 0.3, ft: 1, GF: 0.1}
supports: [{at: [0,0], fix: xy}, {at: [60,0], fix: y}]
loads: [{at: [30,30], direction: [0, -1]}]
control: ${control}
gauges: ${gauges}
mesh: {size: 4, tipSize: 4, refineRadius: 4, seed: 5, lloyd: 4}
`;

const gauges = `[{name: inside, from: [12.3, 7.1], to: [41.9, 22.6]}, {name: across-notch, from: [27, 5], to: [33, 5]}, {name: edge-to-inside, from: [0, 15], to: [17.5, 20.25]}]`;

function exactReading(from: [number, number], to: [number, number]): { opening: number; sliding: number } {
  const ua = lin(...from), ub = lin(...to), L = Math.hypot(to[0] - from[0], to[1] - from[1]);
  const ex = (to[0] - from[0]) / L, ey = (to[1] - from[1]) / L, dx = ub[0] - ua[0], dy = ub[1] - ua[1];
  return { opening: dx * ex + dy * ey, sliding: dy * ex - dx * ey };
}

describe('gauges anywhere on the face', () => {
  const c = parseCase(text('{by: cmod, gauge: inside, reading: sliding, target: 0.1}', gauges), 'g.yaml');
  const m = generateMesh(buildDomain(c), c.mesh);
  const u = solvePrescribed(m, elasticMatrix(1000, 0.3, 'plane-stress'), 1, lin);

  it('read opening and sliding of an exact linear field (patch test)', () => {
    const rows = new GaugeReader(c.gauges!).read(m, u);
    expect(rows.map((r) => r.gauge)).toEqual(['inside', 'across-notch', 'edge-to-inside']);
    for (const [i, g] of c.gauges!.entries()) {
      const ex = exactReading(g.from, g.to);
      expect(Math.abs(rows[i].opening_mm - ex.opening)).toBeLessThan(1e-12);
      expect(Math.abs(rows[i].sliding_mm - ex.sliding)).toBeLessThan(1e-12);
      expect(Math.abs(ex.sliding)).toBeGreaterThan(1e-4); // the field does slide them
    }
  });

  it('control a run by a named gauge, reading its sliding', () => {
    const d = selectDriven(c, m, 1e-9);
    let g = 0;
    for (const q of d.gauge) g += q.w * u[2 * q.v + q.comp];
    expect(Math.abs(g - exactReading([12.3, 7.1], [41.9, 22.6]).sliding)).toBeLessThan(1e-12);
  });

  it('refuse an unknown gauge name, a point outside the specimen and a name used twice, in one sentence', () => {
    expect(() => parseCase(text('{by: cmod, gauge: mouth, target: 0.1}', gauges), 'g.yaml'))
      .toThrow('control.gauge must be {from, to} or the name of one of gauges (found "mouth"; the gauges are inside, across-notch, edge-to-inside)');
    expect(() => parseCase(text('{by: cmod, gauge: {from: [29.5, 3], to: [40, 3]}, target: 0.1}', '[]'), 'g.yaml'))
      .toThrow('control.gauge.from must be a point of the specimen in mm (found [29.5, 3], inside the cut of geometry.notches[0])');
    expect(() => parseCase(text('{target: 0.1}', '[{name: a, from: [1, 1], to: [70, 1]}]'), 'g.yaml'))
      .toThrow('gauges[0].to must be a point of the specimen in mm (found [70, 1], outside the specimen or in a hole)');
    expect(() => parseCase(text('{target: 0.1}', '[{name: a, from: [1, 1], to: [5, 1]}, {name: a, from: [1, 2], to: [5, 2]}]'), 'g.yaml'))
      .toThrow('gauges[1].name must be a name no other gauge uses (found "a" twice)');
  });
});
