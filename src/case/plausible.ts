// Values that are valid but look like a slip: material values in another unit (N/m for N/mm,
// GPa for MPa, Pa for MPa), and settings that quietly do less than they seem to. They are
// warned about, not refused: an unusual case may mean them.

import type { CaseModel } from './model.js';

/** One sentence per material value that looks like it was given in another unit. */
export function unitSlipWarnings(c: CaseModel): string[] {
  const m = c.material, out: string[] = [];
  const g = (v: number) => Number(v.toPrecision(4));
  // fracture energies of concrete, mortar, rock and ceramics lie between about 0.005 and 1 N/mm
  if (m.GF > 2) out.push(`material.GF is ${m.GF} N/mm, far above the 0.005–1 N/mm of concrete, mortar, rock or ceramics: if it was meant in N/m, write ${g(m.GF / 1000)} (N/mm)`);
  // stiffnesses lie between about 1 GPa (soft rock) and 1000 GPa
  if (m.E < 500) out.push(`material.E is ${m.E} MPa, far below the 1000–1000000 MPa of quasi-brittle materials: if it was meant in GPa, write ${g(m.E * 1000)} (MPa)`);
  else if (m.E > 2e6) out.push(`material.E is ${m.E} MPa, above any solid's stiffness: if it was meant in kPa or Pa, write ${g(m.E / (m.E > 2e9 ? 1e6 : 1e3))} (MPa)`);
  // tensile strengths lie between about 0.1 MPa (weak mortar) and a few hundred MPa (ceramics)
  if (m.ft > 1000) out.push(`material.ft is ${m.ft} MPa, far above any quasi-brittle material's tensile strength: if it was meant in ${m.ft > 1e5 ? 'Pa' : 'kPa'}, write ${g(m.ft / (m.ft > 1e5 ? 1e6 : 1e3))} (MPa)`);
  else if (m.ft < 0.02) out.push(`material.ft is ${m.ft} MPa, below any quasi-brittle material's tensile strength: if it was meant in GPa, write ${g(m.ft * 1000)} (MPa)`);
  if (m.E > 0 && m.ft > 0 && m.ft / m.E > 0.01) out.push(`material.ft is ${g(100 * m.ft / m.E)} % of material.E, where quasi-brittle materials have 0.005–0.5 %: check the units of both (MPa)`);
  return out;
}

/** One sentence per setting that quietly does less than it seems to. */
export function settingWarnings(c: CaseModel): string[] {
  const out: string[] = [];
  const slits = c.geometry.notches.filter((n) => n.width === 0).length;
  if (c.crack?.start === 'anywhere' && slits > 0 && c.crack.model !== 'lefm') {
    out.push(`crack.start is anywhere, but the tips of the ${slits} slit notch${slits > 1 ? 'es' : ''} (width 0 mm) are not start places (cells next to a crack are kept clear), so cracks start in cells beside them: use notch-tips to grow them from the tips`);
  }
  return out;
}

/** Every warning a case earns before it runs: unit slips and quiet settings. */
export function caseWarnings(c: CaseModel): string[] {
  return [...unitSlipWarnings(c), ...settingWarnings(c)];
}
