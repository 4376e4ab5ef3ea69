// A case as the templates describe it, and the commented YAML text written from it.
import type { Fix, Vec2 } from '../case/model.js';
import { charLength } from './materials.js';
import { q, type MaterialChoice, type MeshChoice } from './common.js';
import { fmt } from './options.js';

interface Placed { at?: Vec2; along?: [Vec2, Vec2]; width: number; note: string }
export interface SupportSpec extends Placed { fix: Fix }
/** A load; `share` puts it on a spreader with the other loads (test rigs). */
export interface LoadSpec extends Placed { direction: Vec2; share?: number }

export interface CaseSpec {
  /** Test rigs: a wedge drives the two loads apart. */
  wedge?: { angle: number };
  /** Comment lines at the top of the file. */
  about: string[];
  template: string;
  options: string;
  title: string;
  model: 'plane-stress' | 'plane-strain';
  modelNote: string;
  thickness: number;
  geometryNote: string[];
  outline: Vec2[];
  holes?: { center: Vec2; radius: number; note: string }[];
  notches?: { from: Vec2; to: Vec2; width: number; note: string }[];
  material: MaterialChoice;
  supportsNote: string[];
  supports: SupportSpec[];
  loadsNote: string[];
  loads: LoadSpec[];
  controlNote: string[];
  control: { by: 'displacement' | 'cmod'; gauge?: { from: Vec2; to: Vec2; note: string }; reading?: 'sliding'; target: number; targetNote: string; increments: number };
  crackNote: string[];
  crackStart: 'notch-tips' | 'anywhere' | Vec2[];
  crackStartNote: string;
  /** lefm: traction-free cracks grown where K reaches KIc (the material needs a KIc). */
  crackModel?: 'lefm';
  mesh: MeshChoice;
  meshNote: string[];
  probesNote: string[];
  probes: { name: string; at: Vec2 }[];
}

// Coordinates keep their 1e-6 mm rounding, so named points stay exactly on slanted edges.
const p = (a: Vec2): string => `[${q(a[0])}, ${q(a[1])}]`;
const yamlText = (s: string): string => (/^[A-Za-z0-9][A-Za-z0-9 ,.()+/-]*$/.test(s) && !/[-,.]$/.test(s) ? s : JSON.stringify(s));

/** A line with its comment aligned at column 29 (or three spaces after a long line). */
function line(text: string, note?: string): string {
  if (!note) return text;
  return `${text.length < 29 ? text.padEnd(29) : `${text}   `}# ${note}`;
}

const comments = (lines: string[]): string[] => lines.map((l) => `# ${l}`);

function outlineLines(pts: Vec2[]): string[] {
  if (pts.length <= 8) return [`  outline: [${pts.map(p).join(', ')}]`];
  const out = ['  outline: ['];
  for (let i = 0; i < pts.length; i += 4) {
    const row = pts.slice(i, i + 4).map(p).join(', ');
    out.push(`    ${row}${i + 4 < pts.length ? ',' : ''}`);
  }
  out.push('  ]');
  return out;
}

function placed(x: Placed): string {
  return x.at ? `at: ${p(x.at)}` : `along: [${p(x.along![0])}, ${p(x.along![1])}]`;
}

/** "Written by rupta new NAME with the options:" and the options, wrapped. */
function optionComment(template: string, options: string): string[] {
  const out = [`# Written by \`rupta new ${template}\` with the options:`];
  let row = '#  ';
  for (const part of options.split(/ (?=--)/)) {
    if (row.length + part.length > 88 && row.length > 3) { out.push(row); row = '#  '; }
    row += ` ${part}`;
  }
  out.push(row);
  return out;
}

/** The commented YAML case file of a spec. */
export function caseText(c: CaseSpec): string {
  const m = c.material.preset, order2 = c.mesh.order === 2 && c.crackModel === 'lefm';
  const L: string[] = [
    ...comments(c.about),
    ...optionComment(c.template, c.options),
    '# Units: mm, N, MPa (fracture energy in N/mm).',
    'format: 1',
    `title: ${yamlText(c.title)}`,
    'units: mm-N-MPa',
    line(`model: ${c.model}`, c.modelNote),
    line(`thickness: ${fmt(c.thickness)}`, 'mm, out of plane'),
    '',
    ...comments(c.geometryNote),
    'geometry:',
    ...outlineLines(c.outline),
  ];
  if (c.holes?.length) {
    L.push('  holes:');
    for (const h of c.holes) L.push(line(`    - {circle: {center: ${p(h.center)}, radius: ${fmt(h.radius)}}}`, h.note));
  }
  if (c.notches?.length) {
    L.push('  notches:');
    for (const n of c.notches) L.push(line(`    - {from: ${p(n.from)}, to: ${p(n.to)}, width: ${fmt(n.width)}}`, n.note));
  }
  L.push(
    '',
    `# Material preset ${m.name}.`,
    ...comments(m.source),
    `# Characteristic length E GF / ft^2 = ${fmt(Number(charLength(m).toPrecision(3)))} mm (Hillerborg, Modeer, Petersson 1976).`,
    'material:',
    line(`  E: ${fmt(m.E)}`, "MPa, Young's modulus"),
    line(`  nu: ${fmt(m.nu)}`, "Poisson's ratio"),
    line(`  ft: ${fmt(m.ft)}`, 'MPa, tensile strength'),
    line(`  GF: ${fmt(m.GF)}`, 'N/mm, fracture energy'),
    line(`  softening: ${c.material.softening}`, 'traction-separation law of the crack'),
    line('  shearWeight: 1', 'weight of sliding in the effective opening'),
    ...(c.crackModel === 'lefm' && m.KIc !== undefined ? [line(`  KIc: ${fmt(m.KIc)}`, 'MPa m^0.5, fracture toughness (crack.model lefm)')] : []),
    '',
    ...comments(c.supportsNote),
    'supports:',
  );
  for (const s of c.supports) {
    const w = s.along ? '' : `, width: ${fmt(s.width)}`;
    L.push(line(`  - {${placed(s)}, fix: ${s.fix}${w}}`, s.note));
  }
  L.push('', ...comments(c.loadsNote), 'loads:');
  for (const l of c.loads) {
    const w = l.along ? '' : `, width: ${fmt(l.width)}`;
    const sh = l.share !== undefined ? `, share: ${fmt(l.share)}` : '';
    L.push(line(`  - {${placed(l)}, direction: ${p(l.direction)}${w}${sh}}`, l.note));
  }
  if (c.wedge) L.push(line(`wedge: {angle: ${fmt(c.wedge.angle)}}`, 'degrees, included angle; friction left out'));
  const k = c.control;
  L.push('', ...comments(c.controlNote), 'control:', `  by: ${k.by}`);
  if (k.gauge) L.push(line(`  gauge: {from: ${p(k.gauge.from)}, to: ${p(k.gauge.to)}}`, k.gauge.note));
  if (k.reading) L.push(line(`  reading: ${k.reading}`, 'across the gauge: the crack mouth sliding'));
  L.push(
    line(`  target: ${fmt(k.target)}`, k.targetNote),
    line(`  increments: ${k.increments}`, 'steps from zero to the target'),
    line('  stopAtLoadFraction: 0.05', 'stop once the load has fallen to 5 % of the peak'),
    '',
    ...(order2 ? [
      '# No crack block: the brittle mode is of mesh order 1; at order 2 this case is elastic,',
      '# one solve at the control target (stresses, probes, K at the slit tips).',
    ] : [
      ...comments(c.crackNote),
      'crack:',
      line(`  start: ${typeof c.crackStart === 'string' ? c.crackStart : `[${c.crackStart.map(p).join(', ')}]`}`, c.crackStartNote),
      line('  criterion: principal-stress', 'grow where the averaged stress reaches ft'),
      line(`  growthStep: ${fmt(c.mesh.growthStep)}`, 'mm per growth step'),
      line(`  averagingRadius: ${fmt(c.mesh.averagingRadius)}`, 'mm, stress averaged ahead of the tip'),
      ...(c.crackModel === 'lefm' ? [line('  model: lefm', 'traction-free crack, grows where K reaches KIc')] : []),
    ]),
    '',
    ...comments(c.meshNote),
    `mesh: {size: ${fmt(c.mesh.size)}, tipSize: ${fmt(c.mesh.tipSize)}, refineRadius: ${fmt(c.mesh.refineRadius)}, coarsen: true, seed: 1, lloyd: 8${c.mesh.order === 2 ? ', order: 2' : ''}}`,
    '',
    ...comments(c.probesNote),
    'probes:',
  );
  for (const pr of c.probes) L.push(`  - {name: ${pr.name}, at: ${p(pr.at)}}`);
  L.push(
    '',
    '# Up to 40 pictures evenly spaced over the run (add svg to frames for SVG copies) and an animation.',
    'output: {frames: [png], every: 1, maxFrames: 40, animation: gif, vtk: false}',
    '',
  );
  return L.join('\n');
}

/** The standard mesh comment. */
export function meshNote(m: MeshChoice, what: string): string[] {
  return [`Polygons of about ${fmt(m.size)} mm, ${fmt(m.tipSize)} mm within ${fmt(m.refineRadius)} mm of ${what}.`];
}
