import { describe, expect, it } from 'vitest';
import { buildDomain } from '../src/geometry/domain.js';
import { polyMeshFrom } from '../src/mesh/polymesh.js';
import { buildEdges, findVertices, meshStats, verticesOnSegment } from '../src/mesh/stats.js';
import { checkMesh, makeCase } from './mesh.helpers.js';

// a unit square beside a square cut into two halves; the left cell carries (1, 0.5) as a collinear vertex
const grid = () => polyMeshFrom(
  [[0, 0], [1, 0], [2, 0], [0, 1], [1, 1], [2, 1], [1, 0.5], [2, 0.5]],
  [[0, 1, 6, 4, 3], [1, 2, 7, 6], [6, 7, 5, 4]],
);

describe('mesh queries', () => {
  it('builds the edge table with one or two cells per edge', () => {
    const m = grid(), E = buildEdges(m);
    expect(E.count).toBe(10);
    let inner = 0;
    for (let e = 0; e < E.count; e++) if (E.edgeCells[2 * e + 1] >= 0) inner++;
    expect(inner).toBe(3);
    const s = meshStats(m);
    expect(s).toMatchObject({ polygons: 3, vertices: 8, minArea: 0.5, maxArea: 1, minEdge: 0.5, maxEdge: 1, maxVerticesPerCell: 5, boundaryEdges: 7 });
  });

  it('finds vertices at a point and along a segment, in order', () => {
    const m = grid();
    expect(findVertices(m, 1, 0.5, 1e-9)).toEqual([6]);
    expect(findVertices(m, 1.5, 0.5, 0.1)).toEqual([]);
    expect(verticesOnSegment(m, [1, 1], [1, 0], 1e-9)).toEqual([4, 6, 1]);
    expect(verticesOnSegment(m, [0, 0], [2, 0], 1e-9)).toEqual([0, 1, 2]);
  });

  it('the mesh check catches a hanging node and a clockwise cell', () => {
    const d = buildDomain(makeCase({ outline: [[0, 0], [2, 0], [2, 1], [0, 1]] }));
    expect(checkMesh(grid(), d)).toEqual([]);
    const hanging = polyMeshFrom([[0, 0], [1, 0], [2, 0], [0, 1], [1, 1], [2, 1], [1, 0.5], [2, 0.5]], [[0, 1, 4, 3], [1, 2, 7, 6], [6, 7, 5, 4]]);
    expect(checkMesh(hanging, d).length).toBeGreaterThan(0);
    const cw = polyMeshFrom([[0, 0], [1, 0], [2, 0], [0, 1], [1, 1], [2, 1]], [[0, 3, 4, 1], [1, 2, 5, 4]]);
    expect(checkMesh(cw, d).some(s => s.includes('area'))).toBe(true);
  });
});
