import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { InputError } from '../src/errors.js';
import { listTemplates, renderTemplate, templates } from '../src/templates/index.js';
import { onMaterialBoundary, type RawCase } from './templates.helpers.js';

const errorOf = (f: () => unknown): string => {
  try { f(); } catch (e) { if (e instanceof InputError) return e.message; throw e; }
  return '(no error)';
};

describe('names', () => {
  it('suggests the nearest template for a slip', () => {
    expect(errorOf(() => renderTemplate('beam3pb', {}))).toBe('template "beam3pb" is not known; did you mean beam-3pb?');
    expect(errorOf(() => renderTemplate('l-pannel', {}))).toBe('template "l-pannel" is not known; did you mean l-panel?');
  });

  it('lists the templates when nothing is near', () => {
    expect(errorOf(() => renderTemplate('tripod', {}))).toBe(
      `template "tripod" is not known; the templates are ${templates.map((t) => t.name).join(', ')}`);
  });

  it('suggests the nearest option, or lists them', () => {
    expect(errorOf(() => renderTemplate('beam-3pb', { spn: '400' }))).toBe('--spn is not an option of template beam-3pb; did you mean --span?');
    expect(errorOf(() => renderTemplate('disc-splitting', { colour: 'red' }))).toMatch(
      /^--colour is not an option of template disc-splitting; its options are --diameter, --thickness, --strip-width, /);
  });

  it('accepts option names as the command line spells them after parsing', () => {
    const a = renderTemplate('beam-3pb', { notchDepth: '40' });
    const b = renderTemplate('beam-3pb', { '--notch-depth': '40' });
    expect(a).toBe(b);
    expect((parse(a) as RawCase).geometry.notches![0]!.to).toEqual([220, 40]);
  });
});

describe('values', () => {
  it('reports a value outside the fixed range with option, range, unit and value', () => {
    expect(errorOf(() => renderTemplate('beam-3pb', { span: '0' }))).toBe(
      '--span of template beam-3pb must be a number from 0.1 to 100000 in mm (found 0)');
    expect(errorOf(() => renderTemplate('beam-3pb', { depth: 'deep' }))).toBe(
      '--depth of template beam-3pb must be a number from 0.1 to 100000 in mm (found "deep")');
    expect(errorOf(() => renderTemplate('beam-3pb', { 'mesh-size': '-1' }))).toBe(
      '--mesh-size of template beam-3pb must be auto or a number from 0.001 to 100000 in mm (found -1)');
  });

  it('reports a value that does not fit the other options', () => {
    expect(errorOf(() => renderTemplate('beam-3pb', { 'notch-depth': '95' }))).toBe(
      '--notch-depth of template beam-3pb must be a number from 0 to 90 in mm for a depth of 100 mm (found 95)');
    expect(errorOf(() => renderTemplate('beam-3pb', { span: '500' }))).toBe(
      '--span of template beam-3pb must be a number from 100 to 430 in mm for a length of 440 mm, a depth of 100 mm and a support-width of 10 mm (found 500)');
    expect(errorOf(() => renderTemplate('wedge-splitting', { 'load-line': '50' }))).toBe(
      '--load-line of template wedge-splitting must be a number from 5.4 to 34.6 in mm for a groove-depth of 40 mm and a bearing-width of 10 mm (found 50)');
    expect(errorOf(() => renderTemplate('beam-3pb', { 'mesh-size': '10', 'tip-size': '12' }))).toBe(
      '--tip-size of template beam-3pb must be a number from 0 to 10 in mm for a mesh-size of 10 mm (found 12)');
  });

  it('reports a word outside the choices, with a did-you-mean', () => {
    expect(errorOf(() => renderTemplate('beam-3pb', { material: 'mortr' }))).toBe(
      '--material of template beam-3pb must be one of concrete-normal, concrete-high-strength, mortar, granite, ceramic-alumina (found "mortr"); did you mean mortar?');
    expect(errorOf(() => renderTemplate('compact-tension', { loading: 'pins' }))).toBe(
      '--loading of template compact-tension must be one of holes, notch-faces (found "pins")');
  });

  it('takes numbers, words and auto', () => {
    const c = parse(renderTemplate('den-tension', { width: ' 300 ', material: 'Granite', 'mesh-size': 'auto', 'tip-size': '3' })) as
      RawCase & { material: { E: number }; mesh: { size: number; tipSize: number } };
    expect(c.geometry.outline[1]).toEqual([300, 0]);
    expect(c.material.E).toBe(50000);
    expect(c.mesh.tipSize).toBe(3);
  });

  it('writes a title with YAML-special characters as a quoted string', () => {
    const c = parse(renderTemplate('l-panel', { title: 'Panel #3: "B" mix' })) as { title: string };
    expect(c.title).toBe('Panel #3: "B" mix');
  });
});

describe('listTemplates', () => {
  const text = listTemplates();
  it('names every template with its description and every option with unit and default', () => {
    for (const t of templates) {
      expect(text).toContain(`${t.name}  ${t.summary}`);
      for (const o of t.options) {
        const def = typeof o.default === 'number' ? `${o.default} ${o.unit}` : String(o.default);
        expect(text).toMatch(new RegExp(`--${o.name} +${def.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}`));
      }
    }
  });
});

describe('the boundary check of these tests', () => {
  const c = parse(renderTemplate('beam-3pb', {})) as RawCase;
  it('rejects the open notch mouth and interior points, accepts faces, corners and edges', () => {
    expect(onMaterialBoundary(c, [220, 0])).toBe(false);
    expect(onMaterialBoundary(c, [220, 50])).toBe(false);
    expect(onMaterialBoundary(c, [219, 0])).toBe(true);
    expect(onMaterialBoundary(c, [221, 15])).toBe(true);
    expect(onMaterialBoundary(c, [220, 30])).toBe(true);
    expect(onMaterialBoundary(c, [100, 100])).toBe(true);
  });
});
