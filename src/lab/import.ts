// Measured load–opening curves from delimited text files as laboratory software writes
// them: header and comment lines, comma/semicolon/tab/space separators, decimal commas,
// units in the header. Values come out in mm and N, in the order of the test.

import { readFileBytes } from '../io/read.js';
import { basename } from 'node:path';
import { InputError } from '../errors.js';

export interface LabCurve {
  name: string;
  x: Float64Array;
  y: Float64Array;
  xLabel: string;
  yLabel: string;
  xUnit: 'mm';
  yUnit: 'N';
  /** What the x column measures, from its name or the options; null when nothing says. */
  xKind?: XKind | null;
  /** Specimen id from the file's header block ("Specimen: B-3", "Probe", "Éprouvette", "Probeta"), when present. */
  specimen?: string | null;
  /** What was assumed, converted or dropped while reading. */
  notes: string[];
}

/** The two openings a testing machine records against the load. */
export type XKind = 'cmod' | 'displacement';

/**
 * Columns by header name (case-insensitive, unit ignored) or by 1-based number; units for
 * columns whose header has none (or a wrong one); what the x column measures.
 */
export interface LabColumns {
  x?: string | number;
  y?: string | number;
  xUnit?: string;
  yUnit?: string;
  xKind?: XKind;
}

type Sep = '\t' | ';' | ',' | ' ';
const SEPS: Sep[] = ['\t', ';', ',', ' ']; // order breaks ties
const SEP_NAME: Record<Sep, string> = { '\t': 'tabs', ';': '";"', ',': '","', ' ': 'spaces' };

type Kind = 'length' | 'force' | 'other';
interface Unit { label: string; kind: Kind; scale: number }
const UNITS: Record<string, Unit> = {
  mm: { label: 'mm', kind: 'length', scale: 1 },
  'µm': { label: 'µm', kind: 'length', scale: 1e-3 },
  um: { label: 'µm', kind: 'length', scale: 1e-3 },
  micron: { label: 'µm', kind: 'length', scale: 1e-3 },
  microns: { label: 'µm', kind: 'length', scale: 1e-3 },
  cm: { label: 'cm', kind: 'length', scale: 10 },
  m: { label: 'm', kind: 'length', scale: 1e3 },
  in: { label: 'in', kind: 'length', scale: 25.4 },
  inch: { label: 'in', kind: 'length', scale: 25.4 },
  n: { label: 'N', kind: 'force', scale: 1 },
  kn: { label: 'kN', kind: 'force', scale: 1e3 },
  dan: { label: 'daN', kind: 'force', scale: 10 },
  lbf: { label: 'lbf', kind: 'force', scale: 4.4482216152605 }, // exact by definition of the pound-force
  kip: { label: 'kip', kind: 'force', scale: 4448.2216152605 },
};
// Units that may follow a name without brackets ("force_N", "cmod mm"); a bare "m" or "in" is too ambiguous.
const SUFFIX_UNITS = new Set(['mm', 'µm', 'um', 'cm', 'n', 'kn', 'dan', 'lbf']);
const OTHER_UNITS = new Set(['s', 'ms', 'min', 'h', '%', '-', 'v', 'mv', 'hz', '°c', 'mpa', 'kpa']);

// Column names of machine exports in English, German, French and Spanish, matched on the
// lower-cased name with accents removed; the opening gauge first, since it is the better reading.
const CMOD_PATTERNS = [/cmod/, /crack mouth/, /\bcod\b/, /opening/, /rissoffnung/, /rissoeffnung/, /rissaufweitung/, /offnung/,
  /ouverture/, /apertura/, /clip/];
const DISP_PATTERNS = [/displacement/, /\bdisp\b/, /deflection/, /\bdefl\b/, /crosshead/, /cross head/, /stroke/, /position/,
  /travel/, /extension/, /weg\b/, /traverse/, /durchbiegung/, /verschiebung/, /deplacement/, /fleche/, /course/,
  /desplazamiento/, /deflexion/, /flecha/, /carrera/, /posicion/];
const X_PATTERNS = [...CMOD_PATTERNS, ...DISP_PATTERNS];
const Y_PATTERNS = [/load/, /force/, /kraft/, /\blast\b/, /charge/, /effort/, /fuerza/, /carga/];
const X_LIKE = 'CMOD, COD, opening, displacement, deflection, crosshead, stroke, position (or Weg, Traverse, Rissöffnung, déplacement, ouverture, desplazamiento, apertura)';
const Y_LIKE = 'load or force (or Kraft, Last, charge, effort, fuerza, carga)';
// Header lines naming the specimen: "Specimen;B-3", "Probe: P1", "Éprouvette = E2", "Probeta\tQ7".
const SPECIMEN_KEY = /^(specimen( id| name| no\.?)?|sample( id| name)?|probe|prufkorper|probekorper|eprouvette|echantillon|probeta|muestra)$/;

/** Lower case, accents and ß folded, blanks and underscores as one space. */
const fold = (s: string): string => s.normalize('NFD').replace(/[\u0300-\u036f]/g, '').replace(/ß/g, 'ss').toLowerCase().replace(/[\s_]+/g, ' ').trim();

/** What an x column measures, from its name; null when the name says neither. */
export function xKindOf(name: string): XKind | null {
  const n = fold(name);
  if (CMOD_PATTERNS.some((re) => re.test(n))) return 'cmod';
  if (DISP_PATTERNS.some((re) => re.test(n))) return 'displacement';
  return null;
}

const NUM = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const NUM_COMMA = /^[+-]?(\d+,\d*|,\d+)([eE][+-]?\d+)?$/;

/** Parse one field; decimal commas are allowed unless the comma separates fields. */
function toNumber(f: string, sep: Sep): number {
  if (NUM.test(f)) return Number(f);
  if (sep !== ',' && NUM_COMMA.test(f)) return Number(f.replace(',', '.'));
  return NaN;
}

function unquote(f: string): string {
  const t = f.trim();
  return t.length >= 2 && t[0] === '"' && t[t.length - 1] === '"' ? t.slice(1, -1).trim() : t;
}

/** Split on sep outside double quotes; spaces split on runs of blanks. */
function splitFields(line: string, sep: Sep): string[] {
  if (sep === ' ') {
    const t = line.trim();
    return t === '' ? [] : t.split(/[ \t]+/).map(unquote);
  }
  const out: string[] = [];
  let start = 0, quoted = false;
  for (let i = 0; i < line.length; i++) {
    const c = line[i];
    if (c === '"') quoted = !quoted;
    else if (c === sep && !quoted) { out.push(unquote(line.slice(start, i))); start = i + 1; }
  }
  out.push(unquote(line.slice(start)));
  while (out.length > 0 && out[out.length - 1] === '') out.pop(); // trailing separators
  return out;
}

function isComment(t: string): boolean {
  return t.startsWith('#') || t.startsWith('%') || t.startsWith('//');
}

/** 2: every field a number, 1: at least two numbers and one other field, 0: not data. */
function rowClass(fields: string[], sep: Sep): number {
  let num = 0, other = 0;
  for (const f of fields) {
    if (f === '') continue;
    if (Number.isNaN(toNumber(f, sep))) other++; else num++;
  }
  if (num < 2) return 0;
  return other === 0 ? 2 : other === 1 ? 1 : 0;
}

/** The unit named by an option (--x-unit, --load-unit), or an error naming the option. */
export function unitOption(u: string, kind: Kind, option: string): Unit {
  const unit = lookupUnit(u, false);
  if (!unit || unit.kind !== kind) {
    throw new InputError(`${option} must be ${kind === 'length' ? 'a length unit: mm, µm, cm, m or in' : 'a force unit: N, kN, daN, lbf or kip'} (found "${u}")`);
  }
  return unit;
}

function lookupUnit(u: string, suffix: boolean): Unit | null {
  const k = u.trim().replace('μ', 'µ').toLowerCase();
  if (suffix && !SUFFIX_UNITS.has(k)) return null;
  return UNITS[k] ?? null;
}

interface Column { name: string; unit: Unit | null; unitText: string | null }

const cleanName = (s: string): string => s.trim().replace(/[\s,;:_-]+$/, '');

/** Split a header field into its name and unit: "cmod [mm]", "CMOD (µm)", "Load/kN", "force_N", "load in kN". */
function parseHeaderField(field: string): Column {
  const f = field.trim();
  let m = /^(.*?)\s*[[(]\s*([^\])]*?)\s*[\])]$/.exec(f);
  if (m) return { name: cleanName(m[1]!), unit: lookupUnit(m[2]!, false), unitText: m[2]! };
  m = /^(.*?)\s*\/\s*([A-Za-zµμ]+)$/.exec(f);
  if (m && lookupUnit(m[2]!, false)) return { name: cleanName(m[1]!), unit: lookupUnit(m[2]!, false), unitText: m[2]! };
  m = /^(.*?)\s+in\s+([A-Za-zµμ]+)$/i.exec(f);
  if (m && lookupUnit(m[2]!, false)) return { name: cleanName(m[1]!), unit: lookupUnit(m[2]!, false), unitText: m[2]! };
  m = /^(.*?)[\s_,]+([A-Za-zµμ]+)$/.exec(f);
  if (m && m[1]!.trim() !== '' && lookupUnit(m[2]!, true)) return { name: cleanName(m[1]!), unit: lookupUnit(m[2]!, true), unitText: m[2]! };
  return { name: f, unit: null, unitText: null };
}

/** A field of a units line under the names: "mm", "[kN]", "(µm)". */
function unitToken(field: string): string | null {
  const t = field.trim().replace(/^[[(]\s*/, '').replace(/\s*[\])]$/, '');
  if (t === '') return null;
  const k = t.replace('μ', 'µ').toLowerCase();
  return UNITS[k] || OTHER_UNITS.has(k) ? t : null;
}

const norm = fold;

function headerFields(line: string, sep: Sep): string[] {
  const f = splitFields(line, sep);
  if (sep !== ' ') return f;
  // Blank-separated headers: a bracketed unit belongs to the name before it.
  const out: string[] = [];
  for (const t of f) {
    if (out.length > 0 && /^[[(]/.test(t)) out[out.length - 1] += ' ' + t;
    else out.push(t);
  }
  return out;
}

const quoteLine = (t: string): string => (t.length > 40 ? t.slice(0, 37) + '...' : t);

/**
 * Read a measured curve from text. Rules:
 * - separator: the one of tab, ";", ",", blanks under which most lines are all numbers;
 *   decimal commas are accepted unless "," separates the fields;
 * - data start at the first numeric line with the usual number of fields; the nearest
 *   earlier non-comment line with as many fields is the header (a line of bare units
 *   just above the data counts as the header's units); comments start with #, % or //;
 * - non-numeric rows inside the data are dropped if at most max(1, 5 %) of the rows, else an error;
 * - units: µm, cm, m → mm and kN → N; a column without unit is taken as mm or N (noted);
 * - a curve whose largest value is negative is mirrored so its peak is positive (noted);
 * - consecutive identical points are merged; points are never sorted;
 * - the unloading tail after failure is dropped: after the peak, once the load has fallen
 *   below 2 % of the peak, everything from the first point where x decreases is cut.
 */
export function parseLabCurve(text: string, name: string, opts: LabColumns = {}): LabCurve {
  const notes: string[] = [];
  if (opts.xUnit !== undefined) unitOption(opts.xUnit, 'length', '--x-unit');
  if (opts.yUnit !== undefined) unitOption(opts.yUnit, 'force', '--load-unit');
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  if (text.includes('\u0000')) throw new InputError(`${name} looks like a binary or UTF-16 file: expected plain text with rows of numbers`);
  const lines = text.split(/\r\n|\n|\r/);
  const content: number[] = []; // indices of non-empty, non-comment lines
  for (let i = 0; i < lines.length; i++) {
    const t = lines[i]!.trim();
    if (t !== '' && !isComment(t)) content.push(i);
  }
  if (content.length === 0) {
    throw new InputError(`${name} is empty: expected rows of at least 2 numbers separated by commas, semicolons or tabs`);
  }

  // Separator: most all-numeric lines; failing that, most nearly numeric lines.
  let sep: Sep = ',';
  let best = 0;
  for (const pass of [2, 1]) {
    for (const s of SEPS) {
      let count = 0;
      for (const i of content) if (rowClass(splitFields(lines[i]!, s), s) >= pass) count++;
      if (count > best) { best = count; sep = s; }
    }
    if (best > 0) break;
  }
  if (best === 0) {
    throw new InputError(`${name}: no data found: expected rows of at least 2 numbers separated by commas, semicolons or tabs`);
  }

  // The usual field count of data rows, and the first such row.
  const counts = new Map<number, number>();
  for (const i of content) {
    const f = splitFields(lines[i]!, sep);
    if (rowClass(f, sep) > 0) counts.set(f.length, (counts.get(f.length) ?? 0) + 1);
  }
  let nCols = 0, nBest = 0;
  for (const [k, v] of counts) if (v > nBest || (v === nBest && k > nCols)) { nCols = k; nBest = v; }
  let start = -1;
  for (const i of content) {
    const f = splitFields(lines[i]!, sep);
    if (f.length === nCols && rowClass(f, sep) > 0) { start = i; break; }
  }

  // Header: nearest earlier line with nCols fields; a units line right above the data.
  let columns: Column[] | null = null;
  const before = content.filter((i) => i < start);
  let unitsRow: string[] | null = null;
  for (let k = before.length - 1; k >= 0; k--) {
    const f = headerFields(lines[before[k]!]!, sep);
    if (f.length !== nCols) continue;
    if (k === before.length - 1 && unitsRow === null && f.every((t) => unitToken(t) !== null)) { unitsRow = f; continue; }
    columns = f.map(parseHeaderField);
    if (unitsRow) {
      for (let c = 0; c < nCols; c++) {
        const col = columns[c]!;
        if (col.unitText === null) { col.unitText = unitToken(unitsRow[c]!); col.unit = lookupUnit(col.unitText ?? '', false); }
      }
    }
    break;
  }
  const hasHeader = columns !== null;
  const cols: Column[] = columns ?? Array.from({ length: nCols }, (_, c) => {
    const unitText = unitsRow ? unitToken(unitsRow[c]!) : null;
    return { name: `column ${c + 1}`, unit: lookupUnit(unitText ?? '', false), unitText };
  });
  const list = cols.map((c) => c.name).join(', ');

  const pick = (axis: 'x' | 'y', want: string | number | undefined, other: number): number => {
    if (typeof want === 'number') {
      if (!Number.isInteger(want) || want < 1 || want > nCols) {
        throw new InputError(`${name}: column ${want} asked for ${axis}, but the data have ${nCols} columns (1 to ${nCols})`);
      }
      return want - 1;
    }
    if (typeof want === 'string') {
      const key = norm(parseHeaderField(want).name);
      const c = cols.findIndex((col) => norm(col.name) === key || norm(col.name + ' ' + (col.unitText ?? '')) === norm(want));
      if (c >= 0) return c;
      if (!hasHeader) throw new InputError(`${name}: no column named "${want}": the file has no header line, so choose columns by number (1 to ${nCols})`);
      throw new InputError(`${name}: no column named "${want}"; columns are: ${list}`);
    }
    if (!hasHeader) return axis === 'x' ? 0 : other === 0 ? 1 : 0;
    const isX = (c: Column): boolean => X_PATTERNS.some((re) => re.test(norm(c.name)));
    if (axis === 'x') {
      for (const re of X_PATTERNS) {
        const c = cols.findIndex((col) => re.test(norm(col.name)));
        if (c >= 0) return c;
      }
      throw new InputError(`${name}: no column named like ${X_LIKE} for x; columns are: ${list} (choose one with --x-column)`);
    }
    for (const re of Y_PATTERNS) {
      const c = cols.findIndex((col, k) => k !== other && re.test(norm(col.name)) && !isX(col));
      if (c >= 0) return c;
    }
    throw new InputError(`${name}: no column named like ${Y_LIKE}; columns are: ${list} (choose one with --load-column)`);
  };
  const xi = pick('x', opts.x, -1);
  const yi = pick('y', opts.y, xi);
  if (xi === yi) throw new InputError(`${name}: x and y are both column ${xi + 1} ("${cols[xi]!.name}"): choose two different columns`);
  if (!hasHeader) notes.push(`no header line: x is column ${xi + 1}, y is column ${yi + 1}`);

  const kindText = (kind: Kind): string => (kind === 'length' ? 'a length (mm, µm, cm, m, in)' : 'a force (N, kN, daN, lbf, kip)');
  const scaleOf = (c: number, kind: Kind, axis: string, base: string, given: string | undefined, option: string): number => {
    const col = cols[c]!;
    if (given !== undefined) {
      const u = unitOption(given, kind, option);
      if (col.unit !== null && col.unit.label !== u.label) notes.push(`${axis}: column "${col.name}" says ${col.unit.label}, read as ${u.label} as ${option} says`);
      else if (u.scale !== 1) notes.push(`${axis}: column "${col.name}" in ${u.label} (${option}), converted to ${base}`);
      return u.scale;
    }
    if (col.unit === null) {
      if (col.unitText !== null && col.unitText !== '') {
        throw new InputError(`${name}: column "${col.name}" is in ${col.unitText}: expected ${kindText(kind)} for ${axis}, or give the unit with ${option}`);
      }
      notes.push(`${axis}: column "${col.name}" has no unit, taken as ${base} (give ${option} otherwise)`);
      return 1;
    }
    if (col.unit.kind !== kind) {
      throw new InputError(`${name}: column "${col.name}" is in ${col.unit.label}: expected ${kindText(kind)} for ${axis}`);
    }
    if (col.unit.scale !== 1) notes.push(`${axis}: column "${col.name}" in ${col.unit.label}, converted to ${base}`);
    return col.unit.scale;
  };
  const sx = scaleOf(xi, 'length', 'x', 'mm', opts.xUnit, '--x-unit');
  const sy = scaleOf(yi, 'force', 'y', 'N', opts.yUnit, '--load-unit');
  const xKind: XKind | null = opts.xKind ?? (hasHeader ? xKindOf(cols[xi]!.name) : null);
  if (opts.xKind && hasHeader) {
    const named = xKindOf(cols[xi]!.name);
    if (named !== null && named !== opts.xKind) notes.push(`x: column "${cols[xi]!.name}" is named like ${named === 'cmod' ? 'a CMOD' : 'a displacement'} but is read as ${opts.xKind === 'cmod' ? 'CMOD' : 'load-point displacement'} as asked`);
  }

  // Specimen id from a "key; value" line of the header block.
  let specimen: string | null = null;
  for (const i of before) {
    const m = /^\s*([^:;=\t,]+?)\s*[:;=\t,]\s*(.+?)\s*$/.exec(lines[i]!);
    if (!m || !SPECIMEN_KEY.test(fold(m[1]!.replace(/^["']|["']$/g, '')))) continue;
    const v = m[2]!.split(/[;\t,]/)[0]!.replace(/^["']|["']$/g, '').trim();
    if (v !== '') { specimen = v.length > 40 ? v.slice(0, 40) : v; break; }
  }

  // Data rows.
  const xs: number[] = [], ys: number[] = [], at: number[] = [];
  const bad: number[] = [];
  let rows = 0, comma = false;
  for (const i of content) {
    if (i < start) continue;
    rows++;
    const f = splitFields(lines[i]!, sep);
    const fx = f[xi] ?? '', fy = f[yi] ?? '';
    const vx = toNumber(fx, sep), vy = toNumber(fy, sep);
    if (Number.isNaN(vx) || Number.isNaN(vy)) { bad.push(i); continue; }
    if (!Number.isFinite(vx * sx) || !Number.isFinite(vy * sy)) {
      throw new InputError(`${name} line ${i + 1}: the value "${Number.isFinite(vx * sx) ? fy : fx}" is too large for a number: expected a finite ${Number.isFinite(vx * sx) ? 'load' : 'opening'} in the column's unit`);
    }
    if (!comma && (fx.includes(',') || fy.includes(','))) comma = true;
    xs.push(vx * sx); ys.push(vy * sy); at.push(i + 1);
  }
  if (bad.length > Math.max(1, Math.floor(0.05 * rows))) {
    const i = bad[0]!;
    throw new InputError(`${name} line ${i + 1}: expected ${nCols} numeric columns separated by ${SEP_NAME[sep]} (found "${quoteLine(lines[i]!.trim())}")`);
  }
  if (bad.length > 0) notes.push(`dropped ${bad.length} non-numeric row${bad.length > 1 ? 's' : ''}: line${bad.length > 1 ? 's' : ''} ${bad.map((i) => i + 1).join(', ')}`);
  if (comma) notes.push('decimal commas read as decimal points');

  // Mirror a curve recorded with negative sign.
  for (const [v, axis] of [[xs, 'x'], [ys, 'y']] as const) {
    let big = 0;
    for (const t of v) if (Math.abs(t) > Math.abs(big)) big = t;
    if (big < 0) {
      for (let k = 0; k < v.length; k++) v[k] = -v[k]! + 0; // + 0 turns −0 into 0
      notes.push(`${axis}: values are negative in the file, sign changed`);
    }
  }

  // Merge consecutive repeats.
  let n = 0, merged = 0;
  for (let k = 0; k < xs.length; k++) {
    if (n > 0 && xs[k] === xs[n - 1] && ys[k] === ys[n - 1]) { merged++; continue; }
    xs[n] = xs[k]!; ys[n] = ys[k]!; at[n] = at[k]!; n++;
  }
  if (merged > 0) notes.push(`merged ${merged} repeated point${merged > 1 ? 's' : ''}`);

  // Drop the unloading tail after failure.
  let peak = 0;
  for (let k = 1; k < n; k++) if (ys[k]! > ys[peak]!) peak = k;
  const low = 0.02 * ys[peak]!;
  let cut = n;
  let k = peak + 1;
  while (k < n && !(ys[k]! < low)) k++;
  for (; k < n; k++) if (xs[k]! < xs[k - 1]!) { cut = k; break; }
  if (cut < n) {
    notes.push(`dropped ${n - cut} point${n - cut > 1 ? 's' : ''} of unloading after failure (from line ${at[cut]})`);
    n = cut;
  }
  if (n < 2) throw new InputError(`${name}: only ${n} data point${n === 1 ? '' : 's'} found: a curve needs at least 2`);
  let yMax = 0, xSpan = 0;
  for (let k = 0; k < n; k++) { yMax = Math.max(yMax, Math.abs(ys[k]!)); xSpan = Math.max(xSpan, Math.abs(xs[k]! - xs[0]!)); }
  if (!(yMax > 0)) throw new InputError(`${name}: the load column "${cols[yi]!.name}" is zero in every row: expected a measured load in N or kN (is it the right column? choose one with --load-column)`);
  if (!(xSpan > 0)) throw new InputError(`${name}: the opening column "${cols[xi]!.name}" never changes: expected a measured CMOD or displacement in mm (is it the right column? choose one with --x-column)`);

  return {
    name,
    x: Float64Array.from(xs.slice(0, n)),
    y: Float64Array.from(ys.slice(0, n)),
    xLabel: cols[xi]!.name,
    yLabel: cols[yi]!.name,
    xUnit: 'mm',
    yUnit: 'N',
    xKind,
    specimen,
    notes,
  };
}

/** Largest lab curve read (far more than a testing machine's export of one fracture test). */
export const MAX_LAB_BYTES = 64 * 1024 * 1024;

/** Read a measured curve from a file (UTF-8; Latin-1 if it is not valid UTF-8). */
export function readLabCurve(path: string, opts: LabColumns = {}): LabCurve {
  const name = basename(path);
  // regular files only, never a pipe or device, and a size cap stated in the refusal
  const buf = readFileBytes(path, 'the lab curve', MAX_LAB_BYTES);
  let text = buf.toString('utf8');
  const latin1 = text.includes('\uFFFD');
  if (latin1) text = buf.toString('latin1');
  const curve = parseLabCurve(text, name, opts);
  if (latin1) curve.notes.push('not valid UTF-8: read as Latin-1');
  return curve;
}
