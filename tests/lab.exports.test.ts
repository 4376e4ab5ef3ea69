// Machine exports as testing machines write them, in four languages, and the column and unit
// options of the command line. Values are hand-made; conversions are exact by definition of
// the units (1 in = 25.4 mm, 1 lbf = 4.4482216152605 N, 1 daN = 10 N).
import { describe, expect, it } from 'vitest';
import { parseLabCurve, xKindOf, type LabColumns } from '../src/lab/import.js';
import { InputError } from '../src/errors.js';

interface Export { what: string; text: string; opts?: LabColumns; x: number[]; y: number[]; xLabel: string; yLabel: string; xKind: 'cmod' | 'displacement' | null; specimen?: string | null }

const exports: Export[] = [
  {
    what: 'German: Zeit, Kraft in kN, Weg and COD; COD is taken first, specimen from "Prüfkörper"',
    text: 'Prüfkörper;B-3\nDatum;03.12.2026\nZeit [s];Kraft [kN];Weg [mm];COD [mm]\n0;0;0;0\n1;1,5;0,10;0,010\n2;2,0;0,20;0,030\n3;1,0;0,30;0,060\n',
    x: [0, 0.01, 0.03, 0.06], y: [0, 1500, 2000, 1000], xLabel: 'COD', yLabel: 'Kraft', xKind: 'cmod', specimen: 'B-3',
  },
  {
    what: 'German with --x-column Weg: the crosshead, read as a displacement',
    text: 'Zeit [s];Kraft [kN];Weg [mm];COD [mm]\n0;0;0;0\n1;1,5;0,10;0,010\n2;2,0;0,20;0,030\n',
    opts: { x: 'Weg' }, x: [0, 0.1, 0.2], y: [0, 1500, 2000], xLabel: 'Weg', yLabel: 'Kraft', xKind: 'displacement', specimen: null,
  },
  {
    what: 'German: Standardkraft and Traversenweg, units on a line of their own',
    text: 'Standardkraft\tTraversenweg\nN\tmm\n0\t0\n100\t0,05\n150\t0,1\n',
    x: [0, 0.05, 0.1], y: [0, 100, 150], xLabel: 'Traversenweg', yLabel: 'Standardkraft', xKind: 'displacement',
  },
  {
    what: 'German: Rissöffnung in µm, Last in kN',
    text: 'Last (kN);Rissöffnung (µm)\n0;0\n2,5;12\n1,0;40\n',
    x: [0, 0.012, 0.04], y: [0, 2500, 1000], xLabel: 'Rissöffnung', yLabel: 'Last', xKind: 'cmod',
  },
  {
    what: 'French: Temps, Charge in daN, Déplacement, specimen from "Éprouvette:"',
    text: 'Éprouvette: E-12\nTemps (s);Charge (daN);Déplacement (mm)\n0;0;0\n1;100;0,1\n2;50;0,2\n',
    x: [0, 0.1, 0.2], y: [0, 1000, 500], xLabel: 'Déplacement', yLabel: 'Charge', xKind: 'displacement', specimen: 'E-12',
  },
  {
    what: 'French: Effort and Ouverture de fissure',
    text: 'Effort [kN];Ouverture de fissure [mm]\n0;0\n3;0,02\n2;0,05\n',
    x: [0, 0.02, 0.05], y: [0, 3000, 2000], xLabel: 'Ouverture de fissure', yLabel: 'Effort', xKind: 'cmod',
  },
  {
    what: 'Spanish: Fuerza in lbf and Apertura in inches, tab separated, specimen from "Probeta"',
    text: 'Probeta\tQ7\nTiempo (s)\tFuerza (lbf)\tApertura (in)\n0\t0\t0\n1\t100\t0.001\n2\t50\t0.002\n',
    x: [0, 0.0254, 0.0508], y: [0, 444.82216152605, 222.411080763025], xLabel: 'Apertura', yLabel: 'Fuerza', xKind: 'cmod', specimen: 'Q7',
  },
  {
    what: 'Spanish: Carga and Desplazamiento',
    text: 'Carga (kN),Desplazamiento (mm)\n0,0\n1.2,0.3\n0.8,0.6\n',
    x: [0, 0.3, 0.6], y: [0, 1200, 800], xLabel: 'Desplazamiento', yLabel: 'Carga', xKind: 'displacement',
  },
  {
    what: 'English: Crosshead, Stroke and Position are displacements',
    text: 'Time (s),Force (kN),Crosshead (mm)\n0,0,0\n1,1,0.1\n2,0.5,0.2\n',
    x: [0, 0.1, 0.2], y: [0, 1000, 500], xLabel: 'Crosshead', yLabel: 'Force', xKind: 'displacement',
  },
  {
    what: 'columns by number and units from the options (a header without units)',
    text: 'Specimen, S-1\nt,a,b\n0,0,0\n1,2,40\n2,1,80\n',
    opts: { x: 3, y: 2, xUnit: 'µm', yUnit: 'kN', xKind: 'cmod' },
    x: [0, 0.04, 0.08], y: [0, 2000, 1000], xLabel: 'b', yLabel: 'a', xKind: 'cmod', specimen: 'S-1',
  },
  {
    what: 'a unit option overrides a header unit, with a note',
    text: 'Load [N];CMOD [mm]\n0;0\n2;0,1\n',
    opts: { yUnit: 'kN' }, x: [0, 0.1], y: [0, 2000], xLabel: 'CMOD', yLabel: 'Load', xKind: 'cmod',
  },
];

describe('machine exports in four languages', () => {
  for (const e of exports) {
    it(e.what, () => {
      const c = parseLabCurve(e.text, 'export.csv', e.opts);
      expect(c.xLabel).toBe(e.xLabel);
      expect(c.yLabel).toBe(e.yLabel);
      expect(c.xKind).toBe(e.xKind);
      if (e.specimen !== undefined) expect(c.specimen).toBe(e.specimen);
      expect(c.x.length).toBe(e.x.length);
      e.x.forEach((v, i) => expect(c.x[i]).toBeCloseTo(v, 12));
      e.y.forEach((v, i) => expect(c.y[i]).toBeCloseTo(v, 9));
    });
  }

  it('the override of a header unit is noted', () => {
    const c = parseLabCurve('Load [N];CMOD [mm]\n0;0\n2;0,1\n', 'a.csv', { yUnit: 'kN' });
    expect(c.notes.join(' ')).toMatch(/column "Load" says N, read as kN as --load-unit says/);
  });

  it('column meanings: CMOD-like and displacement-like names in four languages', () => {
    for (const n of ['CMOD', 'COD', 'crack opening', 'Rissöffnung', 'Rissoeffnung', 'ouverture', 'Apertura de fisura', 'clip gauge']) expect(xKindOf(n), n).toBe('cmod');
    for (const n of ['Displacement', 'deflection', 'Crosshead', 'Stroke', 'Position', 'Weg', 'Traverse', 'Durchbiegung', 'déplacement', 'flèche', 'desplazamiento', 'flecha']) expect(xKindOf(n), n).toBe('displacement');
    expect(xKindOf('Zeit')).toBe(null);
  });
});

describe('values and options that are refused with one sentence', () => {
  const bad: { what: string; text: string; opts?: LabColumns; message: RegExp }[] = [
    { what: 'an overflowing load (1e999)', text: 'cmod,load\n0,0\n0.1,1e999\n0.2,5\n', message: /^lab\.csv line 3: the value "1e999" is too large for a number: expected a finite load/ },
    { what: 'an overflowing opening', text: 'cmod;load\n0;0\n1e400;5\n0,2;4\n', message: /^lab\.csv line 3: the value "1e400" is too large for a number: expected a finite opening/ },
    { what: 'a load column of zeros', text: 'cmod,load\n0,0\n0.1,0\n0.2,0\n', message: /^lab\.csv: the load column "load" is zero in every row: expected a measured load in N or kN/ },
    { what: 'an opening that never changes', text: 'cmod,load\n0,0\n0,10\n0,5\n', message: /^lab\.csv: the opening column "cmod" never changes/ },
    { what: 'a header without load or force in any language', text: 'Zeit;Weg\n0;0\n1;1\n', message: /no column named like load or force \(or Kraft, Last, charge, effort, fuerza, carga\); columns are: Zeit, Weg \(choose one with --load-column\)$/ },
    { what: 'a load unit that is not a force', text: 'a,b\n0,0\n1,1\n', opts: { yUnit: 'mm' }, message: /^--load-unit must be a force unit: N, kN, daN, lbf or kip \(found "mm"\)$/ },
    { what: 'an opening unit that is not a length', text: 'a,b\n0,0\n1,1\n', opts: { xUnit: 'kN' }, message: /^--x-unit must be a length unit: mm, µm, cm, m or in \(found "kN"\)$/ },
  ];
  for (const b of bad) {
    it(`refuses ${b.what}`, () => {
      let err: unknown;
      try { parseLabCurve(b.text, 'lab.csv', b.opts); } catch (e) { err = e; }
      expect(err).toBeInstanceOf(InputError);
      expect((err as Error).message).toMatch(b.message);
      expect((err as Error).message).not.toMatch(/\n/);
    });
  }
});
