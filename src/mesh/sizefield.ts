// Target cell size h(x, y): tipSize near tips, finer near named points, growing linearly to size.

import type { MeshSettings, Vec2 } from '../case/model.js';
import { PointGrid } from './pointgrid.js';

/** Growth of h per unit distance; neighbouring cells then differ by about 1.3×. */
export const GRADING = 0.3;

/** Size field for the given tips (fine within refineRadius) and extra points/segments (moderately fine). */
export function makeSizeField(s: MeshSettings, tips: Vec2[], extra: Vec2[] = [], segments: [Vec2, Vec2][] = []): (x: number, y: number) => number {
  const H = s.size, h0 = Math.min(s.tipSize, H), R = s.refineRadius;
  const hp = Math.min(H, Math.max(h0, 2 * h0));
  const tx = Float64Array.from(tips.map(p => p[0])), ty = Float64Array.from(tips.map(p => p[1]));
  const px = Float64Array.from(extra.map(p => p[0])), py = Float64Array.from(extra.map(p => p[1]));
  const sg = Float64Array.from(segments.flatMap(([a, b]) => [a[0], a[1], b[0], b[1]]));
  const nt = tx.length, np = px.length, ns = sg.length >> 2;
  // many named points: the nearest one from a grid (the same value as the scan: hp + G·d grows with d)
  const near = np > 16 ? new PointGrid(px, py) : null;
  return (x: number, y: number): number => {
    let h = H;
    for (let i = 0; i < nt; i++) {
      const d = Math.sqrt((x - tx[i]) ** 2 + (y - ty[i]) ** 2);
      const v = d <= R ? h0 : h0 + GRADING * (d - R);
      if (v < h) h = v;
    }
    if (near) {
      const v = hp + GRADING * near.nearest(x, y, (i) => Math.sqrt((x - px[i]) ** 2 + (y - py[i]) ** 2));
      if (v < h) h = v;
    } else {
      for (let i = 0; i < np; i++) {
        const v = hp + GRADING * Math.sqrt((x - px[i]) ** 2 + (y - py[i]) ** 2);
        if (v < h) h = v;
      }
    }
    for (let i = 0; i < ns; i++) {
      const ax = sg[4 * i], ay = sg[4 * i + 1], dx = sg[4 * i + 2] - ax, dy = sg[4 * i + 3] - ay;
      const l2 = dx * dx + dy * dy;
      let t = l2 > 0 ? ((x - ax) * dx + (y - ay) * dy) / l2 : 0;
      t = t < 0 ? 0 : t > 1 ? 1 : t;
      const v = hp + GRADING * Math.hypot(ax + t * dx - x, ay + t * dy - y);
      if (v < h) h = v;
    }
    return h;
  };
}

/** Smallest value the field can take. */
export function sizeFieldMin(s: MeshSettings, tips: Vec2[], extra: Vec2[] = [], segments: [Vec2, Vec2][] = []): number {
  const h0 = Math.min(s.tipSize, s.size), hp = Math.min(s.size, 2 * h0);
  return tips.length ? h0 : extra.length || segments.length ? hp : s.size;
}
