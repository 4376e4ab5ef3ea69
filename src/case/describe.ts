// A short human summary of a case for `rupta check`.
import { fmtNum, fmtPoint } from './messages.js';
import type { CaseModel } from './model.js';
import { bbox, signedArea } from './shapes.js';

/** Characteristic length l_ch = E·GF/ft² (Hillerborg, Modéer & Petersson 1976), in mm. */
export function characteristicLength(m: { E: number; GF: number; ft: number }): number {
  return (m.E * m.GF) / (m.ft * m.ft);
}

const n3 = (v: number): string => fmtNum(Number(v.toPrecision(3)));
const plural = (n: number, word: string): string => `${n} ${word}${n === 1 ? '' : 's'}`;

export function describeCase(c: CaseModel): string {
  const b = bbox(c.geometry.outline);
  const m = c.material;
  const lines: string[] = [];
  lines.push(`${c.title} (${c.name})`);
  lines.push(`  model      ${c.model}, thickness ${fmtNum(c.thickness)} mm`);
  lines.push(`  specimen   ${n3(b.x1 - b.x0)} × ${n3(b.y1 - b.y0)} mm, ${plural(c.geometry.outline.length, 'outline point')}, `
    + `area ${n3(Math.abs(signedArea(c.geometry.outline)))} mm²`);
  for (const h of c.geometry.holes) {
    lines.push(h.kind === 'circle' ? `  hole       circle at ${fmtPoint(h.center)} mm, radius ${fmtNum(h.radius)} mm`
      : `  hole       polygon of ${h.points.length} points`);
  }
  for (const n of c.geometry.notches) {
    const len = Math.hypot(n.to[0] - n.from[0], n.to[1] - n.from[1]);
    lines.push(`  notch      ${fmtPoint(n.from)} → ${fmtPoint(n.to)} mm, length ${n3(len)} mm, `
      + (n.width > 0 ? `width ${fmtNum(n.width)} mm` : 'sharp slit'));
  }
  lines.push(`  material   E ${fmtNum(m.E)} MPa, ν ${fmtNum(m.nu)}, ft ${fmtNum(m.ft)} MPa, GF ${fmtNum(m.GF)} N/mm, `
    + `l_ch ${n3(characteristicLength(m))} mm`);
  lines.push(`  law        ${m.softening} softening, shear weight ${fmtNum(m.shearWeight)}`);
  // test rigs: strips say how they meet the specimen, spreader loads their shares
  const strip = (q: { at?: unknown; width: number; platen?: string }) => (q.at && q.width > 0 ? ` over ${fmtNum(q.width)} mm (${q.platen ?? 'rocker'})` : '');
  lines.push(`  supports   ${c.supports.map((s) => `${s.fix} ${s.at ? `at ${fmtPoint(s.at)}` : `along ${fmtPoint(s.along![0])}–${fmtPoint(s.along![1])}`}${strip(s)}`).join('; ')}`);
  lines.push(`  loads      ${c.loads.map((l) => `${l.at ? `at ${fmtPoint(l.at)}` : `along ${fmtPoint(l.along![0])}–${fmtPoint(l.along![1])}`} towards ${fmtPoint(l.direction.map((v) => Number(v.toFixed(3))))}`
    + strip(l) + (l.share !== undefined ? `, share ${fmtNum(l.share)}` : '')).join('; ')}`
    + (c.wedge ? `, a ${fmtNum(c.wedge.angle)}° wedge` : ''));
  const ctl = c.control;
  const unit = ctl.by === 'force' ? 'N' : 'mm';
  const gauge = ctl.gauge ? `, gauge ${fmtPoint(ctl.gauge.from)}–${fmtPoint(ctl.gauge.to)}${ctl.reading === 'sliding' ? ' (sliding)' : ''}` : '';
  lines.push(c.crack
    ? `  control    ${ctl.by} to ${fmtNum(ctl.target)} ${unit} in ${ctl.increments} increments${ctl.steps === 'adaptive' ? ' (adaptive steps)' : ''}${gauge}, `
      + (ctl.stopAtLoadFraction > 0 ? `stop below ${fmtNum(100 * ctl.stopAtLoadFraction)} % of peak load` : 'no early stop')
    : `  control    ${ctl.by} to ${fmtNum(ctl.target)} ${unit}${gauge}`);
  if (c.crack) {
    const s = c.crack.start;
    const start = typeof s === 'string' ? s : s.map((p) => fmtPoint(p)).join(', ');
    lines.push(c.crack.model === 'lefm'
      ? `  crack      model lefm (linear elastic fracture mechanics): traction-free cracks from ${start}, a tip grows `
        + `where its MTS equivalent K reaches KIc ${fmtNum(c.material.KIc ?? NaN)} MPa√m, in the MTS direction, step ${fmtNum(c.crack.growthStep)} mm`
        + (c.geometry.notches.some((n) => n.width > 0)
          ? '; a slit as long as the notch is wide (at least six tip cells) is started at the root of each notch of finite width'
          : '')
      : `  crack      model cohesive (${c.material.softening} traction–separation law): from ${start}, ${c.crack.criterion}, step ${fmtNum(c.crack.growthStep)} mm, `
        + `averaging radius ${fmtNum(c.crack.averagingRadius)} mm, next segment laid at ${fmtNum(c.crack.insertAt)} ft`);
  } else {
    lines.push('  crack      none: elastic analysis, one step at the target');
  }
  const g = c.mesh;
  lines.push(`  mesh       size ${n3(g.size)} mm, tip ${n3(g.tipSize)} mm within ${n3(g.refineRadius)} mm, `
    + `${g.coarsen ? 'coarsen behind the tip' : 'no coarsening'}, seed ${g.seed}, ${g.lloyd} Lloyd iterations`);
  if (c.probes.length > 0) lines.push(`  probes     ${c.probes.map((p) => `${p.name} ${fmtPoint(p.at)}`).join(', ')}`);
  return lines.join('\n');
}
