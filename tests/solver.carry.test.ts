// A new topology's bulk matrix copied from the last one where the mesh did not change
// (solver/carry.ts): the same matrix, entry for entry, as a full assembly of the new mesh, and
// the same curve from a growth run. Exact agreement is the check: every copied entry is the
// same sum of the same element matrices, and a fresh row adds its cells in the same order.
import { describe, expect, it } from 'vitest';
import { elasticMatrix } from '../src/vem/material.js';
import { System, ElementCache, carryStats, type PairGeom, type DrivenDofs } from '../src/solver/system.js';
import { compactOfStable } from '../src/solver/carry.js';
import { WorkMesh } from '../src/fracture/workmesh.js';
import { Analysis } from '../src/fracture/analysis.js';
import { meshCase } from '../src/run.js';
import { makeLaw } from '../src/cohesive/laws.js';
import { gridMesh } from './support/grid.js';
import { coarseBeam } from './support/beam.js';

const D = elasticMatrix(30000, 0.2, 'plane-stress');

/** A System of the work mesh as it is, with face pairs given on stable ids, taking element matrices from cache. */
function systemOf(wm: WorkMesh, cache: ElementCache, pairs: [number, number][]): System {
  const cp = wm.toPolyMesh(), co = cp.compactOf;
  const geom: PairGeom = {
    plus: Int32Array.from(pairs.map((p) => co[p[0]])), minus: Int32Array.from(pairs.map((p) => co[p[1]])),
    nx: Float64Array.from(pairs.map(() => 0)), ny: Float64Array.from(pairs.map(() => 1)), area: Float64Array.from(pairs.map(() => 5)),
  };
  const none = new Int32Array(0), noneF = new Float64Array(0);
  const driven: DrivenDofs = { fixed: Int32Array.from([0, 1, 2 * co[3] + 1]), load: none, loadW: noneF, gauge: none, gaugeW: noneF };
  return new System(cp.mesh, D, 10, geom, driven, undefined, { cache, cellKey: cp.cellOf, vertexId: cp.vertexOf });
}

/** The tangent with the face pairs at a small opening (their 4×4 blocks placed through the pair map). */
function tangent(sys: System): Float64Array {
  const u = new Float64Array(sys.nDof);
  for (let i = 0; i < u.length; i++) u[i] = 1e-4 * Math.sin(i);
  const coh = { law: makeLaw('linear', 3, 0.1), penalty: 1e6, beta: 1 }, np = sys.pairs.plus.length;
  sys.internal(u, coh, new Float64Array(np), new Float64Array(np), new Float64Array(sys.nDof), true, 0);
  return sys.kT.values.slice();
}

describe('bulk rows carried between topologies', () => {
  it('compactOfStable inverts the compact → stable map', () => {
    expect(Array.from(compactOfStable(Int32Array.from([4, 0, 2]), 6))).toEqual([1, -1, 2, -1, 0, -1]);
  });

  it('equals a full assembly after cells are split, moved and removed and the compact mesh is renumbered', () => {
    const wm = WorkMesh.fromPolyMesh(gridMesh(0, 0, 40, 30, 4, 3));
    const cache = new ElementCache();
    systemOf(wm, cache, [[6, 7]]);
    // cell 0 goes (vertex 0 leaves the mesh and every compact id shifts), cell 5 is split
    // about a new vertex into four triangles, a vertex of cell 10 moves
    const [a, b, c, d] = wm.cells[5]!;
    wm.cells[0] = null; wm.cells[5] = null;
    wm.x.push(15); wm.y.push(15);
    const m = wm.x.length - 1;
    for (const [p, q] of [[a, b], [b, c], [c, d], [d, a]]) { wm.cells.push([p, q, m]); wm.family.push(-1); wm.cracked.push(false); }
    wm.x[18] += 0.5;
    const pairs: [number, number][] = [[11, 12], [m, 8]];
    const carried = systemOf(wm, cache, pairs);
    const full = systemOf(wm, new ElementCache(), pairs);
    expect(Array.from(carried.kBulk.rowPtr)).toEqual(Array.from(full.kBulk.rowPtr));
    expect(Array.from(carried.kBulk.colIdx)).toEqual(Array.from(full.kBulk.colIdx));
    expect(Array.from(carried.kBulk.values)).toEqual(Array.from(full.kBulk.values));
    expect(Array.from(tangent(carried))).toEqual(Array.from(tangent(full)));
    // and the cache holds the new topology's cells, so a third topology carries from it
    wm.x[17] -= 0.25;
    const third = systemOf(wm, cache, pairs), thirdFull = systemOf(wm, new ElementCache(), pairs);
    expect(Array.from(third.kBulk.values)).toEqual(Array.from(thirdFull.kBulk.values));
    expect(cache.entries.size).toBe(wm.cells.filter((x) => x).length);
  });

  it('gives the same curve on a coarse growth run as assembling every topology in full', async () => {
    const c = coarseBeam({ seed: 2, tip: 3, target: 0.2, increments: 20 });
    carryStats.fresh = 0; carryStats.rows = 0;
    const carried = await new Analysis(c, meshCase(c).mesh).run(() => {});
    // the carried path ran, and assembled only a part of the rows afresh
    expect(carryStats.fresh).toBeGreaterThan(0);
    expect(carryStats.fresh).toBeLessThan(0.5 * carryStats.rows);
    const full = await new Analysis(c, meshCase(c).mesh, { carryRows: false }).run(() => {});
    expect(carried.status).toBe('complete');
    expect(carried.rows.length).toBeGreaterThan(10);
    expect(carried.crackPaths[0].length).toBeGreaterThan(5);
    expect(carried.rows).toEqual(full.rows);
  });
});
