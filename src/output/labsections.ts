// Sections of report.html for the comparisons and fits that `rupta compare` and `rupta fit` wrote
// into the run folder (compare*.json, fit*.json, with their pictures beside them). The tables come
// from the lab room (lab/report.ts); a file that does not parse or render says so in one line.

import { existsSync, readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { esc } from './svg.js';
import { compareSectionHtml, fitSectionHtml } from '../lab/report.js';

type J = Record<string, unknown>;
const obj = (v: unknown): J | null => (v !== null && typeof v === 'object' && !Array.isArray(v) ? (v as J) : null);

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

/** One file's section: the lab room's rendering of its data (without its heading, which the section carries), and the picture beside it. */
async function section(dir: string, file: string, j: J, toDataUri: (png: Buffer) => Promise<string>): Promise<string> {
  const compare = file.startsWith('compare');
  const body = (compare ? compareSectionHtml(j) : fitSectionHtml(j)).replace(/^<h2>[^<]*<\/h2>\n/, '');
  const stem = file.replace(/\.json$/, '');
  const pic = await picture(dir, stem, toDataUri);
  const what = compare ? 'Prediction and measured curves' : 'Measured curve with the starting and fitted predictions';
  return `${body}<p class="meta">From <code>${esc(file)}</code>.</p>\n${pic ? `<figure>${pic}<figcaption>${what} (${esc(stem)} picture).</figcaption></figure>\n` : ''}`;
}

/** The comparison and fit sections of a run folder's report, in file-name order; empty when there are none. */
export async function labSections(dir: string, toDataUri: (png: Buffer) => Promise<string>): Promise<string> {
  if (!existsSync(dir)) return '';
  const files = readdirSync(dir).filter((f) => /^(compare|fit)[\w.-]*\.json$/.test(f)).sort();
  let h = '';
  for (const f of files) {
    const kind = f.startsWith('compare') ? 'Comparison with measurements' : 'Fit of material parameters';
    let body: string;
    try {
      const j = obj(JSON.parse(readFileSync(join(dir, f), 'utf8')));
      if (!j) throw new Error('not a JSON object');
      body = await section(dir, f, j, toDataUri);
    } catch (e) {
      body = `<p>${esc(f)} could not be read: ${esc(e instanceof Error ? e.message : String(e))}.</p>\n`;
    }
    h += `<section class="lab-section" id="lab-${esc(f.replace(/\.json$/, ''))}"><h2>${kind}</h2>\n${body}</section>\n`;
  }
  return h;
}
