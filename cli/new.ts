// `rupta new TEMPLATE [--option value ...] [-o FILE]`: a commented case file from a specimen
// template, and `rupta new --list`. Template options differ per template, so the words after
// the template name are read here rather than declared to commander.
import type { Command } from 'commander';
import { existsSync, statSync } from 'node:fs';
import { InputError } from '../src/errors.js';
import { writeFileAtomic } from '../src/output/files.js';
import { listTemplates, renderTemplate, templates } from '../src/templates/index.js';

export interface NewArgs {
  template?: string;
  options: Record<string, string>;
  output?: string;
  force: boolean;
  list: boolean;
}

// A value may start with a minus sign when it is a number (--eccentricity -10).
const looksLikeValue = (s: string | undefined): s is string => s !== undefined && (!s.startsWith('-') || /^-\.?\d/.test(s));

/** Splits the words of `rupta new` into the template, its options and the command's own flags. */
export function parseNewArgs(words: readonly string[], flags: { output?: string; force?: boolean; list?: boolean } = {}): NewArgs {
  const out: NewArgs = { options: {}, output: flags.output, force: !!flags.force, list: !!flags.list };
  for (let i = 0; i < words.length; i++) {
    const w = words[i]!;
    if (w === '--force') { out.force = true; continue; }
    if (w === '--list') { out.list = true; continue; }
    if (w === '-o' || w === '--output') {
      const v = words[i + 1];
      if (!looksLikeValue(v)) throw new InputError(`${w} needs a file name, as in rupta new beam-3pb -o beam.yaml`);
      out.output = v; i++; continue;
    }
    if (w.startsWith('--output=')) { out.output = w.slice('--output='.length); continue; }
    if (w.startsWith('--')) {
      const eq = w.indexOf('=');
      const name = eq > 0 ? w.slice(2, eq) : w.slice(2);
      let value: string;
      if (eq > 0) value = w.slice(eq + 1);
      else {
        const v = words[i + 1];
        if (!looksLikeValue(v)) throw new InputError(`${w} needs a value, as in ${w} 100 (see rupta new --list)`);
        value = v; i++;
      }
      if (name === '') throw new InputError(`${w} is not an option; template options look like --name value`);
      if (name in out.options) throw new InputError(`--${name} is given twice; give each option once`);
      out.options[name] = value;
      continue;
    }
    if (w.startsWith('-') && w.length > 1) {
      throw new InputError(`${w} is not an option of rupta new; template options are written --name value (see rupta new --list)`);
    }
    if (out.template !== undefined) {
      throw new InputError(`only one template name can be given (found ${out.template} and ${w}); each option value follows its --option`);
    }
    out.template = w;
  }
  return out;
}

/** The `new` command on the program. */
export function registerNewCommand(program: Command): void {
  program
    .command('new')
    .description('write a commented case file from a specimen template (rupta new --list shows them)')
    .argument('[template]', `template name: ${templates.map((t) => t.name).join(', ')}`)
    .option('-o, --output <file>', 'write the case to this file instead of stdout')
    .option('--force', 'overwrite an existing file')
    .option('--list', 'list the templates with their options, units and defaults')
    .allowUnknownOption()
    .allowExcessArguments()
    .addHelpText('after', '\nTemplate options follow the name, e.g. rupta new beam-3pb --depth 150 --material mortar -o beam.yaml')
    .action((_template: string | undefined, o: { output?: string; force?: boolean; list?: boolean }, cmd: Command) => {
      // Commander stops reading options at the first one it does not know; the rest are in cmd.args.
      const a = parseNewArgs(cmd.args, o);
      if (a.list) {
        if (a.template !== undefined || Object.keys(a.options).length > 0 || a.output !== undefined) {
          throw new InputError('--list takes no template name, template options or output file');
        }
        process.stdout.write(listTemplates());
        return;
      }
      if (a.template === undefined) {
        throw new InputError(`the template name is missing; give one of ${templates.map((t) => t.name).join(', ')} (see rupta new --list)`);
      }
      const text = renderTemplate(a.template, a.options);
      if (a.output === undefined) {
        process.stdout.write(text);
        return;
      }
      const file = a.output;
      if (existsSync(file)) {
        if (statSync(file).isDirectory()) throw new InputError(`${file} is a folder; -o needs a file name`);
        if (!a.force) throw new InputError(`${file} already exists; add --force to overwrite it`);
      }
      writeFileAtomic(file, text);
      process.stdout.write(`wrote ${file}; check it with rupta check ${file}\n`);
    });
}
