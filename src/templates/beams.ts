// Notched beams: three-point bending, four-point bending, four-point shear, and the small
// ceramic bend bar (three-point bending with a sharp notch and fine tip cells).
import type { Vec2 } from '../case/model.js';
import {
  criticalOpening, materialOf, meshFor, mouthTarget, niceDown, nominalStrength, num, optionLine, pt, q, sig2, str, travelTarget, type MeshChoice,
} from './common.js';
import { fmt, length, materialOption, meshOptions, need, softeningOption, titleOption, withDefaults, orderOf } from './options.js';
import type { Template, TemplateOption, Values } from './types.js';
import { caseText, meshNote, type CaseSpec, type LoadSpec, type SupportSpec } from './write.js';

type Kind = '3pb' | '4pb' | 'shear';

interface BeamDefaults {
  length: number; span: number; depth: number; thickness: number; notchDepth: number; notchWidth: number;
  material: string; title: string;
  /** lefm: a brittle bar, the crack traction-free and grown where K reaches KIc. */
  crackModel?: 'lefm';
}

/** Bearing strips a tenth of the depth by default (common practice for bending rigs). */
const STRIP_OF_DEPTH = 0.1;

function beamOptions(kind: Kind, d: BeamDefaults, extra: TemplateOption[]): TemplateOption[] {
  const span = kind === 'shear' ? [] : [length('span', d.span, 'distance between the supports')];
  return [
    length('length', d.length, 'beam length'),
    ...span,
    length('depth', d.depth, 'beam depth'),
    length('thickness', d.thickness, 'beam width, out of plane'),
    length('notch-depth', d.notchDepth, 'notch depth from the bottom face (0: no notch)', 0),
    length('notch-width', d.notchWidth, 'notch width (0: a sharp slit)', 0),
    ...extra,
    { ...length('support-width', 0, 'bearing strip under each support, a rigid rocker (auto: a tenth of the depth)', 0), default: 'auto' },
    { ...length('bearing-width', 0, 'bearing strip under each load point, a rigid rocker (auto: a tenth of the depth)', 0), default: 'auto' },
    materialOption(d.material),
    softeningOption,
    ...meshOptions,
    titleOption(d.title),
  ];
}

/**
 * Cells across the depth of the four-point shear beam (the other beams take 10). Its crack
 * curves into the cells beside the inner load strip, which stay as meshed once loading has
 * begun (fracture/growth.ts, rigZone); a cut through one of them under load moved 0.6 % of the
 * work on 10 mm cells (a 26-vertex cell stored 26 N·mm, its two halves 70 N·mm at the same
 * displacements). Measured worst energy step over seeds 1–5, default 100 mm beam:
 * 10 mm cells 1.15 / 0.78 / 1.92 % (seeds 1–3), 8 mm cells 0.60 / 0.29 / 0.42 / 0.63 / 0.21 %.
 */
const SHEAR_CELLS = 12.5;

function buildBeam(tpl: string, kind: Kind, about: string[], v: Values, crackModel?: 'lefm'): string {
  const L = num(v, 'length'), D = num(v, 'depth'), B = num(v, 'thickness');
  const a = num(v, 'notch-depth'), nw = num(v, 'notch-width');
  const strip = (k: string) => (v[k] === 'auto' ? niceDown(STRIP_OF_DEPTH * D) : num(v, k));
  const sw = strip('support-width'), bw = strip('bearing-width');
  const m = q(L / 2);
  need(tpl, 'depth', D, 0.1, L / 2, 'mm', `for a length of ${fmt(L)} mm`);
  need(tpl, 'support-width', sw, 0, L / 10, 'mm', `for a length of ${fmt(L)} mm`);
  need(tpl, 'notch-depth', a, 0, 0.9 * D, 'mm', `for a depth of ${fmt(D)} mm`);
  need(tpl, 'notch-width', nw, 0, D / 5, 'mm', `for a depth of ${fmt(D)} mm`);
  const mat = materialOf(v);
  const lefm = crackModel === 'lefm' && a > 0 && nw === 0 && mat.preset.KIc !== undefined;
  // a brittle crack needs no process-zone cells: the tip cells only have to resolve K
  const mesh = lefm ? lefmMesh(tpl, v, D) : meshFor(tpl, v, kind === 'shear' ? D / SHEAR_CELLS : D / 10, D / 50, mat, D / 2, `for a depth of ${fmt(D)} mm`);
  // Half the gauge length: the notch mouth corners, or a little either side of a slit.
  const gh = nw > 0 ? nw / 2 : Math.max(mesh.tipSize, D / 50);

  // Supports and loads of each arrangement, with the span that sets the bending deflection.
  let supports: SupportSpec[], loads: LoadSpec[], xn = m, span: number;
  let supportsNote: string[], loadsNote: string[];
  const probes: { name: string; at: Vec2 }[] = [];
  if (kind === 'shear') {
    const c = num(v, 'inner-offset'), s = num(v, 'outer-offset');
    need(tpl, 'inner-offset', c, gh + Math.max(sw, bw) / 2, L / 8, 'mm', `for a notch-width of ${fmt(nw)} mm, bearing strips of ${fmt(Math.max(sw, bw))} mm and a length of ${fmt(L)} mm`);
    need(tpl, 'outer-offset', s, 2 * c, L / 2 - Math.max(sw, bw) / 2, 'mm', `for an inner-offset of ${fmt(c)} mm and a length of ${fmt(L)} mm`);
    need(tpl, 'bearing-width', bw, 0, c, 'mm', `for an inner-offset of ${fmt(c)} mm`);
    span = 2 * s;
    supports = [
      { at: pt(m - s, 0), fix: 'xy', width: sw, note: 'outer support, left: pin' },
      { at: pt(m + c, 0), fix: 'y', width: sw, note: 'inner support, right: roller' },
    ];
    // a spreader on a pivot above the notch: by the lever rule the inner point takes s/(s + c)
    loads = [
      { at: pt(m - c, D), direction: [0, -1], width: bw, share: s, note: 'inner load point, left' },
      { at: pt(m + s, D), direction: [0, -1], width: bw, share: c, note: 'outer load point, right' },
    ];
    supportsNote = [
      `Antisymmetric four-point shear: supports ${fmt(s)} mm left and ${fmt(c)} mm right of the notch,`,
      'load points mirrored on the top face. No rigid-body motion is left.',
    ];
    loadsNote = [
      `A spreader on a pivot above the notch shares the machine force ${fmt(s)} : ${fmt(c)} between the`,
      'inner and outer load points (lever rule); the machine travel is their weighted mean.',
      'The ligament carries much shear and little bending, so the crack leaves the notch at an',
      'angle and curves.',
    ];
    probes.push({ name: 'inner-load-point', at: pt(m - c, D) });
  } else {
    span = num(v, 'span');
    need(tpl, 'span', span, D, L - sw, 'mm', `for a length of ${fmt(L)} mm, a depth of ${fmt(D)} mm and a support-width of ${fmt(sw)} mm`);
    supports = [
      { at: pt(m - span / 2, 0), fix: 'xy', width: sw, note: 'pin' },
      { at: pt(m + span / 2, 0), fix: 'y', width: sw, note: 'roller' },
    ];
    supportsNote = [`Pin on the left, roller on the right: ${fmt(span)} mm span, no rigid-body motion left.`];
    if (kind === '3pb') {
      const e = v['eccentricity'] === undefined ? 0 : num(v, 'eccentricity');
      const lim = 0.4 * span - nw / 2;
      need(tpl, 'eccentricity', e, -lim, lim, 'mm', `for a span of ${fmt(span)} mm`);
      need(tpl, 'bearing-width', bw, 0, span / 4, 'mm', `for a span of ${fmt(span)} mm`);
      xn = q(m + e);
      loads = [{ at: pt(m, D), direction: [0, -1], width: bw, note: 'mid-span, top face' }];
      loadsNote = [bw > 0 ? `The machine pushes down at mid-span through a ${fmt(bw)} mm wide bearing strip.`
        : 'The machine pushes down at mid-span through a roller (line contact, a point in the plane).'];
      probes.push({ name: 'load-point', at: pt(m, D) });
    } else {
      const ls = num(v, 'load-span');
      need(tpl, 'load-span', ls, Math.max(bw, nw) + 0.1, span - bw, 'mm', `for a span of ${fmt(span)} mm and a bearing-width of ${fmt(bw)} mm`);
      need(tpl, 'bearing-width', bw, 0, ls / 2, 'mm', `for a load-span of ${fmt(ls)} mm`);
      loads = [
        { at: pt(m - ls / 2, D), direction: [0, -1], width: bw, share: 1, note: 'left load point' },
        { at: pt(m + ls / 2, D), direction: [0, -1], width: bw, share: 1, note: 'right load point' },
      ];
      loadsNote = [`Two load points ${fmt(ls)} mm apart under a spreader that gives each half the machine force:`,
        'constant moment between them; the machine travel is the mean of the two.'];
      probes.push({ name: 'left-load-point', at: pt(m - ls / 2, D) }, { name: 'right-load-point', at: pt(m + ls / 2, D) });
    }
  }
  if (sw > 0 || bw > 0) supportsNote.push('Bearing strips are rigid rockers: each may tilt about its centre, as on a roller bearing.');
  const notched = a > 0;
  probes.push({ name: 'ligament-middle', at: pt(xn, (a + D) / 2) });

  const gauge = notched ? { from: pt(xn - gh, 0), to: pt(xn + gh, 0), note: nw > 0 ? 'corners of the notch mouth' : 'either side of the slit mouth' } : undefined;
  const elasticTravel = (nominalStrength(mat, D) * span * span) / (6 * mat.preset.E * D);
  const byCmod = notched && kind !== 'shear';
  const control: CaseSpec['control'] = lefm
    // some twenty times the mouth opening at the peak: the run ends when the bar comes apart
    ? { by: 'cmod', gauge: gauge!, target: sig2((100 * nominalStrength(mat, D) * a) / mat.preset.E), targetNote: 'mm of mouth opening, well past separation', increments: 100 }
    : byCmod
    ? { by: 'cmod', gauge: gauge!, target: mouthTarget(mat, D, a), targetNote: 'mm of mouth opening at the end of the run', increments: 100 }
    : kind === 'shear' && notched
      // driven by the crack mouth sliding, as the test is run in the lab; two critical openings
      // of sliding bring the load down to a few per cent of the peak (measured on the defaults)
      ? { by: 'cmod', gauge: gauge!, reading: 'sliding', target: sig2(2 * criticalOpening(mat)), targetNote: 'mm of mouth sliding at the end of the run', increments: 60 }
      : kind === 'shear'
      ? { by: 'displacement', target: sig2(criticalOpening(mat)), targetNote: 'mm of machine travel at the end of the run', increments: 60 }
      : { by: 'displacement', ...(gauge ? { gauge } : {}), target: travelTarget(mat, elasticTravel), targetNote: 'mm of load-point travel at the end of the run', increments: 100 };
  const controlNote = byCmod
    ? ['Crack-mouth opening control: a clip gauge across the notch mouth keeps the test', 'stable past the peak load.']
    : kind === 'shear' && notched
      ? ['Control by the sliding of the notch mouth (CMSD): the gauge across the mouth reads', 'the relative vertical motion of its two sides, which keeps growing past the peak.']
      : ['Load-point displacement control (no notch, so no gauge to steer by).'];

  const spec: CaseSpec = {
    about,
    template: tpl, options: optionLine(v),
    title: str(v, 'title'),
    model: 'plane-stress',
    modelNote: `a slice of a ${fmt(B)} mm wide beam`,
    thickness: B,
    geometryNote: [`Beam ${fmt(L)} mm long and ${fmt(D)} mm deep` + (notched ? `, notched ${fmt(a)} mm deep from the bottom${xn !== m ? ` ${fmt(q(xn - m))} mm off mid-span` : ' at mid-span'}.` : ', without a notch.')],
    outline: [pt(0, 0), pt(L, 0), pt(L, D), pt(0, D)],
    ...(notched ? { notches: [{ from: pt(xn, 0), to: pt(xn, a), width: nw, note: nw > 0 ? `${fmt(nw)} mm wide saw cut` : 'a sharp slit' }] } : {}),
    material: mat,
    supportsNote, supports, loadsNote, loads, controlNote, control,
    crackNote: lefm ? ['Linear elastic fracture mechanics: the crack is traction-free and its tip grows',
      'where the equivalent K of the maximum tangential stress criterion reaches KIc.']
      : [notched ? 'One crack grows from the notch tip where the averaged principal stress reaches ft.'
      : 'A crack starts wherever the averaged principal stress first reaches ft.'],
    ...(lefm ? { crackModel: 'lefm' as const } : {}),
    crackStart: notched ? 'notch-tips' : 'anywhere',
    crackStartNote: notched ? 'the tip of the notch' : 'no notch: the most stressed point',
    mesh,
    meshNote: meshNote(mesh, notched ? 'the notch tip and the crack tip' : 'crack tips'),
    probesNote: ['Points whose displacement and stress are written every step.'],
    probes,
  };
  return caseText(spec);
}

function beamTemplate(name: string, kind: Kind, summary: string, about: string[], d: BeamDefaults, extra: TemplateOption[]): Template {
  const options = beamOptions(kind, d, extra);
  return { name, summary, options, build: (values) => buildBeam(name, kind, about, withDefaults(options, values), d.crackModel) };
}

/** Cells for a brittle crack: depth/80 at the tips within ten tip cells, growth by two tip cells. */
function lefmMesh(tpl: string, v: Values, D: number): MeshChoice {
  const size = v['mesh-size'] === 'auto' ? q(D / 10) : num(v, 'mesh-size');
  need(tpl, 'mesh-size', size, 0, D / 2, 'mm', `for a depth of ${fmt(D)} mm`);
  const tipSize = v['tip-size'] === 'auto' ? q(D / 80) : num(v, 'tip-size');
  need(tpl, 'tip-size', tipSize, 0, size, 'mm', `for a mesh-size of ${fmt(size)} mm`);
  return { size, tipSize, refineRadius: q(10 * tipSize), growthStep: q(2 * tipSize), averagingRadius: q(3 * tipSize), order: orderOf(v) };
}

export const beam3pb = beamTemplate('beam-3pb', '3pb',
  'notched beam in three-point bending, CMOD gauge across the notch mouth',
  ['Notched beam in three-point bending: pin and roller under the ends, the load at mid-span.'],
  { length: 440, span: 400, depth: 100, thickness: 50, notchDepth: 30, notchWidth: 2, material: 'concrete-normal', title: 'Three-point bend beam, demo mix' },
  [length('eccentricity', 0, 'offset of the notch from mid-span, to the right', -100000, 100000)]);

export const beam4pb = beamTemplate('beam-4pb', '4pb',
  'notched beam in four-point bending, two load points under a spreader',
  ['Notched beam in four-point bending: pin and roller under the ends, two load points on top.'],
  { length: 500, span: 450, depth: 150, thickness: 150, notchDepth: 25, notchWidth: 3, material: 'concrete-normal', title: 'Four-point bend beam, demo mix' },
  [length('load-span', 150, 'distance between the two load points')]);

export const beam4pShear = beamTemplate('beam-4p-shear', 'shear',
  'single-edge-notched beam in antisymmetric four-point shear; the crack curves away from the notch',
  ['Single-edge-notched beam in four-point shear: supports and load points mirrored about',
    'the notch, so the ligament carries shear with little bending and the crack curves.'],
  { length: 440, span: 0, depth: 100, thickness: 100, notchDepth: 20, notchWidth: 5, material: 'concrete-normal', title: 'Four-point shear beam, demo mix' },
  [length('inner-offset', 20, 'distance of the inner support and load point from the notch'),
    length('outer-offset', 200, 'distance of the outer support and load point from the notch')]);

export const ceramicBendBar = beamTemplate('ceramic-bend-bar', '3pb',
  'small alumina bar in three-point bending with a sharp notch and fine tip cells',
  ['Small ceramic bend bar with a sharp notch in three-point bending. The process zone of a',
    'ceramic is micrometres long, so the crack is modelled by linear elastic fracture',
    'mechanics (crack.model lefm): traction-free, growing where K reaches KIc. A 3 x 4 mm',
    'bar on a 16 mm span (S/W = 4), the three-point set-up of the single-edge V-notched beam',
    'test (ISO 23146; dimensions from memory).'],
  { length: 20, span: 16, depth: 4, thickness: 3, notchDepth: 1, notchWidth: 0, material: 'ceramic-alumina', title: 'Notched ceramic bend bar, demo batch', crackModel: 'lefm' },
  [length('eccentricity', 0, 'offset of the notch from mid-span, to the right', -100000, 100000)]);
