// The shipped examples are the templates' output with default options. To rewrite them
// after changing a template: RUPTA_WRITE_EXAMPLES=1 npx vitest run tests/templates.examples.test.ts
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { templates } from '../src/templates/index.js';

const casesDir = new URL('../cases/', import.meta.url);
const write = process.env.RUPTA_WRITE_EXAMPLES === '1';

describe.each(templates.map((t) => [t.name, t] as const))('cases/%s-example.yaml', (name, t) => {
  const file = new URL(`${name}-example.yaml`, casesDir);
  it('equals the template output with default options', () => {
    const text = t.build({});
    if (write) writeFileSync(file, text);
    expect(existsSync(file), `${name}-example.yaml is missing`).toBe(true);
    expect(readFileSync(file, 'utf8')).toBe(text);
  });
});
