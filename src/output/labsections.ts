// Sections of report.html for the comparisons and fits that `rupta compare` and `rupta fit` wrote
// into the run folder (compare*.json, fit*.json, with their pictures beside them). The tables come
// from the lab room (lab/report.ts); a file that does not parse or render says so in one line.

import { existsSync, readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { esc, inlineSvg } from './svg.js';
import { compareSectionHtml, fitSectionHtml } from '../lab/report.js';

type J = Record<string, unknown>;
const obj = (v: unknown): J | null => (v !== null && typeof v === 'object' && !Array.isArray(v) ? (v as J) : null);

/** An id made of a file's stem: letters, digits, '-' and '_' kept, anything else as '_'. */
const idOf = (stem: string): string => stem.replace(/[^\w-]/g, '_');

/** A picture written beside a JSON file (same stem, .svg or .png) as something to embed, if small enough. */
async function picture(dir: string, stem: string, ids: string, toDataUri: (png: Buffer) => Promise<string>): Promise<string> {
  const svg = join(dir, `${stem}.svg`), png = join(dir, `${stem}.png`);
  if (existsSync(png)) return `<img src="${await toDataUri(readFileSync(png))}" alt="${esc(stem)}" style="width:100%;height:auto">`;
  if (existsSync(svg)) {
    const t = readFileSync(svg, 'utf8');
    if (t.length < 400_000 && !/<script/i.test(t)) return inlineSvg(t, `${ids}-picture-`, stem);
  }
  return '';
}

/** One file's section: the lab room's rendering of its data (without its heading, which the section carries), and the picture beside it. */
async function section(dir: string, file: string, ids: string, j: J, toDataUri: (png: Buffer) => Promise<string>): Promise<string> {
  const compare = file.startsWith('compare');
  const stem = file.replace(/\.json$/, '');
  const body = (compare ? compareSectionHtml(j, ids) : fitSectionHtml(j, ids)).replace(/^<h2>[^<]*<\/h2>\n/, '');
  const pic = await picture(dir, stem, ids, toDataUri);
  const what = compare ? 'Prediction and measured curves' : 'Measured curve with the starting and fitted predictions';
  return `${body}<p class="meta">From <code>${esc(file)}</code>.</p>\n${pic ? `<figure>${pic}<figcaption>${what} (${esc(stem)} picture).</figcaption></figure>\n` : ''}`;
}

/** The comparison and fit sections of a run folder's report, in file-name order; empty when there are none. */
export async function labSections(dir: string, toDataUri: (png: Buffer) => Promise<string>): Promise<string> {
  if (!existsSync(dir)) return '';
  const files = readdirSync(dir).filter((f) => /^(compare|fit)[\w.-]*\.json$/.test(f)).sort();
  let h = '';
  // ids from each file's stem, so two comparisons (or fits) on one page keep apart; a stem that
  // comes out like an earlier one's gets a number
  const used = new Set<string>();
  for (const f of files) {
    let ids = idOf(f.replace(/\.json$/, ''));
    for (let k = 2; used.has(ids); k++) ids = `${idOf(f.replace(/\.json$/, ''))}-${k}`;
    used.add(ids);
    const kind = f.startsWith('compare') ? 'Comparison with measurements' : 'Fit of material parameters';
    let body: string;
    try {
      const j = obj(JSON.parse(readFileSync(join(dir, f), 'utf8')));
      if (!j) throw new Error('not a JSON object');
      body = await section(dir, f, ids, j, toDataUri);
    } catch (e) {
      body = `<p>${esc(f)} could not be read: ${esc(e instanceof Error ? e.message : String(e))}.</p>\n`;
    }
    h += `<section class="lab-section" id="lab-${ids}"><h2>${kind}</h2>\n${body}</section>\n`;
  }
  return h;
}
