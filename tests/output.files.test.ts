import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { csvCell, formatNumber, RowWriter, writeFileAtomic } from '../src/output/files.js';

const dir = mkdtempSync(join(tmpdir(), 'rupta-files-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('writeFileAtomic', () => {
  it('writes, overwrites and leaves no temp files', () => {
    const p = join(dir, 'sub', 'a.json');
    writeFileAtomic(p, '{"v":1}');
    writeFileAtomic(p, new Uint8Array([0x7b, 0x7d]));
    expect(readFileSync(p, 'utf8')).toBe('{}');
    expect(readdirSync(join(dir, 'sub'))).toEqual(['a.json']);
  });
});

describe('formatNumber', () => {
  it('is compact and deterministic', () => {
    expect(formatNumber(0.1 + 0.2)).toBe('0.3');
    expect(formatNumber(1 / 3)).toBe('0.333333333');
    expect(formatNumber(-2 / 3)).toBe('-0.666666667');
    expect(formatNumber(123456789.123)).toBe('123456789');
    expect(formatNumber(1234567.891234)).toBe('1234567.89');
    expect(formatNumber(0.000123456789012)).toBe('0.000123456789');
    expect(formatNumber(42)).toBe('42');
    expect(formatNumber(-0)).toBe('0');
    expect(formatNumber(2.5e-8)).toBe('2.5e-8');
    expect(formatNumber(NaN)).toBe('NaN');
  });
  it('quotes text cells only when needed', () => {
    expect(csvCell('cmod')).toBe('cmod');
    expect(csvCell('a,b')).toBe('"a,b"');
    expect(csvCell('say "x"')).toBe('"say ""x"""');
    expect(csvCell(null)).toBe('');
  });
});

describe('RowWriter', () => {
  const header = 'step,control,load_N,cmod_mm';
  it('writes the header once and one line per row, readable before close', () => {
    const p = join(dir, 'curve.csv');
    const w = new RowWriter(p, header);
    w.append([1, 'cmod', 1234.5, null]);
    expect(readFileSync(p, 'utf8')).toBe(`${header}\n1,cmod,1234.5,\n`);
    w.append([2, 'cmod', 2469.000000001, 0.01]);
    w.close();
    expect(readFileSync(p, 'utf8').split('\n')).toEqual([header, '1,cmod,1234.5,', '2,cmod,2469,0.01', '']);
    expect(() => w.append([3, 'cmod', 1, 1])).toThrow(/closed/);
  });
  it('refuses rows of the wrong length', () => {
    const w = new RowWriter(join(dir, 'bad.csv'), header);
    expect(() => w.append([1, 2])).toThrow(/4/);
    w.close();
  });
  it('continues an existing table when asked, starts afresh otherwise', () => {
    const p = join(dir, 'resume.csv');
    const a = new RowWriter(p, header);
    a.append([1, 'x', 1, 1]);
    a.close();
    const b = new RowWriter(p, header, { keepExisting: true });
    b.append([2, 'x', 2, 2]);
    b.close();
    expect(readFileSync(p, 'utf8')).toBe(`${header}\n1,x,1,1\n2,x,2,2\n`);
    new RowWriter(p, header).close();
    expect(readFileSync(p, 'utf8')).toBe(`${header}\n`);
  });
});
