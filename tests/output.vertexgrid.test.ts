// The bucket grid that moves points with the deformation finds the very vertices a search of all of them finds.
import { describe, expect, it } from 'vitest';
import { prng } from '../src/mesh/prng.js';
import { VertexGrid } from '../src/output/vertexgrid.js';

/** Every vertex within tol of the nearest distance, by checking them all. */
function bruteForce(xy: Float64Array, x: number, y: number, tol: number): number[] {
  let best = Infinity;
  for (let i = 0; 2 * i < xy.length; i++) best = Math.min(best, Math.hypot(xy[2 * i] - x, xy[2 * i + 1] - y));
  const out: number[] = [];
  for (let i = 0; 2 * i < xy.length; i++) if (Math.hypot(xy[2 * i] - x, xy[2 * i + 1] - y) <= best + tol) out.push(i);
  return out;
}

describe('nearest vertices through a bucket grid', () => {
  it('returns the same vertices as a search of all of them, for points inside, outside and on doubled vertices', () => {
    const rnd = prng(7);
    // uneven density (a dense band, as around a crack) and pairs of vertices at one place (its two faces)
    const pts: number[] = [];
    for (let i = 0; i < 400; i++) pts.push(440 * rnd(), 100 * rnd());
    for (let i = 0; i < 600; i++) pts.push(215 + 10 * rnd(), 100 * rnd());
    for (let i = 0; i < 40; i++) { const y = 2.5 * i; pts.push(220, y, 220, y); }
    const xy = Float64Array.from(pts), grid = new VertexGrid(xy), tol = 1e-7 * 440;
    const queries: [number, number][] = [[220, 10], [220, 97.5], [0, 0], [440, 100], [-50, 50], [600, -30], [220, 500]];
    for (let k = 0; k < 500; k++) queries.push([-40 + 520 * rnd(), -20 + 140 * rnd()]);
    for (let i = 0; i < 1000; i += 37) queries.push([xy[2 * i], xy[2 * i + 1]]);
    let pairs = 0;
    for (const [x, y] of queries) {
      const n = grid.nearest(x, y, tol);
      const got = Array.from(grid.found.subarray(0, n));
      expect(got).toEqual(bruteForce(xy, x, y, tol));
      if (n === 2) pairs++;
    }
    expect(pairs).toBeGreaterThanOrEqual(2); // the doubled vertices were met as pairs
  });

  it('handles one vertex and none', () => {
    const one = new VertexGrid(Float64Array.from([3, 4]));
    expect(one.nearest(100, -100, 0)).toBe(1);
    expect(one.found[0]).toBe(0);
    expect(new VertexGrid(new Float64Array(0)).nearest(1, 1, 0)).toBe(0);
  });
});
