import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { charLength, MATERIALS, renderTemplate } from '../src/templates/index.js';

const preset = (name: string) => MATERIALS.find((m) => m.name === name)!;

describe('material presets', () => {
  it('normal-strength concrete lies in the usual ranges (common practice)', () => {
    const m = preset('concrete-normal');
    expect(m.E).toBeGreaterThanOrEqual(25000); expect(m.E).toBeLessThanOrEqual(40000);
    expect(m.nu).toBeGreaterThanOrEqual(0.15); expect(m.nu).toBeLessThanOrEqual(0.2);
    expect(m.ft).toBeGreaterThanOrEqual(2); expect(m.ft).toBeLessThanOrEqual(4);
    expect(m.GF).toBeGreaterThanOrEqual(0.05); expect(m.GF).toBeLessThanOrEqual(0.15);
    const lch = charLength(m); // Hillerborg, Modéer, Petersson 1976
    expect(lch).toBeGreaterThan(150); expect(lch).toBeLessThan(400);
  });

  it('high-strength concrete follows the fib Model Code 2010 formulas for f_cm = 78 MPa', () => {
    const m = preset('concrete-high-strength'), fcm = 78;
    expect(m.E / 1000).toBeCloseTo(21.5 * Math.cbrt(fcm / 10), 1); // E_ci = 21.5 GPa (f_cm/10)^(1/3)
    expect(m.GF * 1000).toBeCloseTo(73 * fcm ** 0.18, -1); // GF = 73 f_cm^0.18 N/m
    expect(m.ft).toBeCloseTo(2.12 * Math.log(1 + fcm / 10), 2); // f_ctm above C50, from memory
    expect(m.source.join(' ')).toContain('fib Model Code 2010');
  });

  it('alumina has GF = K_Ic^2 / E for K_Ic = 4 MPa m^0.5 and values in the ranges recalled (from memory)', () => {
    const m = preset('ceramic-alumina');
    expect(m.GF).toBeCloseTo((4 * 4 * 1000) / m.E, 4);
    expect(m.E).toBeGreaterThanOrEqual(300000); expect(m.E).toBeLessThanOrEqual(400000);
    expect(m.ft).toBeGreaterThanOrEqual(250); expect(m.ft).toBeLessThanOrEqual(400);
    const kic = Math.sqrt(m.GF * m.E / 1000); // MPa m^0.5
    expect(kic).toBeGreaterThanOrEqual(3); expect(kic).toBeLessThanOrEqual(5);
    expect(charLength(m)).toBeLessThan(1); // a process zone well under a millimetre
    // the toughness of the brittle mode is the same K_Ic as GF was made from
    expect(m.KIc).toBe(4);
  });

  it('each preset states its source honestly', () => {
    for (const m of MATERIALS) expect(m.source.join(' '), m.name).toMatch(/common practice|from memory|fib Model Code 2010/);
  });

  it.each(MATERIALS.map((m) => m.name))('%s is written into the case with its source', (name) => {
    const text = renderTemplate('beam-3pb', { material: name });
    const c = parse(text) as { material: { E: number; nu: number; ft: number; GF: number } };
    const m = preset(name);
    expect(c.material).toMatchObject({ E: m.E, nu: m.nu, ft: m.ft, GF: m.GF });
    expect(text).toContain(`# Material preset ${name}.`);
    expect(text).toContain(`# ${m.source[0]}`);
  });
});
