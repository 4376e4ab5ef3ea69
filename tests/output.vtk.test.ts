import { mkdtempSync, readFileSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { polyMeshFrom } from '../src/mesh/polymesh.js';
import { VtkSeries, pvdText, vertexDamage, vtuText } from '../src/output/vtk.js';
import { allNodes, parseXml, textOf, type XmlNode } from './output.xml.js';

const dir = mkdtempSync(join(tmpdir(), 'rupta-vtk-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

// a square, a pentagon and a triangle sharing edges; vertices 1 and 7 are the two faces of a crack mouth at (10, 0)
const mesh = polyMeshFrom(
  [[0, 0], [10, 0], [10, 10], [0, 10], [20, 10], [25, 5], [20, 0], [10, 0], [5, 15]],
  [[0, 1, 2, 3], [7, 6, 5, 4, 2], [3, 2, 8]],
);
const u = Float64Array.from([0, 0, -0.01, 0, 0, -0.02, 0, 0, 0.01, -0.02, 0.02, 0, 0.01, 0, 0.01, 0, 0, 0.03]);
const stress = Float64Array.from([1, 2, 0.5, -1, 0, 0, 3, 3, 0]);
const cohesive = [{ x1: 10, y1: 0, x2: 10, y2: 10, damage: 0.25 }];

/** Numbers of a DataArray by name. */
function arrayOf(root: XmlNode, name: string): { node: XmlNode; values: number[] } {
  const node = allNodes(root).find((e) => e.name === 'DataArray' && e.attrs.Name === name)!;
  expect(node, name).toBeDefined();
  return { node, values: textOf(node).trim().split(/\s+/).map(Number) };
}

describe('vtuText', () => {
  const root = parseXml(vtuText({ mesh, u, cellStress: stress, cohesive, nuZ: 0.2 }));
  it('declares the counts of points and polygon cells, and the arrays match them', () => {
    expect(root.name).toBe('VTKFile');
    expect(root.attrs.type).toBe('UnstructuredGrid');
    const piece = allNodes(root).find((e) => e.name === 'Piece')!;
    expect(piece.attrs.NumberOfPoints).toBe('9');
    expect(piece.attrs.NumberOfCells).toBe('3');
    expect(arrayOf(root, 'Points').values).toHaveLength(27);
    expect(arrayOf(root, 'connectivity').values).toEqual([0, 1, 2, 3, 7, 6, 5, 4, 2, 3, 2, 8]);
    expect(arrayOf(root, 'offsets').values).toEqual([4, 9, 12]);
    expect(arrayOf(root, 'types').values).toEqual([7, 7, 7]); // VTK_POLYGON, from the file format's cell type table
    expect(arrayOf(root, 'displacement').node.attrs.NumberOfComponents).toBe('3');
    expect(arrayOf(root, 'displacement').values.slice(6, 9)).toEqual([0, -0.02, 0]); // vertex 2
  });

  it('writes stress as a symmetric tensor with szz from the out-of-plane factor, and s1 per cell', () => {
    const s = arrayOf(root, 'stress');
    expect(s.node.attrs.NumberOfComponents).toBe('6');
    expect(s.values.slice(0, 6)).toEqual([1, 2, 0.6, 0.5, 0, 0]); // plane strain: szz = ν (sxx + syy), common practice
    // s1 = (sxx + syy)/2 + sqrt(((sxx - syy)/2)² + sxy²), common practice
    expect(arrayOf(root, 's1').values[0]).toBeCloseTo(1.5 + Math.hypot(0.5, 0.5), 6);
    expect(arrayOf(root, 's1').values[1]).toBeCloseTo(0, 12);
  });

  it('puts the damage of a cohesive segment on both faces of its ends and nowhere else', () => {
    expect(Array.from(vertexDamage(mesh, cohesive))).toEqual([0, 0.25, 0.25, 0, 0, 0, 0, 0.25, 0]);
    expect(arrayOf(root, 'damage').values).toEqual([0, 0.25, 0.25, 0, 0, 0, 0, 0.25, 0]);
    expect(Array.from(vertexDamage(mesh, []))).toEqual(new Array(9).fill(0));
  });

  it('refuses arrays of the wrong size', () => {
    expect(() => vtuText({ mesh, u: new Float64Array(3), cellStress: stress })).toThrow(/displacement/);
    expect(() => vtuText({ mesh, u, cellStress: new Float64Array(3) })).toThrow(/stress/);
  });
});

describe('VtkSeries', () => {
  it('writes a file per step and a collection that lists them in order', () => {
    const s = new VtkSeries(join(dir, 'vtk'));
    for (const step of [0, 2, 4]) s.write(step, { mesh, u, cellStress: stress });
    expect(readdirSync(join(dir, 'vtk')).sort()).toEqual(['step-0000.vtu', 'step-0002.vtu', 'step-0004.vtu', 'steps.pvd']);
    const pvd = parseXml(readFileSync(join(dir, 'vtk', 'steps.pvd'), 'utf8'));
    expect(pvd.attrs.type).toBe('Collection');
    const sets = allNodes(pvd).filter((e) => e.name === 'DataSet');
    expect(sets.map((e) => [e.attrs.timestep, e.attrs.file])).toEqual([['0', 'step-0000.vtu'], ['2', 'step-0002.vtu'], ['4', 'step-0004.vtu']]);
    expect(() => parseXml(readFileSync(join(dir, 'vtk', 'step-0004.vtu'), 'utf8'))).not.toThrow();
  });
  it('escapes file names in the collection', () => {
    expect(() => parseXml(pvdText([{ step: 1, file: 'a&b<c>.vtu' }]))).not.toThrow();
  });
});
