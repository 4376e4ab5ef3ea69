// Sections of report.html for the comparisons and fits that `rupta compare` and `rupta fit` wrote
// into the run folder (compare*.json, fit*.json, with their pictures). Read defensively: a key that
// is missing or of another type shows as a dash, a file that does not parse says so in one line.

import { existsSync, readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { esc } from './svg.js';
import { formatValue } from './ticks.js';

type J = Record<string, unknown>;
const obj = (v: unknown): J | null => (v !== null && typeof v === 'object' && !Array.isArray(v) ? (v as J) : null);
const arr = (v: unknown): unknown[] => (Array.isArray(v) ? v : []);
const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);
const str = (v: unknown): string | null => (typeof v === 'string' ? v : null);
const sig = (v: unknown, d = 4): string => { const x = num(v); return x === null ? '—' : formatValue(x, d); };
const pct = (v: unknown): string => { const x = num(v); return x === null ? '—' : `${x >= 0 ? '+' : '−'}${Math.abs(100 * x).toFixed(1)} %`; };
const pctAbs = (v: unknown): string => { const x = num(v); return x === null ? '—' : `${(100 * x).toFixed(2)} %`; };

/** A picture written beside a JSON file (same stem, .svg or .png) as something to embed, if small enough. */
async function picture(dir: string, stem: string, toDataUri: (png: Buffer) => Promise<string>): Promise<string> {
  const svg = join(dir, `${stem}.svg`), png = join(dir, `${stem}.png`);
  if (existsSync(png)) return `<img src="${await toDataUri(readFileSync(png))}" alt="${esc(stem)}" style="width:100%;height:auto">`;
  if (existsSync(svg)) {
    const t = readFileSync(svg, 'utf8');
    if (t.length < 400_000 && !/<script/i.test(t)) return t.replace(/<\?xml[^>]*\?>\s*/, '').replace(/<svg\b/, '<svg style="width:100%;height:auto"');
  }
  return '';
}

const th = (cells: string[]): string => `<tr>${cells.map((c) => `<th scope="col">${c}</th>`).join('')}</tr>\n`;
const tr = (cells: string[]): string => `<tr>${cells.map((c) => `<td>${c}</td>`).join('')}</tr>\n`;

async function compareSection(dir: string, file: string, j: J, toDataUri: (png: Buffer) => Promise<string>): Promise<string> {
  const axis = str(j.xAxis) === 'displacement' ? 'load-point displacement' : str(j.xAxis) === 'cmod' ? 'CMOD' : esc(str(j.xAxis) ?? '—');
  let h = `<p>Measured curves against the prediction, by ${axis}${str(j.xAxisReason) ? ` (${esc(str(j.xAxisReason)!)})` : ''}; from <code>${esc(file)}</code>.</p>\n`;
  const rows = [obj(j.prediction), ...arr(j.specimens).map(obj), obj(j.mean)].filter((r): r is J => r !== null);
  if (rows.length) {
    h += '<table class="lab">\n<thead>' + th(['Curve', 'Peak (N)', 'Prediction vs peak', 'Opening at peak (mm)', 'vs opening', 'RMSE / peak', 'G<sub>F</sub> (N/mm)']) + '</thead>\n<tbody>\n';
    for (const r of rows) h += tr([esc(str(r.name) ?? '—'), sig(r.peak_N), pct(r.peakError), sig(r.openingAtPeak_mm), pct(r.openingError), pctAbs(r.rmseRel), sig(r.GF_Nmm, 3)]);
    h += '</tbody></table>\n';
  }
  const s = obj(j.series);
  if (s) {
    const stat = (k: string, label: string, unit: string): string => {
      const t = obj(s[k]);
      return t ? tr([label, `${sig(t.mean)} ${unit}`, `${sig(t.sd, 3)} ${unit}`, pctAbs(t.cov)]) : '';
    };
    const body = stat('peak_N', 'Peak load', 'N') + stat('openingAtPeak_mm', 'Opening at peak', 'mm') + stat('workOfFracture_Nmm', 'Work of fracture', 'N·mm') + stat('GF_Nmm', 'G<sub>F</sub>', 'N/mm');
    if (body) h += `<table class="lab"><caption>Series of ${sig(s.n)} specimens</caption>\n<thead>${th(['', 'Mean', 'Standard deviation', 'CoV'])}</thead>\n<tbody>\n${body}</tbody></table>\n`;
  }
  const notes = arr(j.notes).map(str).filter((n): n is string => !!n);
  if (notes.length) h += `<ul>${notes.map((n) => `<li>${esc(n)}</li>`).join('')}</ul>\n`;
  const pic = await picture(dir, file.replace(/\.json$/, ''), toDataUri);
  if (pic) h += `<figure>${pic}<figcaption>Prediction and measured curves (${esc(file.replace(/\.json$/, ''))} picture).</figcaption></figure>\n`;
  return h;
}

async function fitSection(dir: string, file: string, j: J, toDataUri: (png: Buffer) => Promise<string>): Promise<string> {
  const labs = arr(j.labNames).map(str).filter((n): n is string => !!n);
  const lab = labs.length ? labs.join(', ') : str(j.labName) ?? '—';
  let h = `<p>Material values fitted to ${esc(lab)}: status <strong>${esc(str(j.status) ?? '—')}</strong>${str(j.reason) ? ` (${esc(str(j.reason)!)})` : ''}; `
    + `${sig(j.evaluations)} simulations of at most ${sig(j.maxEvals)}, softening ${esc(str(j.softening) ?? '—')}, by ${esc(str(j.xAxis) ?? '—')}; from <code>${esc(file)}</code>.</p>\n`;
  const table = arr(j.table).map(obj).filter((r): r is J => r !== null);
  if (table.length) {
    h += '<table class="lab">\n<thead>' + th(['Parameter', 'Start', 'Fitted', '± 1 SD', 'Well determined']) + '</thead>\n<tbody>\n';
    for (const r of table) {
      const unit = str(r.unit) ?? '';
      h += tr([esc(str(r.name) ?? '—'), `${sig(r.start)} ${esc(unit)}`, `<strong>${sig(r.fitted)}</strong> ${esc(unit)}`, pctAbs(r.relStd), r.wellDetermined === true ? 'yes' : r.wellDetermined === false ? 'no' : '—']);
    }
    h += '</tbody></table>\n';
  }
  const obj0 = num(j.startObjective), obj1 = num(j.objective);
  if (obj1 !== null) h += `<p>RMSE over the measured peak: ${obj0 !== null ? `${pctAbs(obj0)} at the start, ` : ''}${pctAbs(obj1)} fitted.</p>\n`;
  const notes = [...arr(j.warnings), ...arr(j.notes)].map(str).filter((n): n is string => !!n);
  if (notes.length) h += `<ul>${notes.map((n) => `<li>${esc(n)}</li>`).join('')}</ul>\n`;
  const pic = await picture(dir, file.replace(/\.json$/, ''), toDataUri);
  if (pic) h += `<figure>${pic}<figcaption>Measured curve, starting and fitted predictions (${esc(file.replace(/\.json$/, ''))} picture).</figcaption></figure>\n`;
  return h;
}

/** The comparison and fit sections of a run folder's report, in file-name order; empty when there are none. */
export async function labSections(dir: string, toDataUri: (png: Buffer) => Promise<string>): Promise<string> {
  if (!existsSync(dir)) return '';
  const files = readdirSync(dir).filter((f) => /^(compare|fit)[\w.-]*\.json$/.test(f)).sort();
  let h = '';
  for (const f of files) {
    const kind = f.startsWith('compare') ? 'Comparison with tests' : 'Fit of material values';
    let body: string;
    try {
      const j = obj(JSON.parse(readFileSync(join(dir, f), 'utf8')));
      if (!j) throw new Error('not a JSON object');
      body = f.startsWith('compare') ? await compareSection(dir, f, j, toDataUri) : await fitSection(dir, f, j, toDataUri);
    } catch (e) {
      body = `<p>${esc(f)} could not be read: ${esc(e instanceof Error ? e.message : String(e))}.</p>\n`;
    }
    h += `<section class="lab-section" id="lab-${esc(f.replace(/\.json$/, ''))}"><h2>${kind}</h2>\n${body}</section>\n`;
  }
  return h;
}
