// Crack paths for other tools: a CSV table of points, and a DXF drawing (R12 ASCII, millimetres)
// with the specimen outline, holes, notches and cracks as polylines on layers of their own.

import type { CaseModel, Vec2 } from '../case/model.js';
import { formatNumber } from './files.js';

export const CRACKS_HEADER = 'crack,point,x_mm,y_mm';

/** One row per point of every crack path, from its start to its tip. */
export function cracksCsv(paths: [number, number][][]): string {
  let out = CRACKS_HEADER + '\n';
  paths.forEach((p, i) => p.forEach(([x, y], k) => { out += `${i + 1},${k},${formatNumber(x)},${formatNumber(y)}\n`; }));
  return out;
}

/** A circle as a closed polygon of n points (DXF polylines of R12 hold straight segments here). */
function circlePoints(c: Vec2, r: number, n = 72): Vec2[] {
  return Array.from({ length: n }, (_, k) => [c[0] + r * Math.cos((2 * Math.PI * k) / n), c[1] + r * Math.sin((2 * Math.PI * k) / n)] as Vec2);
}

/** DXF group: the code, then the value, each on its own line. */
const g = (code: number, value: string | number): string => `${code}\n${typeof value === 'number' ? dxfNumber(value) : value}\n`;
const dxfNumber = (x: number): string => (Number.isInteger(x) ? x.toFixed(1) : formatNumber(x));

function polyline(layer: string, pts: Vec2[], closed: boolean): string {
  // POLYLINE with "vertices follow" (66), a dummy point, the closed flag (70), then VERTEX … SEQEND
  let s = g(0, 'POLYLINE') + g(8, layer) + g(66, 1) + g(10, 0) + g(20, 0) + g(30, 0) + g(70, closed ? 1 : 0);
  for (const [x, y] of pts) s += g(0, 'VERTEX') + g(8, layer) + g(10, x) + g(20, y) + g(30, 0);
  return s + g(0, 'SEQEND') + g(8, layer);
}

/** Layers: OUTLINE, HOLES, NOTCHES, CRACKS; drawing units millimetres, the case's own axes. */
export function cracksDxf(c: CaseModel, paths: [number, number][][]): string {
  const layers: [string, number][] = [['OUTLINE', 7], ['HOLES', 7], ['NOTCHES', 8], ['CRACKS', 1]];
  let s = g(999, `rupta crack paths: ${c.title.replace(/[\r\n]+/g, ' ')}; units mm`);
  s += g(0, 'SECTION') + g(2, 'HEADER') + g(9, '$ACADVER') + g(1, 'AC1009') + g(0, 'ENDSEC');
  s += g(0, 'SECTION') + g(2, 'TABLES');
  s += g(0, 'TABLE') + g(2, 'LTYPE') + g(70, 1);
  s += g(0, 'LTYPE') + g(2, 'CONTINUOUS') + g(70, 0) + g(3, 'Solid line') + g(72, 65) + g(73, 0) + g(40, 0);
  s += g(0, 'ENDTAB');
  s += g(0, 'TABLE') + g(2, 'LAYER') + g(70, layers.length);
  for (const [name, colour] of layers) s += g(0, 'LAYER') + g(2, name) + g(70, 0) + g(62, colour) + g(6, 'CONTINUOUS');
  s += g(0, 'ENDTAB') + g(0, 'ENDSEC');
  s += g(0, 'SECTION') + g(2, 'ENTITIES');
  s += polyline('OUTLINE', c.geometry.outline, true);
  for (const h of c.geometry.holes) s += polyline('HOLES', h.kind === 'circle' ? circlePoints(h.center, h.radius) : h.points, true);
  for (const n of c.geometry.notches) {
    if (n.width > 0) {
      // a notch of width w as the rectangle around its centre line
      const L = Math.hypot(n.to[0] - n.from[0], n.to[1] - n.from[1]) || 1, hx = (-(n.to[1] - n.from[1]) / L) * n.width / 2, hy = ((n.to[0] - n.from[0]) / L) * n.width / 2;
      s += polyline('NOTCHES', [[n.from[0] - hx, n.from[1] - hy], [n.to[0] - hx, n.to[1] - hy], [n.to[0] + hx, n.to[1] + hy], [n.from[0] + hx, n.from[1] + hy]], true);
    } else s += polyline('NOTCHES', [n.from, n.to], false);
  }
  for (const p of paths) if (p.length >= 2) s += polyline('CRACKS', p, false);
  return s + g(0, 'ENDSEC') + g(0, 'EOF');
}
