// Mesh surgery for crack growth: cutting, twinning, refining and merging keep a valid,
// conforming tiling (common practice for polygon meshes: positive areas, matching edges).
import { describe, expect, it } from 'vitest';
import { WorkMesh } from '../src/fracture/workmesh.js';
import { cutRay, twinAlong } from '../src/fracture/cut.js';
import { refineAround, coarsenAway } from '../src/fracture/adapt.js';
import { polyMeshFrom } from '../src/mesh/polymesh.js';

export function gridWorkMesh(nx: number, ny: number, h = 1): WorkMesh {
  const pts: number[][] = [], cells: number[][] = [];
  for (let j = 0; j <= ny; j++) for (let i = 0; i <= nx; i++) pts.push([i * h, j * h]);
  const id = (i: number, j: number) => j * (nx + 1) + i;
  for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++) cells.push([id(i, j), id(i + 1, j), id(i + 1, j + 1), id(i, j + 1)]);
  return WorkMesh.fromPolyMesh(polyMeshFrom(pts, cells));
}

/** Total area, and directed edges that have no reverse (must lie on the outline or a crack face). */
export function audit(wm: WorkMesh) {
  let area = 0, minArea = Infinity;
  const dir = new Set<string>();
  wm.cells.forEach((vs, c) => {
    if (!vs) return;
    const a = wm.area(c); area += a; minArea = Math.min(minArea, a);
    for (let k = 0; k < vs.length; k++) dir.add(`${vs[k]},${vs[(k + 1) % vs.length]}`);
  });
  const open: [number, number][] = [];
  for (const e of dir) { const [a, b] = e.split(',').map(Number); if (!dir.has(`${b},${a}`)) open.push([a, b]); }
  return { area, minArea, open };
}

describe('crack insertion in the work mesh', () => {
  it('a slanted cut from the edge splits cells, keeps the area and ends on an edge', () => {
    const wm = gridWorkMesh(10, 10);
    const start = 5; // vertex (5, 0)
    const d = [0.25, 1], L = Math.hypot(d[0], d[1]);
    const cut = cutRay(wm, start, d[0] / L, d[1] / L, 4.3);
    expect(cut.end).toBe('length');
    expect(cut.path.length).toBeGreaterThan(3);
    const tip = cut.path[cut.path.length - 1];
    expect(Math.hypot(wm.x[tip] - 5, wm.y[tip]) - 4.3).toBeLessThan(1);
    twinAlong(wm, cut.path, null, true, false);
    const a = audit(wm);
    expect(a.area).toBeCloseTo(100, 10);
    expect(a.minArea).toBeGreaterThan(0);
    // open edges: the outline (40 unit edges, some split) plus the two crack faces
    const onOutline = a.open.filter(([p, q]) => [wm.x[p], wm.x[q]].every((x) => x === 0) || [wm.x[p], wm.x[q]].every((x) => x === 10)
      || [wm.y[p], wm.y[q]].every((y) => y === 0) || [wm.y[p], wm.y[q]].every((y) => y === 10));
    const faces = a.open.length - onOutline.length;
    expect(faces).toBe(2 * (cut.path.length - 1));
  });

  it('a cut that snaps onto the end of a straight side with a vertex on it follows that side instead of leaving a cell of zero area', () => {
    const wm = gridWorkMesh(3, 3);
    const id = (i: number, j: number) => j * 4 + i;
    // the top side of cell [1,2]×[1,2] gets a vertex in its middle, as refining the cell above leaves it
    const a = id(1, 2), b = id(2, 2), mid = wm.addVertex(1.5, 2, [a, b], [0.5, 0.5]);
    const below = wm.cellsOf(a).find((c) => wm.cellsOf(b).includes(c) && wm.centroid(c)[1] < 2)!;
    const above = wm.neighbourAcross(below, b, a) >= 0 ? wm.neighbourAcross(below, b, a) : wm.neighbourAcross(below, a, b);
    wm.insertOnEdge(below, a, b, mid);
    if (above >= 0) wm.insertOnEdge(above, a, b, mid);
    // 10° below the side: the ray crosses the cell and its exit snaps to the side's far end
    const th = -10 * Math.PI / 180;
    const cut = cutRay(wm, a, Math.cos(th), Math.sin(th), 1);
    expect(cut.path).toEqual([a, mid, b]);
    expect(audit(wm).minArea).toBeGreaterThan(0.5);
  });

  it('a cut through to the far side separates the plate', () => {
    const wm = gridWorkMesh(6, 4);
    const cut = cutRay(wm, 3, 0, 1, 100);
    expect(cut.end).toBe('boundary');
    const tw = twinAlong(wm, cut.path, null, true, true);
    expect(tw.every(([, m]) => m >= 0)).toBe(true);
    expect(audit(wm).minArea).toBeGreaterThan(0);
  });

  it('refinement around a point and coarsening away from it keep a conforming tiling', () => {
    const wm = gridWorkMesh(8, 8, 4);
    const before = wm.cells.filter(Boolean).length;
    const n = refineAround(wm, 16, 16, 6, 1);
    expect(n).toBeGreaterThan(4);
    let a = audit(wm);
    expect(a.area).toBeCloseTo(32 * 32, 9);
    expect(a.minArea).toBeGreaterThan(0);
    expect(a.open.length).toBeGreaterThanOrEqual(32); // only the outline is open
    for (const [p, q] of a.open) expect([wm.x[p], wm.y[p], wm.x[q], wm.y[q]].some((v) => v === 0 || v === 32)).toBe(true);
    const merged = coarsenAway(wm, [[100, 100, 100, 100]], 10);
    expect(merged).toBeGreaterThan(0);
    a = audit(wm);
    expect(a.area).toBeCloseTo(32 * 32, 9);
    expect(wm.cells.filter(Boolean).length).toBe(before);
    // every cell is back to its four corners (no stray side middles)
    expect(wm.cells.filter(Boolean).every((vs) => vs!.length === 4)).toBe(true);
  });
});
