// The polygon mesh as flat typed arrays: the shared currency of mesh/, vem/, output/.

export interface PolyMesh {
  /** Vertex coordinates, x0 y0 x1 y1 … (mm). */
  xy: Float64Array;
  /** Cell c owns cellVerts[cellStart[c] .. cellStart[c+1]), counter-clockwise. */
  cellStart: Int32Array;
  cellVerts: Int32Array;
}

export const vertexCount = (m: PolyMesh): number => m.xy.length >> 1;
export const cellCount = (m: PolyMesh): number => m.cellStart.length - 1;

/** Signed area of cell c (positive when counter-clockwise). */
export function cellArea(m: PolyMesh, c: number): number {
  const { xy, cellStart, cellVerts } = m;
  const s = cellStart[c], e = cellStart[c + 1];
  let a = 0;
  for (let k = s; k < e; k++) {
    const i = cellVerts[k], j = cellVerts[k + 1 < e ? k + 1 : s];
    a += xy[2 * i] * xy[2 * j + 1] - xy[2 * j] * xy[2 * i + 1];
  }
  return a / 2;
}

/** Area centroid of cell c, written into out[0], out[1]. */
export function cellCentroid(m: PolyMesh, c: number, out: Float64Array | number[]): void {
  const { xy, cellStart, cellVerts } = m;
  const s = cellStart[c], e = cellStart[c + 1];
  // shift to the first vertex so that far-from-origin cells keep their digits
  const x0 = xy[2 * cellVerts[s]], y0 = xy[2 * cellVerts[s] + 1];
  let a = 0, cx = 0, cy = 0;
  for (let k = s; k < e; k++) {
    const i = cellVerts[k], j = cellVerts[k + 1 < e ? k + 1 : s];
    const xi = xy[2 * i] - x0, yi = xy[2 * i + 1] - y0, xj = xy[2 * j] - x0, yj = xy[2 * j + 1] - y0;
    const cr = xi * yj - xj * yi;
    a += cr;
    cx += (xi + xj) * cr;
    cy += (yi + yj) * cr;
  }
  out[0] = x0 + cx / (3 * a);
  out[1] = y0 + cy / (3 * a);
}

/** Build a PolyMesh from plain arrays (tests, small tools). */
export function polyMeshFrom(points: ArrayLike<number>[] | number[][], cells: number[][]): PolyMesh {
  const xy = new Float64Array(points.length * 2);
  points.forEach((p, i) => { xy[2 * i] = p[0]; xy[2 * i + 1] = p[1]; });
  const cellStart = new Int32Array(cells.length + 1);
  let n = 0;
  cells.forEach((c, i) => { n += c.length; cellStart[i + 1] = n; });
  const cellVerts = new Int32Array(n);
  let k = 0;
  for (const c of cells) for (const v of c) cellVerts[k++] = v;
  return { xy, cellStart, cellVerts };
}
