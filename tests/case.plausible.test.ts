// Material values that look like unit slips are warned about in one sentence each (ranges
// common practice for concrete, mortar, rock and ceramics), and the usual ones are quiet.
import { describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { loadCase, unitSlipWarnings, settingWarnings } from '../src/case/index.js';
import { ROOT } from './support/cli.js';

const demo = () => loadCase(join(ROOT, 'cases', 'fit-demo.yaml'));
const withMat = (m: Partial<{ E: number; ft: number; GF: number }>) => { const c = demo(); c.material = { ...c.material, ...m }; return unitSlipWarnings(c); };

describe('unit-slip warnings', () => {
  it('the example cases are quiet', () => {
    for (const f of ['fit-demo.yaml', 'beam-3pb-example.yaml', 'ceramic-bend-bar-example.yaml', 'disc-splitting-example.yaml']) expect(unitSlipWarnings(loadCase(join(ROOT, 'cases', f))), f).toEqual([]);
  });
  it('GF 50 as if in N/m', () => {
    expect(withMat({ GF: 50 })).toEqual(['material.GF is 50 N/mm, far above the 0.005–1 N/mm of concrete, mortar, rock or ceramics: if it was meant in N/m, write 0.05 (N/mm)']);
  });
  it('E 25 as if in GPa', () => {
    expect(withMat({ E: 25 })[0]).toBe('material.E is 25 MPa, far below the 1000–1000000 MPa of quasi-brittle materials: if it was meant in GPa, write 25000 (MPa)');
  });
  it('ft in Pa', () => {
    expect(withMat({ ft: 3e6 })[0]).toBe('material.ft is 3000000 MPa, far above any quasi-brittle material\'s tensile strength: if it was meant in Pa, write 3 (MPa)');
  });
});

describe('settings that quietly do less than they seem to', () => {
  it('crack.start anywhere with slit notches: their tips are not start places', () => {
    const c = loadCase(join(ROOT, 'cases', 'den-tension-example.yaml'));
    expect(settingWarnings(c)).toEqual([]);
    c.crack!.start = 'anywhere';
    expect(settingWarnings(c)).toEqual(['crack.start is anywhere, but the tips of the 2 slit notches (width 0 mm) are not start places (cells next to a crack are kept clear), so cracks start in cells beside them: use notch-tips to grow them from the tips']);
  });
  it('the example cases are quiet', () => {
    for (const f of ['beam-3pb-demo.yaml', 'beam-3pb-example.yaml', 'disc-splitting-example.yaml', 'den-tension-example.yaml']) expect(settingWarnings(loadCase(join(ROOT, 'cases', f))), f).toEqual([]);
  });
});
