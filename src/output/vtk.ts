// VTK XML files for outside viewers: one unstructured grid of polygons per step (ASCII), and a
// collection file listing the steps in order.

import { join } from 'node:path';
import type { PolyMesh } from '../mesh/polymesh.js';
import { cellCount, vertexCount } from '../mesh/polymesh.js';
import type { CohesiveSegment } from '../fracture/analysis.js';
import { writeFileAtomic } from './files.js';
import { esc } from './svg.js';

/** VTK cell type code of a general polygon. */
const VTK_POLYGON = 7;

export interface VtuInput {
  mesh: PolyMesh;
  /** Two per vertex (mm). */
  u: Float64Array;
  /** sxx, syy, sxy per cell (MPa). */
  cellStress: Float64Array;
  /** Out-of-plane stress factor: szz = nuZ·(sxx + syy) (0 in plane stress, ν in plane strain). */
  nuZ?: number;
  cohesive?: CohesiveSegment[];
}

/** Compact number text for data arrays: 7 significant digits. */
function num(x: number): string {
  if (!Number.isFinite(x)) return '0';
  if (x === 0) return '0';
  return String(Number(x.toPrecision(7)));
}

/** Numbers in rows of `per` values, so the file stays readable and lines short. */
function rows(values: ArrayLike<number>, per: number, fmt: (x: number) => string = num): string {
  const out: string[] = [];
  for (let i = 0; i < values.length; i += per) {
    let line = '';
    for (let k = i; k < Math.min(values.length, i + per); k++) line += (k > i ? ' ' : '') + fmt(values[k]);
    out.push(line);
  }
  return out.join('\n');
}

const intText = (x: number): string => String(x | 0);

function dataArray(name: string, type: string, comps: number, values: ArrayLike<number>, per: number, fmt?: (x: number) => string, extra = ''): string {
  const nc = comps > 1 ? ` NumberOfComponents="${comps}"` : '';
  return `<DataArray type="${type}" Name="${esc(name)}"${nc}${extra} format="ascii">\n${rows(values, per, fmt)}\n</DataArray>\n`;
}

/** Damage per vertex: the largest of the cohesive segments that end there (both faces of a crack share it). */
export function vertexDamage(mesh: PolyMesh, cohesive: CohesiveSegment[] | undefined): Float64Array {
  const nv = vertexCount(mesh), out = new Float64Array(nv);
  if (!cohesive?.length) return out;
  // segment ends are given by position: match them to vertices through rounded coordinates
  const key = (x: number, y: number): string => `${Math.round(x * 1e6)},${Math.round(y * 1e6)}`;
  const at = new Map<string, number>();
  for (const c of cohesive) {
    const d = Number.isFinite(c.damage) ? c.damage : 0;
    for (const k of [key(c.x1, c.y1), key(c.x2, c.y2)]) at.set(k, Math.max(at.get(k) ?? 0, d));
  }
  for (let v = 0; v < nv; v++) {
    const d = at.get(key(mesh.xy[2 * v], mesh.xy[2 * v + 1]));
    if (d !== undefined) out[v] = d;
  }
  return out;
}

/** One step as VTK XML unstructured-grid text: polygon cells; displacement and damage on points, stress on cells. */
export function vtuText(p: VtuInput): string {
  const { mesh } = p, nv = vertexCount(mesh), nc = cellCount(mesh);
  if (p.u.length !== 2 * nv) throw new Error(`vtuText: displacement needs 2 × ${nv} entries, got ${p.u.length}`);
  if (p.cellStress.length !== 3 * nc) throw new Error(`vtuText: stress needs 3 × ${nc} entries, got ${p.cellStress.length}`);
  const pts = new Float64Array(3 * nv), disp = new Float64Array(3 * nv);
  for (let v = 0; v < nv; v++) {
    pts[3 * v] = mesh.xy[2 * v]; pts[3 * v + 1] = mesh.xy[2 * v + 1];
    disp[3 * v] = p.u[2 * v]; disp[3 * v + 1] = p.u[2 * v + 1];
  }
  // symmetric tensor in the viewer's order XX YY ZZ XY YZ XZ
  const nuZ = p.nuZ ?? 0;
  const stress = new Float64Array(6 * nc), s1 = new Float64Array(nc);
  for (let c = 0; c < nc; c++) {
    const sxx = p.cellStress[3 * c], syy = p.cellStress[3 * c + 1], sxy = p.cellStress[3 * c + 2];
    stress[6 * c] = sxx; stress[6 * c + 1] = syy; stress[6 * c + 2] = nuZ * (sxx + syy); stress[6 * c + 3] = sxy;
    s1[c] = (sxx + syy) / 2 + Math.hypot((sxx - syy) / 2, sxy);
  }
  const offsets = mesh.cellStart.subarray(1), types = new Int32Array(nc).fill(VTK_POLYGON);
  const tensorNames = ' ComponentName0="XX" ComponentName1="YY" ComponentName2="ZZ" ComponentName3="XY" ComponentName4="YZ" ComponentName5="XZ"';
  return [
    '<?xml version="1.0"?>\n',
    '<VTKFile type="UnstructuredGrid" version="1.0" byte_order="LittleEndian" header_type="UInt64">\n',
    '<UnstructuredGrid>\n',
    `<Piece NumberOfPoints="${nv}" NumberOfCells="${nc}">\n`,
    '<PointData Vectors="displacement" Scalars="damage">\n',
    dataArray('displacement', 'Float64', 3, disp, 3, num, ' ComponentName0="X" ComponentName1="Y" ComponentName2="Z"'),
    dataArray('damage', 'Float64', 1, vertexDamage(mesh, p.cohesive), 10),
    '</PointData>\n',
    '<CellData Tensors="stress" Scalars="s1">\n',
    dataArray('stress', 'Float64', 6, stress, 6, num, tensorNames),
    dataArray('s1', 'Float64', 1, s1, 10),
    '</CellData>\n',
    '<Points>\n',
    dataArray('Points', 'Float64', 3, pts, 3),
    '</Points>\n',
    '<Cells>\n',
    dataArray('connectivity', 'Int64', 1, mesh.cellVerts, 12, intText),
    dataArray('offsets', 'Int64', 1, offsets, 12, intText),
    dataArray('types', 'UInt8', 1, types, 24, intText),
    '</Cells>\n',
    '</Piece>\n',
    '</UnstructuredGrid>\n',
    '</VTKFile>\n',
  ].join('');
}

/** The collection text: one data set per step, file names relative to the collection file. */
export function pvdText(entries: { step: number; file: string }[]): string {
  const sets = entries.map((e) => `<DataSet timestep="${e.step}" group="" part="0" file="${esc(e.file)}"/>\n`).join('');
  return `<?xml version="1.0"?>\n<VTKFile type="Collection" version="1.0" byte_order="LittleEndian">\n<Collection>\n${sets}</Collection>\n</VTKFile>\n`;
}

/** The VTK files of a run in one folder: step-NNNN.vtu per call and steps.pvd rewritten each time. */
export class VtkSeries {
  private entries: { step: number; file: string }[] = [];

  constructor(readonly dir: string) {}

  write(step: number, p: VtuInput): string {
    const file = `step-${String(step).padStart(4, '0')}.vtu`;
    writeFileAtomic(join(this.dir, file), vtuText(p));
    this.entries = this.entries.filter((e) => e.step !== step);
    this.entries.push({ step, file });
    // the collection is valid after every step, so an interrupted run opens as far as it went
    writeFileAtomic(join(this.dir, 'steps.pvd'), pvdText(this.entries));
    return file;
  }
}
