import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { csvCell, formatNumber, RowWriter, writeFileAtomic } from '../src/output/files.js';
import { OutputFolder, defaultOutDir, lockText, safeFolderName } from '../src/output/folder.js';
import { shellQuote } from '../src/output/shell.js';
import { esc } from '../src/output/svg.js';
import { svgToPng } from '../src/output/png.js';

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
  it('quotes as RFC 4180 asks and guards cells a spreadsheet would run as formulas (common practice)', () => {
    expect(csvCell('a\nb')).toBe('"a\nb"');
    expect(csvCell('a\rb')).toBe('"a\rb"');
    expect(csvCell('=1+2')).toBe("'=1+2");
    expect(csvCell('+cmd')).toBe("'+cmd");
    expect(csvCell('-x')).toBe("'-x");
    expect(csvCell('@SUM(A1)')).toBe("'@SUM(A1)");
    expect(csvCell('\tx')).toBe("'\tx");
    expect(csvCell('=HYPERLINK("x","y")')).toBe('"\'=HYPERLINK(""x"",""y"")"');
    // text that is a number stays as it is
    expect(csvCell('-1.5')).toBe('-1.5');
    expect(csvCell('+2e-3')).toBe('+2e-3');
    expect(csvCell('mid-top')).toBe('mid-top');
  });
});

describe('names and text from the case', () => {
  it('never makes a folder name that leaves out/ or hides', () => {
    expect(defaultOutDir('..')).toBe(join('out', 'case'));
    expect(defaultOutDir('...')).toBe(join('out', 'case'));
    expect(defaultOutDir('.hidden')).toBe(join('out', 'hidden'));
    expect(safeFolderName('a/b\\c d')).toBe('a_b_c_d');
    expect(safeFolderName('beam\n')).toBe('beam_');
    expect(safeFolderName('poutre-béton')).toBe('poutre-béton');
  });
  it('quotes paths for a POSIX shell', () => {
    expect(shellQuote('out/beam')).toBe('out/beam');
    expect(shellQuote('my beam.yaml')).toBe("'my beam.yaml'");
    expect(shellQuote("it's; rm -rf ~")).toBe("'it'\\''s; rm -rf ~'");
    expect(shellQuote('$(x)')).toBe("'$(x)'");
  });
  it('escapes text for SVG so that control characters never break the XML', async () => {
    expect(esc('a\u0001b<&>')).toBe('a\ufffdb&lt;&amp;&gt;');
    expect(esc('tab\tand\nline')).toBe('tab\tand\nline');
    expect(esc('lone \ud800 surrogate')).toBe('lone \ufffd surrogate');
    const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="40" height="20"><text y="10">${esc('title \u001b[31m\u0000')}</text></svg>`;
    const p = join(dir, 'ctl.png');
    await svgToPng(svg, p);
    expect(readFileSync(p).subarray(1, 4).toString()).toBe('PNG');
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

describe('OutputFolder', () => {
  it('holds one lock per folder, also within one process, and lets it go', () => {
    const d = join(dir, 'locked');
    const a = OutputFolder.open(d);
    a.lock();
    // the owner: process id first, then its start time, machine and boot
    expect(readFileSync(join(d, '.rupta.lock'), 'utf8')).toBe(lockText());
    expect(readFileSync(join(d, '.rupta.lock'), 'utf8').split('\n')[0]).toBe(String(process.pid));
    expect(() => OutputFolder.open(d).lock()).toThrow(/is in use by another run of this program/);
    a.release();
    const b = OutputFolder.open(d);
    b.lock();
    b.release();
    expect(readdirSync(d)).toEqual([]);
  });
  it('refuses names that leave the folder', () => {
    const f = OutputFolder.open(join(dir, 'names'));
    for (const bad of ['../x', '/etc/passwd', 'a/../../x', '..', '.']) expect(() => f.file(bad)).toThrow(/is not a name inside the output folder/);
    expect(f.file('frames/step-0001.svg')).toBe(join(dir, 'names', 'frames', 'step-0001.svg'));
  });
});
