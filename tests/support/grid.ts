// Structured quadrilateral meshes for tests that need exactly placed vertex lines.
import { polyMeshFrom, type PolyMesh } from '../../src/mesh/polymesh.js';

export function gridMesh(x0: number, y0: number, x1: number, y1: number, nx: number, ny: number): PolyMesh {
  const pts: number[][] = [], cells: number[][] = [];
  for (let j = 0; j <= ny; j++) for (let i = 0; i <= nx; i++) pts.push([x0 + (x1 - x0) * i / nx, y0 + (y1 - y0) * j / ny]);
  const id = (i: number, j: number) => j * (nx + 1) + i;
  for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++) cells.push([id(i, j), id(i + 1, j), id(i + 1, j + 1), id(i, j + 1)]);
  return polyMeshFrom(pts, cells);
}
