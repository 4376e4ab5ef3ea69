// Parametric templates of the standard fracture-test specimens: each writes a commented
// case file from a few options (lengths in mm, a material preset, mesh sizes).
import { InputError } from '../errors.js';
import { beam3pb, beam4pb, beam4pShear, ceramicBendBar } from './beams.js';
import { MATERIALS } from './materials.js';
import { nearest, optionKey, parseOption } from './options.js';
import { compactTension, denTension, discSplitting, lPanel, wedgeSplitting } from './plates.js';
import type { Template } from './types.js';

export type { Template, TemplateOption } from './types.js';
export { MATERIALS, MATERIAL_NAMES, charLength, type MaterialPreset } from './materials.js';

export const templates: Template[] = [
  beam3pb, beam4pb, wedgeSplitting, compactTension, beam4pShear, lPanel, denTension, discSplitting, ceramicBendBar,
];

const NAMES = templates.map((t) => t.name);

/** The template of that name, or an InputError with a did-you-mean. */
export function templateNamed(name: string): Template {
  const t = templates.find((x) => x.name === name.trim().toLowerCase());
  if (t) return t;
  const near = nearest(name.trim(), NAMES);
  throw new InputError(`template ${JSON.stringify(name)} is not known; `
    + (near ? `did you mean ${near}?` : `the templates are ${NAMES.join(', ')}`));
}

/** Every template with its description, then its options with unit and default. */
export function listTemplates(): string {
  const out: string[] = [];
  for (const t of templates) {
    out.push(`${t.name}  ${t.summary}`);
    const w = Math.max(...t.options.map((o) => o.name.length)) + 2;
    for (const o of t.options) {
      const def = `${o.default}${o.unit && typeof o.default === 'number' ? ` ${o.unit}` : o.unit && o.default === 'auto' ? ` (${o.unit})` : ''}`;
      const choices = o.choices ? ` (${o.choices.join(', ')})` : '';
      out.push(`    --${o.name.padEnd(w)}${def.padEnd(Math.max(18, def.length + 2))}${o.help}${choices}`);
    }
    out.push('');
  }
  out.push('materials:');
  for (const m of MATERIALS) out.push(`    ${m.name.padEnd(24)}E ${m.E} MPa, nu ${m.nu}, ft ${m.ft} MPa, GF ${m.GF} N/mm (${m.summary})`);
  return out.join('\n') + '\n';
}

/** The case text of a template from option strings (unknown names and out-of-range values are InputErrors). */
export function renderTemplate(name: string, raw: Record<string, string>): string {
  const t = templateNamed(name);
  const names = t.options.map((o) => o.name);
  const values: Record<string, number | string> = {};
  for (const [key, text] of Object.entries(raw)) {
    const k = optionKey(key);
    const o = t.options.find((x) => x.name === k);
    if (!o) {
      const near = nearest(k, names);
      throw new InputError(`--${k} is not an option of template ${t.name}; `
        + (near ? `did you mean --${near}?` : `its options are ${names.map((n) => `--${n}`).join(', ')}`));
    }
    values[o.name] = parseOption(t.name, o, String(text));
  }
  return t.build(values);
}
