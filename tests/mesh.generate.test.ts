import { polygonArea, polygonCentroid } from 'd3-polygon';
import { describe, expect, it } from 'vitest';
import { buildDomain, domainExtent } from '../src/geometry/domain.js';
import { generateMesh } from '../src/mesh/generate.js';
import { cellArea, cellCentroid, cellCount } from '../src/mesh/polymesh.js';
import { buildEdges, findVertices, meshStats, verticesOnSegment } from '../src/mesh/stats.js';
import { checkMesh, makeCase, testCases } from './mesh.helpers.js';

describe('generateMesh', () => {
  for (const name of Object.keys(testCases(1))) {
    it(`${name}: simple positive conforming cells that tile the domain, over several seeds`, () => {
      for (const seed of [1, 2, 3, 17, 4242]) {
        const c = testCases(seed)[name];
        const d = buildDomain(c);
        const m = generateMesh(d, c.mesh);
        expect(checkMesh(m, d), `${name} seed ${seed}`).toEqual([]);
        // areas and centroids agree with an independent reference library (d3-polygon), common practice
        let sum = 0;
        const g = [0, 0];
        for (let k = 0; k < cellCount(m); k++) {
          const ring: [number, number][] = [];
          for (let j = m.cellStart[k]; j < m.cellStart[k + 1]; j++) ring.push([m.xy[2 * m.cellVerts[j]], m.xy[2 * m.cellVerts[j] + 1]]);
          const a = cellArea(m, k);
          // d3-polygon measures area with y pointing down, so its sign is flipped
          expect(Math.abs(a + polygonArea(ring))).toBeLessThan(1e-9 * Math.abs(a));
          cellCentroid(m, k, g);
          const r = polygonCentroid(ring), L = Math.sqrt(a);
          expect(Math.hypot(g[0] - r[0], g[1] - r[1])).toBeLessThan(1e-8 * L);
          sum += a;
        }
        expect(Math.abs(sum - d.area) / d.area).toBeLessThan(1e-9);
        // named points are mesh vertices, exactly
        for (const p of d.points) expect(findVertices(m, p[0], p[1], 1e-9 * domainExtent(d)).length, `${name} point ${p}`).toBeGreaterThan(0);
      }
    });
  }

  it('is reproducible from the seed and changes with it', () => {
    const c1 = testCases(7).notched, d = buildDomain(c1);
    const a = generateMesh(d, c1.mesh), b = generateMesh(buildDomain(c1), c1.mesh);
    expect(a.xy).toEqual(b.xy);
    expect(a.cellStart).toEqual(b.cellStart);
    expect(a.cellVerts).toEqual(b.cellVerts);
    const c2 = testCases(8).notched, e = generateMesh(buildDomain(c2), c2.mesh);
    expect(e.xy.length === a.xy.length && e.xy.every((v, i) => v === a.xy[i])).toBe(false);
  });

  it('honours the size field: edges near the tip ≈ tipSize, far away ≈ size (within 1.5×, common practice)', () => {
    const c = makeCase({ outline: [[0, 0], [300, 0], [300, 150], [0, 150]], notches: [{ from: [150, 0], to: [150, 60], width: 2 }], size: 10, tipSize: 1.5, refineRadius: 15, seed: 3 });
    const d = buildDomain(c), m = generateMesh(d, c.mesh), E = buildEdges(m);
    let nl = 0, nn = 0, fl = 0, fn = 0;
    for (let e = 0; e < E.count; e++) {
      const a = E.edgeVerts[2 * e], b = E.edgeVerts[2 * e + 1];
      const mx = (m.xy[2 * a] + m.xy[2 * b]) / 2, my = (m.xy[2 * a + 1] + m.xy[2 * b + 1]) / 2;
      const l = Math.hypot(m.xy[2 * a] - m.xy[2 * b], m.xy[2 * a + 1] - m.xy[2 * b + 1]), r = Math.hypot(mx - 150, my - 60);
      if (r < 8) { nl += l; nn++; }
      if (r > 110 && mx > 15 && mx < 285 && my > 15 && my < 135) { fl += l; fn++; }
    }
    expect(nn).toBeGreaterThan(30);
    expect(nl / nn / 1.5).toBeGreaterThan(1 / 1.5);
    expect(nl / nn / 1.5).toBeLessThan(1.5);
    expect(fl / fn / 10).toBeGreaterThan(1 / 1.5);
    expect(fl / fn / 10).toBeLessThan(1.5);
  });

  it('holes smaller than a cell are cut out without holes in cells or hanging nodes', () => {
    for (const seed of [1, 2, 3, 4, 5, 6]) {
      const c = makeCase({
        outline: [[0, 0], [100, 0], [100, 50], [0, 50]], size: 15, seed, lloyd: 3,
        holes: [{ kind: 'polygon', points: [[40, 20], [41, 20], [40.5, 21]] }, { kind: 'circle', center: [70, 25], radius: 0.3 }],
      });
      const d = buildDomain(c), m = generateMesh(d, c.mesh);
      expect(checkMesh(m, d), `seed ${seed}`).toEqual([]);
      let sum = 0;
      for (let k = 0; k < cellCount(m); k++) sum += cellArea(m, k);
      expect(Math.abs(sum - d.area) / d.area).toBeLessThan(1e-9);
    }
  });

  it('resolves a bearing strip by several vertices', () => {
    const c = testCases(2).notched, d = buildDomain(c), m = generateMesh(d, c.mesh);
    // 6 mm strip with a local size of 2·tipSize = 3 mm: the two ends and at least one vertex between
    expect(verticesOnSegment(m, [97, 50], [103, 50], 1e-9).length).toBeGreaterThanOrEqual(3);
  });

  it('reports sensible statistics', () => {
    const c = testCases(5).holes, d = buildDomain(c), m = generateMesh(d, c.mesh), s = meshStats(m);
    expect(s.polygons).toBe(cellCount(m));
    expect(s.minArea).toBeGreaterThan(0);
    expect(s.minEdge).toBeGreaterThan(0);
    expect(s.maxEdge).toBeLessThan(4 * c.mesh.size);
    expect(s.boundaryEdges).toBeGreaterThan(0);
    const E = buildEdges(m);
    // every cell side maps to an edge that lists the cell
    for (let k = 0; k < cellCount(m); k++) for (let j = m.cellStart[k]; j < m.cellStart[k + 1]; j++) {
      const e = E.cellEdges[j];
      expect(E.edgeCells[2 * e] === k || E.edgeCells[2 * e + 1] === k).toBe(true);
    }
  });
});
