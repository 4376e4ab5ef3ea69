import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { execFileSync } from 'node:child_process';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { parseLabCurve, readLabCurve, type LabColumns } from '../src/lab/import.js';
import { InputError } from '../src/errors.js';

interface Good { what: string; text: string; opts?: LabColumns; x: number[]; y: number[]; xLabel?: string; yLabel?: string; notes?: RegExp[] }

// Parsing conventions below are common practice for exported test data.
const good: Good[] = [
  {
    what: 'comma separated, units in brackets, kN',
    text: 'cmod [mm],load [kN]\n0,0\n0.01,1.5\n0.02,2.25\n',
    x: [0, 0.01, 0.02], y: [0, 1500, 2250], xLabel: 'cmod', yLabel: 'load',
    notes: [/y: column "load" in kN, converted to N/],
  },
  {
    what: 'semicolon separated with decimal commas, µm and kN in other spellings',
    text: 'CMOD (µm);Load/kN\n0;0\n12,5;1,5\n25;2,0\n',
    x: [0, 0.0125, 0.025], y: [0, 1500, 2000], xLabel: 'CMOD', yLabel: 'Load',
    notes: [/x: column "CMOD" in µm, converted to mm/, /decimal commas/],
  },
  {
    what: 'tab separated, force first, underscore units',
    text: 'force_N\tdisplacement_mm\n0\t0\n100\t0.05\n150\t0.1\n',
    x: [0, 0.05, 0.1], y: [0, 100, 150], xLabel: 'displacement', yLabel: 'force',
  },
  {
    what: 'blank separated with comments and free text before the data, Greek mu, CRLF',
    text: '# machine export\r\n% operator: A\r\n// beam B3\r\nThree-point bending test of beam B3\r\nLoad [N]  CMOD [μm]\r\n0  0\r\n250  40\r\n300  80\r\n',
    x: [0, 0.04, 0.08], y: [0, 250, 300],
  },
  {
    what: 'names, then a line of units, then the data',
    text: 'time;load;cmod\ns;kN;um\n0;0;0\n1;1,2;10\n2;1,6;20\n',
    x: [0, 0.01, 0.02], y: [0, 1200, 1600],
  },
  {
    what: 'no header: columns 1 and 2 in mm and N',
    text: '0,0\n0.1,100\n0.2,50\n',
    x: [0, 0.1, 0.2], y: [0, 100, 50], notes: [/no header line: x is column 1, y is column 2/, /has no unit, taken as mm/],
  },
  {
    what: 'columns by number',
    text: 'time;load;crack opening\n0;0;0\n1;10;0,5\n2;5;1\n',
    opts: { x: 3, y: 2 },
    x: [0, 0.5, 1], y: [0, 10, 5], xLabel: 'crack opening',
  },
  {
    what: 'columns by name, case and unit ignored',
    text: 'Time [s],Stroke [mm],Load [N],COD [mm]\n0,0,0,0\n1,0.2,100,0.01\n2,0.4,120,0.03\n',
    opts: { x: 'stroke', y: 'LOAD [N]' },
    x: [0, 0.2, 0.4], y: [0, 100, 120], xLabel: 'Stroke',
  },
  {
    what: 'default x prefers cmod over displacement, y skips a "load point displacement" column',
    text: 'load point displacement [mm];cmod [mm];load [N]\n0;0;0\n0,1;0,02;10\n0,2;0,04;12\n',
    x: [0, 0.02, 0.04], y: [0, 10, 12], xLabel: 'cmod', yLabel: 'load',
  },
  {
    what: 'quoted header fields with commas inside',
    text: '"CMOD, mm","Load, kN"\n0,0\n0.5,2\n1,1\n',
    x: [0, 0.5, 1], y: [0, 2000, 1000], xLabel: 'CMOD', yLabel: 'Load',
  },
  {
    what: 'one stray text row inside the data is dropped and noted',
    text: 'cmod;load\n' + Array.from({ length: 30 }, (_, i) => `${i};${i + 1}`).join('\n').replace('\n7;8\n', '\n7;8\npause\n') + '\n',
    x: Array.from({ length: 30 }, (_, i) => i), y: Array.from({ length: 30 }, (_, i) => i + 1),
    notes: [/dropped 1 non-numeric row: line 10/],
  },
  {
    what: 'exactly repeated points are merged, a path is not sorted',
    text: 'cmod,load\n0,0\n0.1,5\n0.1,5\n0.1,5\n0.05,2\n0.2,6\n0.1,5\n',
    x: [0, 0.1, 0.05, 0.2, 0.1], y: [0, 5, 2, 6, 5], notes: [/merged 2 repeated points/],
  },
  {
    what: 'the unloading tail after failure is dropped, an earlier unloading cycle kept',
    text: 'cmod,load\n0,0\n1,100\n0.5,50\n1.5,120\n2,60\n3,10\n4,1\n5,0.5\n4.8,0.2\n3,0\n1,0\n',
    x: [0, 1, 0.5, 1.5, 2, 3, 4, 5], y: [0, 100, 50, 120, 60, 10, 1, 0.5],
    notes: [/dropped 3 points of unloading after failure \(from line 10\)/],
  },
  {
    what: 'a curve recorded with negative load is mirrored',
    text: 'deflection [mm];force [kN]\n0;0\n0,1;-2\n0,2;-1\n',
    x: [0, 0.1, 0.2], y: [0, 2000, 1000], notes: [/y: values are negative in the file, sign changed/],
  },
];

describe('lab curve import', () => {
  for (const g of good) {
    it(g.what, () => {
      const c = parseLabCurve(g.text, 'lab.csv', g.opts);
      expect(c.name).toBe('lab.csv');
      expect(c.xUnit).toBe('mm');
      expect(c.yUnit).toBe('N');
      expect(Array.from(c.x).length).toBe(g.x.length);
      g.x.forEach((v, i) => expect(c.x[i]).toBeCloseTo(v, 12));
      g.y.forEach((v, i) => expect(c.y[i]).toBeCloseTo(v, 9));
      if (g.xLabel) expect(c.xLabel).toBe(g.xLabel);
      if (g.yLabel) expect(c.yLabel).toBe(g.yLabel);
      for (const re of g.notes ?? []) expect(c.notes.some((n) => re.test(n)), `${re} in ${JSON.stringify(c.notes)}`).toBe(true);
    });
  }

  const bad: { what: string; text: string; opts?: LabColumns; message: string }[] = [
    {
      what: 'many text rows inside the data',
      text: 'cmod;load\n0;0\n0,1;1\n0,2;2\n0,3;3\n0,4;4\nabc\n0,5;5\nxyz\n',
      message: 'lab.csv line 7: expected 2 numeric columns separated by ";" (found "abc")',
    },
    {
      what: 'a column asked by name that does not exist',
      text: 'time;load;crack opening\n0;0;0\n1;1;1\n',
      opts: { x: 'cmod' },
      message: 'lab.csv: no column named "cmod"; columns are: time, load, crack opening',
    },
    {
      what: 'no column looks like an opening',
      text: 'time,load\n0,0\n1,1\n',
      message: 'lab.csv: no column named like CMOD, COD, opening, displacement, deflection, crosshead, stroke, position (or Weg, Traverse, Rissöffnung, déplacement, ouverture, desplazamiento, apertura) for x; columns are: time, load (choose one with --x-column)',
    },
    {
      what: 'a column number beyond the data',
      text: 'cmod,load\n0,0\n1,1\n',
      opts: { y: 5 },
      message: 'lab.csv: column 5 asked for y, but the data have 2 columns (1 to 2)',
    },
    {
      what: 'a name asked of a file without header',
      text: '0;1\n1;2\n',
      opts: { x: 'cmod' },
      message: 'lab.csv: no column named "cmod": the file has no header line, so choose columns by number (1 to 2)',
    },
    {
      what: 'x in a unit that is not a length',
      text: 'time [s],load [N]\n0,0\n1,1\n',
      opts: { x: 'time' },
      message: 'lab.csv: column "time" is in s: expected a length (mm, µm, cm, m, in) for x, or give the unit with --x-unit',
    },
    {
      what: 'the empty file',
      text: '',
      message: 'lab.csv is empty: expected rows of at least 2 numbers separated by commas, semicolons or tabs',
    },
    {
      what: 'only comments',
      text: '# nothing\n% here\n\n',
      message: 'lab.csv is empty: expected rows of at least 2 numbers separated by commas, semicolons or tabs',
    },
    {
      what: 'text without numbers',
      text: 'cmod;load\nnone;yet\n',
      message: 'lab.csv: no data found: expected rows of at least 2 numbers separated by commas, semicolons or tabs',
    },
    {
      what: 'a single data row',
      text: 'cmod,load\n0,0\n',
      message: 'lab.csv: only 1 data point found: a curve needs at least 2',
    },
  ];
  for (const b of bad) {
    it(`rejects ${b.what}`, () => {
      let err: unknown;
      try { parseLabCurve(b.text, 'lab.csv', b.opts); } catch (e) { err = e; }
      expect(err).toBeInstanceOf(InputError);
      expect((err as Error).message).toBe(b.message);
    });
  }

  describe('from files', () => {
    const dir = mkdtempSync(join(tmpdir(), 'lab-'));
    afterAll(() => rmSync(dir, { recursive: true, force: true }));

    it('reads a Latin-1 file with a micro sign', () => {
      const p = join(dir, 'b3.txt');
      writeFileSync(p, Buffer.from('CMOD (\u00b5m);Load (kN)\n0;0\n100;2,5\n200;3\n', 'latin1'));
      const c = readLabCurve(p);
      expect(c.name).toBe('b3.txt');
      expect(Array.from(c.x)).toEqual([0, 0.1, 0.2]);
      expect(Array.from(c.y)).toEqual([0, 2500, 3000]);
      expect(c.notes).toContain('not valid UTF-8: read as Latin-1');
    });

    it('names a missing file', () => {
      expect(() => readLabCurve(join(dir, 'none.csv'))).toThrow(/the lab curve .*none\.csv does not exist/);
    });

    it('refuses a pipe at once instead of waiting for a writer', () => {
      const p = join(dir, 'pipe.csv');
      execFileSync('mkfifo', [p]);
      expect(() => readLabCurve(p)).toThrow(/the lab curve .*pipe\.csv must be a regular file \(found a pipe\)/);
    });
  });
});
