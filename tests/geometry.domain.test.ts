import { polygonContains } from 'd3-polygon';
import { describe, expect, it } from 'vitest';
import type { Vec2 } from '../src/case/model.js';
import { InputError } from '../src/errors.js';
import { buildDomain, distanceToBoundary, onBoundary, pointInDomain, segmentHitsBoundary } from '../src/geometry/domain.js';
import { ringArea } from '../src/geometry/rings.js';
import { prng } from '../src/mesh/prng.js';
import { makeCase, testCases } from './mesh.helpers.js';

const ringPts = (r: Float64Array): [number, number][] => Array.from({ length: r.length / 2 }, (_, i) => [r[2 * i], r[2 * i + 1]]);
const isVertex = (r: Float64Array, p: Vec2) => ringPts(r).some(q => q[0] === p[0] && q[1] === p[1]);

describe('buildDomain', () => {
  it('cuts a flat-ended notch from the edge and puts the named points into the outline', () => {
    const c = testCases(1).notched, d = buildDomain(c);
    // exact area: 200×50 beam minus a 2×20 notch (plain arithmetic)
    expect(d.area).toBeCloseTo(200 * 50 - 2 * 20, 9);
    expect(ringArea(d.outline)).toBeGreaterThan(0);
    expect(d.tips).toEqual([[100, 20]]);
    for (const p of [[10, 0], [190, 0], [100, 50], [97, 50], [103, 50], [96, 0], [104, 0], [100, 20]] as Vec2[]) {
      expect(isVertex(d.outline, p), `${p}`).toBe(true);
      expect(d.points.some(q => q[0] === p[0] && q[1] === p[1])).toBe(true);
    }
    expect(d.strips.map(s => [...s].sort((a, b) => a[0] - b[0]))).toEqual([[[97, 50], [103, 50]]]);
    expect(isVertex(d.outline, [99, 20]) && isVertex(d.outline, [101, 20])).toBe(true);
  });

  it('keeps width-0 notches as slits with both ends as points', () => {
    const d = buildDomain(testCases(1).lshape);
    expect(d.slits).toEqual([[[30, 30], [22, 22]]]);
    expect(d.tips).toEqual([[22, 22]]);
    expect(d.points).toContainEqual([22, 22]);
    expect(isVertex(d.outline, [30, 30])).toBe(true);
    // the slit removes no material: L-shape area (plain arithmetic)
    expect(d.area).toBeCloseTo(80 * 30 + 30 * 50, 9);
  });

  it('turns circles into polygons of at least 16 sides with CW holes', () => {
    const d = buildDomain(testCases(1).holes);
    expect(d.holes.length).toBe(2);
    for (const h of d.holes) expect(ringArea(h)).toBeLessThan(0);
    const circle = d.holes.find(h => h.length / 2 >= 16)!;
    expect(circle).toBeDefined();
    // an inscribed n-gon of radius 12 loses area (plain geometry)
    const n = circle.length / 2;
    const polyArea = 0.5 * n * 144 * Math.sin((2 * Math.PI) / n);
    const tri = Math.abs(ringArea(d.holes.find(h => h !== circle)!));
    expect(d.area).toBeCloseTo(100 * 80 - polyArea - tri, 6);
  });

  it('point location, distance and crossings agree with brute-force references', () => {
    const d = buildDomain(testCases(1).holes), rand = prng(11);
    const rings = [ringPts(d.outline), ...d.holes.map(ringPts)];
    for (let k = 0; k < 2000; k++) {
      const x = -5 + 110 * rand(), y = -5 + 90 * rand();
      // reference: d3-polygon point-in-polygon on each ring
      const ref = polygonContains(rings[0], [x, y]) && !rings.slice(1).some(r => polygonContains(r, [x, y]));
      expect(pointInDomain(d, x, y)).toBe(ref);
      let best = Infinity;
      for (const r of rings) for (let i = 0; i < r.length; i++) {
        const [ax, ay] = r[i], [bx, by] = r[(i + 1) % r.length], dx = bx - ax, dy = by - ay;
        const t = Math.max(0, Math.min(1, ((x - ax) * dx + (y - ay) * dy) / (dx * dx + dy * dy)));
        best = Math.min(best, Math.hypot(ax + t * dx - x, ay + t * dy - y));
      }
      expect(distanceToBoundary(d, x, y)).toBeCloseTo(best, 12);
    }
    const hit = segmentHitsBoundary(d, 50, 70, 50, 90)!;
    expect(hit.t).toBeCloseTo(0.5, 12);
    expect(hit.y).toBeCloseTo(80, 12);
    expect(segmentHitsBoundary(d, 50, 70, 50, 75)).toBeNull();
    // first crossing from inside towards the circular hole (centre 30,40; radius 12)
    const h2 = segmentHitsBoundary(d, 5, 40, 30, 40)!;
    expect(h2.x).toBeGreaterThan(17.9);
    expect(h2.x).toBeLessThan(18.1);
    expect(onBoundary(d, 100, 40, 1e-9)).toBe(true);
    expect(onBoundary(d, 99, 40, 1e-9)).toBe(false);
  });

  it('refuses points outside the specimen and notches that cut it apart', () => {
    const out = makeCase({ outline: [[0, 0], [10, 0], [10, 10], [0, 10]], probes: [[20, 5]] });
    expect(() => buildDomain(out)).toThrow(InputError);
    const apart = makeCase({ outline: [[0, 0], [10, 0], [10, 10], [0, 10]], notches: [{ from: [5, 0], to: [5, 10], width: 1 }] });
    expect(() => buildDomain(apart)).toThrow(InputError);
  });
});
