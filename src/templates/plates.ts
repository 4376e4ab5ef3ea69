// Plate specimens: wedge splitting, compact tension, the L-shaped panel and the
// double-edge-notched tension panel.
import type { Vec2 } from '../case/model.js';
import { criticalOpening, materialOf, meshFor, mouthTarget, nominalStrength, num, optionLine, pt, q, sig2, str, travelTarget } from './common.js';
import { fmt, length, materialOption, meshOptions, need, softeningOption, titleOption, withDefaults } from './options.js';
import type { Template, TemplateOption, Values } from './types.js';
import { caseText, meshNote, type CaseSpec } from './write.js';

const tail = (material: string, title: string): TemplateOption[] =>
  [materialOption(material), softeningOption, ...meshOptions, titleOption(title)];

function template(name: string, summary: string, options: TemplateOption[], build: (tpl: string, v: Values) => CaseSpec): Template {
  return { name, summary, options, build: (values) => caseText(build(name, withDefaults(options, values))) };
}

const PROBES_NOTE = ['Points whose displacement and stress are written every step.'];

export const wedgeSplitting = template('wedge-splitting',
  'cube or plate with a groove and a starter notch, split by a wedge; opening gauge at the load line',
  [
    length('width', 200, 'specimen width'),
    length('height', 200, 'specimen height'),
    length('thickness', 200, 'specimen thickness, out of plane'),
    length('groove-width', 40, 'width of the groove in the top face'),
    length('groove-depth', 40, 'depth of the groove'),
    length('notch-depth', 80, 'depth of the notch tip below the top face'),
    length('notch-width', 3, 'width of the starter notch (0: a sharp slit)', 0),
    length('load-line', 20, 'depth of the wedge line below the top face'),
    length('bearing-width', 10, 'bearing strip of each splitting load on the groove face', 0),
    length('support-width', 20, 'width of the line support under the specimen'),
    { name: 'wedge-angle', unit: 'degrees', default: 15, min: 1, max: 60, help: 'included angle of the wedge (common practice: about 15°)' },
    ...tail('concrete-normal', 'Wedge-splitting cube, demo mix'),
  ],
  (tpl, v) => {
    const W = num(v, 'width'), H = num(v, 'height'), gw = num(v, 'groove-width'), gd = num(v, 'groove-depth');
    const a = num(v, 'notch-depth'), nw = num(v, 'notch-width'), ll = num(v, 'load-line');
    const bw = num(v, 'bearing-width'), sw = num(v, 'support-width');
    need(tpl, 'height', H, W / 4, 4 * W, 'mm', `for a width of ${fmt(W)} mm`);
    need(tpl, 'groove-width', gw, W / 50, W / 2, 'mm', `for a width of ${fmt(W)} mm`);
    need(tpl, 'groove-depth', gd, H / 50, H / 2, 'mm', `for a height of ${fmt(H)} mm`);
    need(tpl, 'notch-depth', a, gd + H / 100, 0.9 * H, 'mm', `for a groove-depth of ${fmt(gd)} mm and a height of ${fmt(H)} mm`);
    need(tpl, 'notch-width', nw, 0, gw / 2, 'mm', `for a groove-width of ${fmt(gw)} mm`);
    need(tpl, 'bearing-width', bw, 0, gd / 2, 'mm', `for a groove-depth of ${fmt(gd)} mm`);
    need(tpl, 'load-line', ll, bw / 2 + gd / 100, gd - bw / 2 - gd / 100, 'mm', `for a groove-depth of ${fmt(gd)} mm and a bearing-width of ${fmt(bw)} mm`);
    need(tpl, 'support-width', sw, W / 50, W / 2, 'mm', `for a width of ${fmt(W)} mm`);
    const mat = materialOf(v);
    // tip cells of a sixtieth of the smaller side (3 mm by default): much faster than 2 mm, peak within 0.3 % (measured)
    const mesh = meshFor(tpl, v, Math.min(W, H) / 20, Math.min(W, H) / 60, mat, Math.min(W, H) / 4, `for a ${fmt(W)} x ${fmt(H)} mm specimen`);
    const c = q(W / 2), g = gw / 2, yl = H - ll;
    const left = pt(c - g, yl), right = pt(c + g, yl);
    return {
      about: ['Wedge-splitting test: a wedge driven into the groove pushes its faces apart; the',
        'splitting force acts horizontally on both faces at the wedge line.'],
      template: tpl, options: optionLine(v),
      title: str(v, 'title'),
      model: 'plane-stress', modelNote: 'splitting force in the plane of the face',
      thickness: num(v, 'thickness'),
      geometryNote: [`Block ${fmt(W)} x ${fmt(H)} mm with a ${fmt(gw)} x ${fmt(gd)} mm groove in the top face and a starter`,
        `notch from the groove bottom down to ${fmt(a)} mm below the top face.`],
      outline: [pt(0, 0), pt(W, 0), pt(W, H), pt(c + g, H), pt(c + g, H - gd), pt(c - g, H - gd), pt(c - g, H), pt(0, H)],
      notches: [{ from: pt(c, H - gd), to: pt(c, H - a), width: nw, note: nw > 0 ? `${fmt(nw)} mm wide starter notch` : 'a sharp starter slit' }],
      material: mat,
      supportsNote: [`Line support under the middle of the specimen, ${fmt(sw)} mm wide, held at its two edges`,
        '(the left edge also horizontally, so no rigid-body motion is left).'],
      supports: [
        { at: pt(c - sw / 2, 0), fix: 'xy', width: 0, note: 'left edge of the line support' },
        { at: pt(c + sw / 2, 0), fix: 'y', width: 0, note: 'right edge of the line support' },
      ],
      loadsNote: [`A ${fmt(num(v, 'wedge-angle'))}° wedge pushes both groove faces outwards at the wedge line with the same force:`,
        'load_N is that splitting force, the displacement the opening at the load line; the',
        'machine\'s vertical force, 2·tan(angle/2) times the splitting force, is in the summary and the curve.'],
      loads: [
        { at: left, direction: [-1, 0], width: bw, note: 'left groove face' },
        { at: right, direction: [1, 0], width: bw, note: 'right groove face' },
      ],
      wedge: { angle: num(v, 'wedge-angle') },
      controlNote: ['Opening control at the load line: the gauge joins the two load points, so the', 'test stays stable past the peak.'],
      control: { by: 'cmod', gauge: { from: left, to: right, note: 'across the groove at the wedge line' }, target: mouthTarget(mat, H, a), targetNote: 'mm of opening at the load line at the end of the run', increments: 100 },
      crackNote: ['One crack grows down from the notch tip where the averaged principal stress reaches ft.'],
      crackStart: 'notch-tips', crackStartNote: 'the tip of the starter notch',
      mesh, meshNote: meshNote(mesh, 'the notch tip and the crack tip'),
      probesNote: PROBES_NOTE,
      probes: [{ name: 'ligament-middle', at: pt(c, (H - a) / 2) }, { name: 'bottom-middle', at: pt(c, 0) }],
    };
  });

export const compactTension = template('compact-tension',
  'plate with a long notch, pulled open through loading holes or load points on the notch faces; gauge at the load line',
  [
    length('width', 200, 'width W from the load line to the back face'),
    length('height', 240, 'plate height'),
    length('front', 50, 'distance from the front face to the load line'),
    length('notch-length', 100, 'notch length from the load line to its tip'),
    length('notch-width', 10, 'notch width (the gauge sits on its faces)'),
    length('thickness', 50, 'plate thickness, out of plane'),
    { name: 'loading', unit: '', default: 'holes', choices: ['holes', 'notch-faces'], help: 'pins in two loading holes, or load points on the notch faces' },
    length('hole-diameter', 50, 'diameter of the loading holes'),
    length('hole-offset', 55, 'distance of each hole centre from the notch line'),
    ...tail('concrete-normal', 'Compact tension plate, demo mix'),
  ],
  (tpl, v) => {
    const W = num(v, 'width'), H = num(v, 'height'), f = num(v, 'front'), a = num(v, 'notch-length');
    const nw = num(v, 'notch-width'), holes = str(v, 'loading') === 'holes';
    need(tpl, 'height', H, W / 2, 2 * W, 'mm', `for a width of ${fmt(W)} mm`);
    need(tpl, 'front', f, W / 50, W / 2, 'mm', `for a width of ${fmt(W)} mm`);
    need(tpl, 'notch-length', a, 0.2 * W, 0.8 * W, 'mm', `for a width of ${fmt(W)} mm`);
    need(tpl, 'notch-width', nw, H / 500, H / 10, 'mm', `for a height of ${fmt(H)} mm`);
    const yc = q(H / 2);
    let r = 0, e = 0;
    if (holes) {
      const d = num(v, 'hole-diameter');
      need(tpl, 'hole-diameter', d, W / 100, 1.8 * f, 'mm', `for a front of ${fmt(f)} mm`);
      r = d / 2;
      e = num(v, 'hole-offset');
      need(tpl, 'hole-offset', e, r + nw / 2 + H / 100, H / 2 - r - H / 100, 'mm', `for a hole-diameter of ${fmt(d)} mm, a notch-width of ${fmt(nw)} mm and a height of ${fmt(H)} mm`);
    }
    const mat = materialOf(v);
    const mesh = meshFor(tpl, v, W / 16, W / 100, mat, W / 4, `for a width of ${fmt(W)} mm`);
    const lower = pt(f, yc - nw / 2), upper = pt(f, yc + nw / 2);
    const pinLow = holes ? pt(f, yc - e - r) : lower, pinUp = holes ? pt(f, yc + e + r) : upper;
    return {
      about: ['Compact tension plate: a long notch pulled open at the load line, the crack runs',
        'through the ligament to the back face.'],
      template: tpl, options: optionLine(v),
      title: str(v, 'title'),
      model: 'plane-stress', modelNote: 'load in the plane of the plate',
      thickness: num(v, 'thickness'),
      geometryNote: [`Plate ${fmt(q(f + W))} x ${fmt(H)} mm; the load line is ${fmt(f)} mm from the front face, the notch`,
        `runs ${fmt(a)} mm beyond it` + (holes ? `; loading holes of ${fmt(2 * r)} mm, ${fmt(e)} mm above and below the notch.` : '.')],
      outline: [pt(0, 0), pt(f + W, 0), pt(f + W, H), pt(0, H)],
      ...(holes ? { holes: [
        { center: pt(f, yc - e), radius: q(r), note: 'lower loading hole' },
        { center: pt(f, yc + e), radius: q(r), note: 'upper loading hole' },
      ] } : {}),
      notches: [{ from: pt(0, yc), to: pt(f + a, yc), width: nw, note: `${fmt(nw)} mm wide notch` }],
      material: mat,
      supportsNote: [holes ? 'The lower pin holds the bottom of the lower hole; the upper pin keeps to the load line.'
        : 'The lower notch face is held at the load line; the upper load point keeps to the load line.'],
      supports: [
        { at: pinLow, fix: 'xy', width: 0, note: holes ? 'lower pin, bottom of the lower hole' : 'lower notch face' },
        { at: pinUp, fix: 'x', width: 0, note: 'upper load point stays on the load line' },
      ],
      loadsNote: [holes ? 'The upper pin pulls the top of the upper hole upwards.' : 'A jack in the notch pushes the upper face upwards.'],
      loads: [{ at: pinUp, direction: [0, 1], width: 0, note: holes ? 'upper pin, top of the upper hole' : 'upper notch face' }],
      controlNote: ['Opening control at the load line: a gauge across the notch faces keeps the test', 'stable past the peak.'],
      control: { by: 'cmod', gauge: { from: lower, to: upper, note: 'notch faces at the load line' }, target: mouthTarget(mat, W, f + a), targetNote: 'mm of opening at the load line at the end of the run', increments: 100 },
      crackNote: ['One crack grows from the notch tip where the averaged principal stress reaches ft.'],
      crackStart: 'notch-tips', crackStartNote: 'the tip of the notch',
      mesh, meshNote: meshNote(mesh, 'the notch tip and the crack tip'),
      probesNote: PROBES_NOTE,
      probes: [{ name: 'ligament-middle', at: pt(f + a + (W - a) / 2, yc) }, { name: 'back-face', at: pt(f + W, yc) }],
    };
  });

export const lPanel = template('l-panel',
  'L-shaped panel held along the foot of its leg, pushed up at the end of its arm; crack from the re-entrant corner',
  [
    length('size', 500, 'overall width and height of the panel'),
    length('cut', 250, 'side of the square cut out of the lower right corner'),
    length('thickness', 100, 'panel thickness, out of plane'),
    length('load-offset', 30, 'distance of the load point from the end of the arm'),
    length('bearing-width', 10, 'bearing strip under the load point', 0),
    ...tail('concrete-normal', 'L-shaped panel, demo mix'),
  ],
  (tpl, v) => {
    const S = num(v, 'size'), cut = num(v, 'cut'), off = num(v, 'load-offset'), bw = num(v, 'bearing-width');
    need(tpl, 'cut', cut, S / 5, 0.8 * S, 'mm', `for a size of ${fmt(S)} mm`);
    need(tpl, 'bearing-width', bw, 0, cut / 4, 'mm', `for a cut of ${fmt(cut)} mm`);
    need(tpl, 'load-offset', off, bw / 2, cut / 2, 'mm', `for a cut of ${fmt(cut)} mm and a bearing-width of ${fmt(bw)} mm`);
    const mat = materialOf(v);
    const mesh = meshFor(tpl, v, S / 25, S / 100, mat, S / 4, `for a size of ${fmt(S)} mm`);
    const leg = q(S - cut), corner = pt(leg, cut), load = pt(S - off, cut);
    const elastic = (nominalStrength(mat, S - cut) * S) / mat.preset.E;
    return {
      about: ['L-shaped panel: the foot of the leg is held, the arm is pushed up near its end and a',
        'crack grows from the re-entrant corner.'],
      template: tpl, options: optionLine(v),
      title: str(v, 'title'),
      model: 'plane-stress', modelNote: 'load in the plane of the panel',
      thickness: num(v, 'thickness'),
      geometryNote: [`Square ${fmt(S)} x ${fmt(S)} mm with a ${fmt(cut)} x ${fmt(cut)} mm square cut out of its lower right corner.`],
      outline: [pt(0, 0), pt(leg, 0), corner, pt(S, cut), pt(S, S), pt(0, S)],
      material: mat,
      supportsNote: ['The foot of the leg is held along its whole width.'],
      supports: [{ along: [pt(0, 0), pt(leg, 0)], fix: 'xy', width: 0, note: 'foot of the leg' }],
      loadsNote: [`The machine pushes the underside of the arm up, ${fmt(off)} mm from its end.`],
      loads: [{ at: load, direction: [0, 1], width: bw, note: 'underside of the arm' }],
      controlNote: ['Load-point displacement control (no notch, so no gauge to steer by).'],
      control: { by: 'displacement', target: travelTarget(mat, elastic), targetNote: 'mm of load-point travel at the end of the run', increments: 100 },
      crackNote: ['A crack starts at the re-entrant corner, where the stress is highest.'],
      crackStart: [corner], crackStartNote: 'the re-entrant corner',
      mesh, meshNote: meshNote(mesh, 'the corner and the crack tip'),
      probesNote: PROBES_NOTE,
      probes: [{ name: 'load-point', at: load }, { name: 'corner', at: corner }],
    };
  });

export const denTension = template('den-tension',
  'double-edge-notched panel pulled in tension through its top edge, bottom edge held',
  [
    length('width', 200, 'panel width'),
    length('height', 200, 'panel height'),
    length('thickness', 50, 'panel thickness, out of plane'),
    length('notch-depth', 25, 'depth of each edge notch'),
    length('notch-width', 0, 'width of the notches (0: sharp slits)', 0),
    ...tail('concrete-normal', 'Double-edge-notched tension panel, demo mix'),
  ],
  (tpl, v) => {
    const W = num(v, 'width'), H = num(v, 'height'), a = num(v, 'notch-depth'), nw = num(v, 'notch-width');
    need(tpl, 'height', H, W / 4, 4 * W, 'mm', `for a width of ${fmt(W)} mm`);
    need(tpl, 'notch-depth', a, W / 100, 0.4 * W, 'mm', `for a width of ${fmt(W)} mm`);
    need(tpl, 'notch-width', nw, 0, H / 10, 'mm', `for a height of ${fmt(H)} mm`);
    const mat = materialOf(v);
    // sharp slits and tip cells of W/50 by default: blunt 5 mm notches with 2 mm cells stopped unconverged just past the peak
    const mesh = meshFor(tpl, v, Math.min(W, H) / 20, Math.min(W, H) / 50, mat, Math.min(W, H) / 4, `for a ${fmt(W)} x ${fmt(H)} mm panel`);
    const yc = q(H / 2), gh = nw > 0 ? nw / 2 : Math.max(mesh.tipSize, H / 100);
    return {
      about: ['Double-edge-notched panel in tension: the bottom edge is held, the top edge is pulled',
        'up as a whole; two cracks grow towards each other from the notch tips.'],
      template: tpl, options: optionLine(v),
      title: str(v, 'title'),
      model: 'plane-stress', modelNote: 'load in the plane of the panel',
      thickness: num(v, 'thickness'),
      geometryNote: [`Panel ${fmt(W)} x ${fmt(H)} mm with a ${fmt(a)} mm deep notch in each side at mid-height.`],
      outline: [pt(0, 0), pt(W, 0), pt(W, H), pt(0, H)],
      notches: [
        { from: pt(0, yc), to: pt(a, yc), width: nw, note: 'left notch' },
        { from: pt(W, yc), to: pt(W - a, yc), width: nw, note: 'right notch' },
      ],
      material: mat,
      supportsNote: ['The bottom edge is glued to a fixed platen.'],
      supports: [{ along: [pt(0, 0), pt(W, 0)], fix: 'xy', width: 0, note: 'bottom edge' }],
      loadsNote: ['The top edge is pulled upwards as a whole (free to move sideways).'],
      loads: [{ along: [pt(0, H), pt(W, H)], direction: [0, 1], width: 0, note: 'top edge' }],
      controlNote: ['Opening control across the left notch mouth keeps the test stable past the peak.'],
      control: { by: 'cmod', gauge: { from: pt(0, yc - gh), to: pt(0, yc + gh), note: 'across the left notch mouth' }, target: mouthTarget(mat, W, a), targetNote: 'mm of mouth opening at the end of the run', increments: 100 },
      crackNote: ['A crack grows from each notch tip where the averaged principal stress reaches ft.'],
      crackStart: 'notch-tips', crackStartNote: 'both notch tips',
      mesh, meshNote: meshNote(mesh, 'the notch tips and the crack tips'),
      probesNote: PROBES_NOTE,
      probes: [{ name: 'centre', at: pt(W / 2, yc) }, { name: 'top-middle', at: pt(W / 2, H) }],
    };
  });

/** A round disc as a polygon of n points, one at the bottom and one at the top. */
export function discPolygon(D: number, n: number): Vec2[] {
  const R = D / 2, out: Vec2[] = [];
  for (let j = 0; j < n; j++) {
    const t = -Math.PI / 2 + (2 * Math.PI * j) / n;
    out.push(pt(R + R * Math.cos(t), R + R * Math.sin(t)));
  }
  return out;
}

export const discSplitting = template('disc-splitting',
  'disc split in diametral compression between two bearing strips; no notch, the crack starts anywhere',
  [
    length('diameter', 150, 'disc diameter'),
    length('thickness', 50, 'disc thickness, out of plane'),
    length('strip-width', 15, 'width of the bearing strips top and bottom'),
    ...tail('concrete-normal', 'Disc splitting test, demo mix'),
  ],
  (tpl, v) => {
    const D = num(v, 'diameter'), b = num(v, 'strip-width');
    need(tpl, 'strip-width', b, D / 50, D / 4, 'mm', `for a diameter of ${fmt(D)} mm`);
    const mat = materialOf(v);
    const mesh = meshFor(tpl, v, D / 20, D / 100, mat, D / 4, `for a diameter of ${fmt(D)} mm`);
    // test rigs: the strips lie on the arc itself, as on a real disc
    const outline = discPolygon(D, 128), R = q(D / 2), top = q(D), bottom = 0;
    return {
      about: ['Splitting test of a disc: two bearing strips press it along a diameter and a crack',
        'opens along that diameter.'],
      template: tpl, options: optionLine(v),
      title: str(v, 'title'),
      model: 'plane-stress', modelNote: 'a slice of the disc',
      thickness: num(v, 'thickness'),
      geometryNote: [`Disc of ${fmt(D)} mm as a polygon of ${outline.length} points; the bearing strips lie on its arc.`],
      outline,
      material: mat,
      supportsNote: [`Bearing strips ${fmt(b)} mm wide, measured along the arc, are rigid rockers: the lower one`,
        'is held and may tilt about its centre; the disc is held sideways at the middle of each strip only,',
        'so the two halves move apart as the split opens.'],
      supports: [
        { at: pt(R, bottom), fix: 'y', width: b, note: 'lower bearing strip' },
        { at: pt(R, bottom), fix: 'x', width: 0, note: 'sideways, middle of the lower strip' },
        { at: pt(R, top), fix: 'x', width: 0, note: 'sideways, middle of the upper strip' },
      ],
      loadsNote: [`The machine presses the upper bearing strip, ${fmt(b)} mm wide along the arc, down.`],
      loads: [{ at: pt(R, top), direction: [0, -1], width: b, note: 'upper bearing strip' }],
      controlNote: ['Control by the lateral opening of the disc across its horizontal diameter,', 'which keeps growing past the peak load while the load drops. Once split, further',
        'cracks start beside the strips and the load falls; the run ends at three times the',
        'critical opening of the softening law, or where the load has fallen to 5 % of its peak.'],
      control: { by: 'cmod', gauge: { from: pt(0, R), to: pt(D, R), note: 'ends of the horizontal diameter' }, target: sig2(3 * criticalOpening(mat)), targetNote: 'mm of lateral opening at the end of the run', increments: 240 },
      crackNote: ['No notch: a crack starts wherever the averaged principal stress first reaches ft.'],
      crackStart: 'anywhere', crackStartNote: 'the most stressed point',
      mesh, meshNote: meshNote(mesh, 'crack tips'),
      probesNote: PROBES_NOTE,
      probes: [{ name: 'centre', at: pt(R, R) }],
    };
  });
