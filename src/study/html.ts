// study.html: one self-contained page (pictures inline, no outside references) with the
// counts, the statistics of the peak, the pictures and the table of variants.
import { esc } from '../output/svg.js';
import { CAUTION, inlineSvg } from '../output/report.js';
import type { StudyRow } from './collect.js';
import type { Band } from './stats.js';
import type { SizeEffectFit } from './sizeeffect.js';

export interface StudyPage {
  title: string; name: string; seed: number;
  rows: StudyRow[]; counts: Record<string, number>;
  band: Band | null; bandSvg: string; pathsSvg: string; peaksSvg: string; sizeSvg: string | null;
  peaks: { n: number; mean: number; sd: number; cov: number; p05: number; p50: number; p95: number; min: number; max: number } | null;
  fit: SizeEffectFit | null; D: number[]; sigma: number[];
  script?: string;
}

const CSS = `body{font-family:DejaVu Sans,Helvetica,Arial,sans-serif;max-width:1100px;margin:2em auto;padding:0 1em;color:#1b1b1b;line-height:1.45}
h1{font-size:1.6em;margin-bottom:.2em}h2{margin-top:1.6em;border-bottom:1px solid #d5d9de}.meta{color:#505a64}
.caution{background:#fbf3e4;border-left:4px solid #d19a1f;padding:.6em .9em}
table{border-collapse:collapse;font-size:.86em;margin:.6em 0}th,td{border:1px solid #d5d9de;padding:.25em .5em;text-align:right}
th{background:#f3f4f6}td.t{text-align:left}tr.bad td{background:#fbeaea}figure{margin:1em 0}figcaption{color:#505a64;font-size:.9em}
.scroll{overflow-x:auto}`;

const sig = (v: number | null | undefined, d = 4) => (v === null || v === undefined || !Number.isFinite(v) ? '' : String(+v.toPrecision(d)));

export function studyHtml(p: StudyPage): string {
  const keys: string[] = [];
  for (const r of p.rows) for (const k of Object.keys(r.values)) if (!keys.includes(k)) keys.push(k);
  const parts: string[] = [];
  parts.push(`<!DOCTYPE html>\n<html lang="en">\n<head>\n<meta charset="utf-8">\n<link rel="icon" href="data:,">\n<title>${esc(p.title)}: rupta study</title>\n<style>${CSS}</style>\n</head>\n<body>\n`);
  parts.push(`<h1>${esc(p.title)}</h1>\n<p class="meta">Study “${esc(p.name)}” by rupta: ${p.rows.length} variants, study seed ${p.seed}. `
    + Object.entries(p.counts).map(([k, n]) => `${n} ${esc(k)}`).join(', ') + '.</p>\n');
  parts.push(`<p class="caution" id="caution"><strong>Caution.</strong> These ${esc(CAUTION)}. A band over variants shows the scatter the model gives for the scatter put in; it is no substitute for tests of the real material.</p>\n`);
  if (p.peaks) {
    const s = p.peaks;
    parts.push(`<h2>Peak load</h2>\n<table id="peak-stats"><tbody>\n<tr><th>variants</th><th>mean (N)</th><th>standard deviation (N)</th><th>CoV</th><th>5 % (N)</th><th>median (N)</th><th>95 % (N)</th><th>min–max (N)</th></tr>\n`
      + `<tr><td>${s.n}</td><td>${sig(s.mean)}</td><td>${sig(s.sd, 3)}</td><td>${(100 * s.cov).toFixed(1)} %</td><td>${sig(s.p05)}</td><td>${sig(s.p50)}</td><td>${sig(s.p95)}</td><td>${sig(s.min)}–${sig(s.max)}</td></tr>\n</tbody></table>\n`);
  }
  parts.push(`<h2>Curves</h2>\n<figure id="band">${inlineSvg(p.bandSvg, 'band-', 'Load against opening of all variants')}<figcaption>Every finished variant (grey), the mean (red) and the band between the 5 % and 95 % quantiles of the load at each opening.</figcaption></figure>\n`);
  parts.push(`<figure id="paths">${inlineSvg(p.pathsSvg, 'paths-', 'Crack paths')}<figcaption>Crack paths of all variants laid over the specimen.</figcaption></figure>\n`);
  parts.push(`<figure id="peaks">${inlineSvg(p.peaksSvg, 'peaks-', 'Distribution of the peak load')}<figcaption>Distribution of the peak load.</figcaption></figure>\n`);
  if (p.sizeSvg) {
    const f = p.fit;
    parts.push(`<h2>Size effect</h2>\n<figure id="size-effect">${inlineSvg(p.sizeSvg, 'size-', 'Size effect')}<figcaption>Nominal strength σN = P/(b·D) against size D, with Bažant's size effect law σN = B·ft/√(1 + D/D0) fitted by regression of (ft/σN)² on D`
      + (f ? `: B = ${sig(f.B, 3)}, D0 = ${sig(f.D0, 3)} mm, r² = ${f.r2.toFixed(3)}` : ' (no positive fit from these points)') + '.</figcaption></figure>\n');
  }
  parts.push('<h2>Variants</h2>\n<div class="scroll"><table id="variants"><tbody>\n<tr><th>variant</th>' + keys.map((k) => `<th>${esc(k)}</th>`).join('')
    + '<th>status</th><th>peak load (N)</th><th>opening at peak (mm)</th><th>work of fracture (N·mm)</th><th>crack end (mm)</th><th>time (s)</th><th>note</th></tr>\n');
  for (const r of p.rows) {
    const bad = r.status !== 'complete' && r.status !== 'stopped';
    parts.push(`<tr${bad ? ' class="bad"' : ''}><td class="t"><a href="runs/${esc(r.id)}/report.html">${esc(r.id)}</a></td>` + keys.map((k) => `<td>${esc(typeof r.values[k] === 'number' ? sig(r.values[k] as number, 5) : String(r.values[k] ?? ''))}</td>`).join('')
      + `<td class="t">${esc(r.status)}</td><td>${sig(r.peak_load_N)}</td><td>${sig(r.peak_cmod_mm ?? r.peak_displacement_mm)}</td><td>${sig(r.work_of_fracture_Nmm)}</td>`
      + `<td>${r.crack_end_x_mm === null ? '' : `${sig(r.crack_end_x_mm)}, ${sig(r.crack_end_y_mm)}`}</td><td>${sig(r.time_s, 3)}</td><td class="t">${esc(bad ? r.reason : '')}</td></tr>\n`);
  }
  parts.push('</tbody></table></div>\n<p class="meta">Each variant is an ordinary run folder under runs/ with its own report; its case file is under cases/.</p>\n</body>\n</html>\n');
  return parts.join('');
}
