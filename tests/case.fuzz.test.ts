import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { InputError } from '../src/errors.js';
import { caseFromData, parseCase } from '../src/case/index.js';

const demoText = readFileSync(new URL('../cases/beam-3pb-demo.yaml', import.meta.url), 'utf8');

type Path = (string | number)[];

/** Every path to a value in a plain JSON-like tree. */
function paths(v: unknown, at: Path = [], out: Path[] = []): Path[] {
  out.push(at);
  if (v !== null && typeof v === 'object') {
    for (const [k, e] of Object.entries(v)) paths(e, [...at, Array.isArray(v) ? Number(k) : k], out);
  }
  return out;
}

const value = fc.oneof(
  fc.double(), fc.integer({ min: -1000, max: 1000 }), fc.string({ maxLength: 8 }), fc.constant(null),
  fc.boolean(), fc.array(fc.double({ min: -500, max: 500, noNaN: true }), { maxLength: 3 }),
  fc.array(fc.tuple(fc.integer({ min: -50, max: 500 }), fc.integer({ min: -50, max: 500 })), { maxLength: 5 }),
  fc.constant({}), fc.constantFrom('x', 'xy', 'cmod', 'force', 'notch-tips', 'anywhere', 'linear'),
);

const mutation = fc.record({
  pick: fc.nat(),
  action: fc.constantFrom('delete', 'set', 'rename'),
  value,
  name: fc.constantFrom('Gf', 'tipsize', 'extra', 'E', 'at', 'along', 'width'),
});

interface Mutation { pick: number; action: string; value: unknown; name: string }

function mutate(root: Record<string, unknown>, ms: Mutation[]): unknown {
  for (const m of ms) {
    const all = paths(root).filter((p) => p.length > 0);
    if (all.length === 0) break;
    const p = all[m.pick % all.length]!;
    let parent: any = root;
    for (const k of p.slice(0, -1)) parent = parent[k];
    const last = p[p.length - 1]!;
    if (m.action === 'delete') { if (Array.isArray(parent)) parent.splice(Number(last), 1); else delete parent[last]; }
    else if (m.action === 'set') parent[last] = m.value;
    else if (!Array.isArray(parent)) { parent[m.name] = parent[last]; delete parent[last]; }
  }
  return root;
}

/** Accepts a model or an InputError of one line; anything else fails the property. */
function onlyInputErrors(run: () => unknown): void {
  try {
    run();
  } catch (e) {
    if (!(e instanceof InputError)) throw e;
    expect(e.message.length).toBeGreaterThan(0);
    expect(e.message).not.toContain('\n');
  }
}

describe('random mutations of the demo case', () => {
  it('raise nothing but InputError (data)', () => {
    fc.assert(fc.property(fc.array(mutation, { minLength: 1, maxLength: 4 }), (ms) => {
      const raw = mutate(parse(demoText), ms);
      onlyInputErrors(() => caseFromData(raw, 'fuzz'));
      onlyInputErrors(() => parseCase(JSON.stringify(raw) ?? '', 'fuzz.json'));
    }), { numRuns: 5000, seed: 20261202 });
  });

  it('raise nothing but InputError (text)', () => {
    const edit = fc.record({ at: fc.nat(), cut: fc.nat({ max: 6 }), insert: fc.string({ maxLength: 4 }) });
    fc.assert(fc.property(fc.array(edit, { minLength: 1, maxLength: 3 }), (edits) => {
      let text = demoText;
      for (const e of edits) {
        const i = e.at % (text.length + 1);
        text = text.slice(0, i) + e.insert + text.slice(i + e.cut);
      }
      onlyInputErrors(() => parseCase(text, 'fuzz.yaml'));
    }), { numRuns: 5000, seed: 20261202 });
  });
});
