// mesh.order: 1 (default) or 2; order 2 runs elastic and cohesive cases, and is refused, with
// one sentence, in the brittle mode.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { InputError } from '../src/errors.js';
import { parseCase } from '../src/case/index.js';

const demoText = readFileSync(new URL('../cases/beam-3pb-demo.yaml', import.meta.url), 'utf8');
type Obj = Record<string, any>;

function messageOf(mutate: (c: Obj) => void): string {
  const c = parse(demoText) as Obj;
  mutate(c);
  try { parseCase(JSON.stringify(c), 'beam.json'); } catch (e) { if (e instanceof InputError) return e.message; throw e; }
  return '(no error)';
}

describe('mesh.order', () => {
  it('defaults to 1 and accepts 1', () => {
    expect(parseCase(demoText, 'beam.yaml').mesh.order).toBe(1);
    expect(messageOf((c) => { c.mesh.order = 1; })).toBe('(no error)');
  });
  it('order 2 with a cohesive crack block is accepted; with the brittle mode it is refused with one sentence', () => {
    expect(messageOf((c) => { c.mesh.order = 2; })).toBe('(no error)');
    expect(messageOf((c) => { c.mesh.order = 2; c.crack.model = 'lefm'; c.material.KIc = 1; c.geometry.notches[0].width = 0; }))
      .toBe('mesh.order must be 1 with crack.model lefm: the brittle mode does not yet support second-order elements (found 2)');
  });
  it('order 2 is accepted in an elastic run (no crack block)', () => {
    expect(messageOf((c) => { c.mesh.order = 2; delete c.crack; })).toBe('(no error)');
  });
  it('order 3 names the choices', () => {
    expect(messageOf((c) => { c.mesh.order = 3; })).toMatch(/^mesh\.order must be 1 \(linear virtual elements\) or 2 \(quadratic\)/);
  });
});
