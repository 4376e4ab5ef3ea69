// Report sections for comparisons and fits: HTML from the compare.json and fit.json that
// `rupta compare` and `rupta fit` write, so report.html can gather them with the run.

import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { esc } from '../output/svg.js';

type Json = Record<string, any>;

const num = (v: unknown, d: number): string => (typeof v === 'number' && Number.isFinite(v) ? v.toFixed(d) : '—');
const pct = (v: unknown, d = 1): string => (typeof v === 'number' && Number.isFinite(v) ? `${v >= 0 ? '+' : ''}${(100 * v).toFixed(d)} %` : '—');
const sig = (v: unknown): string => (typeof v === 'number' && Number.isFinite(v) ? String(Number(v.toPrecision(4))) : '—');

function table(head: string[], rows: string[][], id: string): string {
  return `<table id="${id}"><thead><tr>${head.map((h) => `<th>${esc(h)}</th>`).join('')}</tr></thead>\n<tbody>\n`
    + rows.map((r) => `<tr>${r.map((c) => `<td>${esc(c)}</td>`).join('')}</tr>`).join('\n') + '\n</tbody></table>\n';
}

const notes = (list: unknown, cls: string): string =>
  Array.isArray(list) && list.length ? `<ul class="${cls}">\n${list.map((n) => `<li>${esc(String(n))}</li>`).join('\n')}\n</ul>\n` : '';

/** The comparison section from compare.json data; ids: the prefix of its tables' ids (unique when several files share a page). */
export function compareSectionHtml(c: Json, ids = 'compare'): string {
  const axis = c.xAxis === 'cmod' ? 'CMOD' : 'load-point displacement';
  const rows = [c.prediction, ...(c.specimens ?? []), ...(c.mean ? [c.mean] : [])].filter(Boolean).map((r: Json) => [
    String(r.name), num(r.peak_N, 1), pct(r.peakError), num(r.openingAtPeak_mm, 4), pct(r.openingError),
    typeof r.rmseRel === 'number' ? `${(100 * r.rmseRel).toFixed(2)} %` : '—', num(r.workOfFracture_Nmm, 1), num(r.GF_Nmm, 4),
  ]);
  let out = `<h2>Comparison with measurements</h2>\n<p>Load against ${esc(axis)}: ${esc(String(c.xAxisReason ?? ''))}.</p>\n`;
  out += table(['curve', 'peak N', 'error', 'opening at peak mm', 'error', 'RMSE / peak', 'W0 N·mm', 'GF N/mm'], rows, `${ids}-table`);
  const s = c.series as Json | null;
  if (s) {
    const f = (t: Json | null, d: number) => (t ? `${num(t.mean, d)} ± ${num(t.sd, d)} (CoV ${(100 * t.cov).toFixed(1)} %)` : '—');
    out += table(['series', 'peak N', 'opening at peak mm', 'W0 N·mm', 'GF N/mm'],
      [[`${s.n} specimens, mean ± 1 SD`, f(s.peak_N, 1), f(s.openingAtPeak_mm, 4), f(s.workOfFracture_Nmm, 1), f(s.GF_Nmm, 4)]], `${ids}-series`);
  }
  return out + notes(c.notes, 'compare-notes');
}

/** The fit section from fit.json data; ids: the prefix of its table's id. */
export function fitSectionHtml(f: Json, ids = 'fit'): string {
  const fitted = f.status === 'fitted';
  let out = `<h2>Fit of material parameters</h2>\n<p>${fitted ? 'Fitted' : `<strong>Not fitted (${esc(String(f.status))})</strong>: ${esc(String(f.reason ?? ''))}. Best values so far`} against ${esc((f.labNames ?? []).join(', '))}, `
    + `load against ${f.xAxis === 'cmod' ? 'CMOD' : 'load-point displacement'}, ${esc(String(f.softening))} softening; RMSE ${num(100 * f.objective, 2)} % of the measured peak `
    + `(${num(100 * f.startObjective, 2)} % with the case values), ${esc(String(f.evaluations))} of at most ${esc(String(f.maxEvals))} simulations.</p>\n`;
  const rows = (f.table ?? []).map((t: Json) => [String(t.name), String(t.unit), sig(t.start), sig(t.fitted),
    typeof t.relStd === 'number' ? `±${(196 * t.relStd).toFixed(1)} %` : '—', typeof t.relStdModel === 'number' ? `±${(196 * t.relStdModel).toFixed(1)} %` : '—']);
  out += table(['parameter', 'unit', 'case', fitted ? 'fitted' : 'best so far', '±95 %', 'of it mesh seeds'], rows, `${ids}-table`);
  const k = Array.isArray(f.compliance) ? (f.compliance as Json[]).filter((c) => typeof c.mm_per_N === 'number' && c.mm_per_N > 0) : [];
  if (k.length) out += `<p>Machine compliance taken out of the crosshead: ${esc(k.map((c) => `${(1000 * c.mm_per_N).toPrecision(3)} mm/kN${c.estimated ? ' (estimated)' : ''}`).join(', '))}.</p>\n`;
  return out + notes(f.warnings, 'fit-warnings') + notes(f.notes, 'fit-notes');
}

/** The sections for whatever compare.json and fit.json a folder holds ('' when none). */
export function labReportHtml(dir: string): string {
  let out = '';
  for (const [file, render] of [['compare.json', compareSectionHtml], ['fit.json', fitSectionHtml]] as const) {
    const p = join(dir, file);
    if (!existsSync(p)) continue;
    try { out += render(JSON.parse(readFileSync(p, 'utf8')) as Json); } catch { out += `<p>${esc(file)} could not be read.</p>\n`; }
  }
  return out;
}
