// The mesh while cracks grow: cells are split, refined and merged, vertices are added
// and twinned. Vertex ids are stable for the whole run (a removed vertex simply has no
// cell), so displacements and crack-face pairs keyed by vertex id survive every change.
import type { PolyMesh } from '../mesh/polymesh.js';

/** Every array of the work mesh, including the order of the cells around each vertex (the cuts depend on it). */
export interface MeshState {
  x: Float64Array; y: Float64Array;
  cells: (number[] | null)[]; family: number[]; families: WorkMesh['families'];
  pinned: Uint8Array; face: Uint8Array; cracked: boolean[];
  from: ({ v: number[]; w: number[] } | null)[];
  cellsAround: number[][] | null;
}

export class WorkMesh {
  x: number[] = [];
  y: number[] = [];
  /** Vertex lists, counter-clockwise; null for a cell merged or split away. */
  cells: (number[] | null)[] = [];
  /** Refinement family of each cell (−1: none). */
  family: number[] = [];
  /** Refinement families: the children of cell parentId, which itself belonged to parentFamily. */
  families: { children: number[]; open: boolean; parentId: number; parentFamily: number }[] = [];
  /** Vertices that must stay (named points, crack vertices): never pruned. */
  pinned: Uint8Array = new Uint8Array(0);
  /** Vertices on crack faces (set when twinned). */
  face: Uint8Array = new Uint8Array(16);
  /** Cells that touch a crack face: never refined or merged. */
  cracked: boolean[] = [];
  private v2c: number[][] | null = null;

  static fromPolyMesh(m: PolyMesh): WorkMesh {
    const w = new WorkMesh();
    const nv = m.xy.length >> 1;
    for (let i = 0; i < nv; i++) { w.x.push(m.xy[2 * i]); w.y.push(m.xy[2 * i + 1]); }
    for (let c = 0; c + 1 < m.cellStart.length; c++) {
      w.cells.push(Array.from(m.cellVerts.subarray(m.cellStart[c], m.cellStart[c + 1])));
      w.family.push(-1);
      w.cracked.push(false);
    }
    w.pinned = new Uint8Array(Math.max(16, nv * 2));
    w.face = new Uint8Array(w.pinned.length);
    return w;
  }

  get vertexCount(): number { return this.x.length; }

  /** A deep copy of every array, as plain data. */
  state(): MeshState {
    const around = this.v2c;
    return {
      x: Float64Array.from(this.x), y: Float64Array.from(this.y),
      cells: this.cells.map((c) => (c ? c.slice() : null)), family: this.family.slice(),
      families: this.families.map((f) => ({ ...f, children: f.children.slice() })),
      pinned: this.pinned.slice(), face: this.face.slice(), cracked: this.cracked.slice(),
      from: Array.from(this.from, (f) => (f ? { v: f.v.slice(), w: f.w.slice() } : null)),
      cellsAround: around ? around.map((l) => l.slice()) : null,
    };
  }

  /** Take over a saved state (the mesh then owns its arrays). */
  restore(s: MeshState): void {
    this.x = Array.from(s.x); this.y = Array.from(s.y);
    this.cells = s.cells; this.family = s.family; this.families = s.families;
    this.pinned = s.pinned; this.face = s.face; this.cracked = s.cracked; this.from = s.from;
    this.v2c = s.cellsAround;
  }

  /** Grow a per-vertex field (k values per vertex) to the current vertex count by interpolation. */
  extendField(f: Float64Array, k: number): Float64Array {
    const nOld = f.length / k, n = this.x.length;
    if (nOld === n) return f;
    const g = new Float64Array(n * k);
    g.set(f);
    for (let v = nOld; v < n; v++) {
      const src = this.from[v];
      if (!src) continue;
      for (let j = 0; j < src.v.length; j++) for (let c = 0; c < k; c++) g[v * k + c] += src.w[j] * g[src.v[j] * k + c];
    }
    return g;
  }

  /** For vertices made during the run: the older vertices and weights it interpolates. */
  from: ({ v: number[]; w: number[] } | null)[] = [];

  addVertex(x: number, y: number, fromV?: number[], fromW?: number[]): number {
    this.x.push(x); this.y.push(y);
    const id = this.x.length - 1;
    this.from[id] = fromV ? { v: fromV, w: fromW! } : null;
    if (id >= this.pinned.length) { const p = new Uint8Array(this.pinned.length * 2); p.set(this.pinned); this.pinned = p; }
    if (id >= this.face.length) { const f = new Uint8Array(Math.max(16, this.pinned.length)); f.set(this.face); this.face = f; }
    if (this.v2c) this.v2c[id] = [];
    return id;
  }

  addCell(verts: number[], family = -1): number {
    this.cells.push(verts);
    this.family.push(family);
    this.cracked.push(false);
    const id = this.cells.length - 1;
    if (this.v2c) for (const v of verts) this.v2c[v].push(id);
    return id;
  }

  removeCell(c: number): void {
    const verts = this.cells[c];
    if (!verts) return;
    if (this.v2c) for (const v of verts) { const l = this.v2c[v]; const k = l.indexOf(c); if (k >= 0) l.splice(k, 1); }
    this.cells[c] = null;
  }

  /** Replace vertex list of cell c (keeps the adjacency in step). */
  setCell(c: number, verts: number[]): void {
    const old = this.cells[c];
    if (this.v2c && old) for (const v of old) { const l = this.v2c[v]; const k = l.indexOf(c); if (k >= 0) l.splice(k, 1); }
    this.cells[c] = verts;
    if (this.v2c) for (const v of verts) this.v2c[v].push(c);
  }

  /** Cells around each vertex (built lazily, then kept in step by the edit methods). */
  cellsOf(v: number): number[] {
    if (!this.v2c) {
      const l: number[][] = [];
      for (let i = 0; i < this.x.length; i++) l.push([]);
      this.cells.forEach((vs, c) => { if (vs) for (const i of vs) l[i].push(c); });
      this.v2c = l;
    }
    return this.v2c[v];
  }

  /** The other cell that has the directed edge b→a (the neighbour across a→b), or −1. */
  neighbourAcross(c: number, a: number, b: number): number {
    for (const d of this.cellsOf(a)) {
      if (d === c) continue;
      const vs = this.cells[d]!;
      const n = vs.length;
      for (let k = 0; k < n; k++) if (vs[k] === b && vs[(k + 1) % n] === a) return d;
    }
    return -1;
  }

  /** Insert vertex v between a and b in cell c (where a→b or b→a is an edge). */
  insertOnEdge(c: number, a: number, b: number, v: number): void {
    const vs = this.cells[c]!;
    const n = vs.length;
    for (let k = 0; k < n; k++) {
      const p = vs[k], q = vs[(k + 1) % n];
      if ((p === a && q === b) || (p === b && q === a)) {
        vs.splice(k + 1, 0, v);
        if (this.v2c) this.v2c[v].push(c);
        return;
      }
    }
    throw new Error(`internal: edge ${a}-${b} not in cell ${c}`);
  }

  area(c: number): number {
    const vs = this.cells[c]!;
    let a = 0;
    const x0 = this.x[vs[0]], y0 = this.y[vs[0]];
    for (let k = 1; k + 1 < vs.length; k++) {
      const i = vs[k], j = vs[k + 1];
      a += (this.x[i] - x0) * (this.y[j] - y0) - (this.x[j] - x0) * (this.y[i] - y0);
    }
    return a / 2;
  }

  centroid(c: number): [number, number] {
    const vs = this.cells[c]!;
    const x0 = this.x[vs[0]], y0 = this.y[vs[0]];
    let a = 0, cx = 0, cy = 0;
    for (let k = 0; k < vs.length; k++) {
      const i = vs[k], j = vs[(k + 1) % vs.length];
      const xi = this.x[i] - x0, yi = this.y[i] - y0, xj = this.x[j] - x0, yj = this.y[j] - y0;
      const cr = xi * yj - xj * yi;
      a += cr; cx += (xi + xj) * cr; cy += (yi + yj) * cr;
    }
    return [x0 + cx / (3 * a), y0 + cy / (3 * a)];
  }

  /** Compact typed mesh for assembly: live cells only, vertices renumbered; maps both ways. */
  toPolyMesh(): { mesh: PolyMesh; vertexOf: Int32Array; compactOf: Int32Array; cellOf: Int32Array } {
    const nvAll = this.x.length, cells = this.cells;
    const compactOf = new Int32Array(nvAll).fill(-1);
    let nCells = 0, nIdx = 0;
    for (let c = 0; c < cells.length; c++) { const vs = cells[c]; if (vs) { nCells++; nIdx += vs.length; } }
    const cellOf = new Int32Array(nCells), cellStart = new Int32Array(nCells + 1), cellVerts = new Int32Array(nIdx);
    const order = new Int32Array(nvAll);
    let k = 0, i = 0, nv = 0;
    for (let c = 0; c < cells.length; c++) {
      const vs = cells[c];
      if (!vs) continue;
      for (let j = 0; j < vs.length; j++) {
        const v = vs[j];
        if (compactOf[v] < 0) { compactOf[v] = nv; order[nv++] = v; }
        cellVerts[k++] = compactOf[v];
      }
      cellOf[i++] = c;
      cellStart[i] = k;
    }
    const vertexOf = order.slice(0, nv), xy = new Float64Array(2 * nv);
    for (let j = 0; j < nv; j++) { xy[2 * j] = this.x[vertexOf[j]]; xy[2 * j + 1] = this.y[vertexOf[j]]; }
    return { mesh: { xy, cellStart, cellVerts }, vertexOf, compactOf, cellOf };
  }
}
