// Stress intensity factors of order-2 runs: the same interaction integral as sif.ts
// (Yau, Wang & Corten 1980; Moran & Shih 1987), but the computed stress and displacement
// gradient are those of each cell's projection Πu (linear strains, rotation included) taken
// at every quadrature point, not cell constants. q and ∇q are as in sif.ts (vertex values,
// cell average ∮ q n / |E|); the cell is integrated on the fan of triangles from its centroid,
// three points each, θ on the centroid's branch.
import type { CaseModel } from '../case/model.js';
import type { PolyMesh } from '../mesh/polymesh.js';
import { gradientAt2 } from '../vem/element2.js';
import { FIELD } from '../vem/system2.js';
import type { WorkMesh } from './workmesh.js';
import { effectiveModulus, kolosov, ringWeight, williams, fanPoints, tipAngle, SifWork, type Elastic, type TipFactors, type TipFrame, type TipResult } from './sif.js';
import { measureTips, type CrackLine, type TipMeasure } from './tips.js';

/** K_I, K_II and J over the ring r1 < r < r2 of the base mesh m, with the projected field of each cell (FIELD stride). */
export function interactionIntegral2(m: PolyMesh, field: Float64Array, el: Elastic, tip: TipFrame, r1: number, r2: number, work = new SifWork()): TipFactors {
  const { xy, cellStart, cellVerts } = m, D = el.D;
  const mu = el.E / (2 * (1 + el.nu)), kappa = kolosov(el.nu, el.model), Ep = effectiveModulus(el.E, el.nu, el.model);
  const e1x = tip.dx, e1y = tip.dy, reach2 = r2 * r2, w = work.w, H = [0, 0, 0, 0];
  let II = 0, III = 0, JJ = 0;
  for (let c = 0; c + 1 < cellStart.length; c++) {
    const s = cellStart[c], e = cellStart[c + 1], n = e - s;
    let inside = false;
    for (let k = s; k < e && !inside; k++) {
      const v = cellVerts[k];
      inside = (xy[2 * v] - tip.x) ** 2 + (xy[2 * v + 1] - tip.y) ** 2 < reach2;
    }
    if (!inside) continue;
    // ∇q: cell average ∮ q n / |E| of q linear along each edge
    let gqx = 0, gqy = 0, a2 = 0, qmin = Infinity, qmax = -Infinity;
    for (let a = 0; a < n; a++) {
      const i = cellVerts[s + a], j = cellVerts[s + (a + 1) % n];
      const qi = ringWeight(Math.hypot(xy[2 * i] - tip.x, xy[2 * i + 1] - tip.y), r1, r2);
      const qj = ringWeight(Math.hypot(xy[2 * j] - tip.x, xy[2 * j + 1] - tip.y), r1, r2);
      qmin = Math.min(qmin, qi); qmax = Math.max(qmax, qi);
      gqx += 0.5 * (qi + qj) * (xy[2 * j + 1] - xy[2 * i + 1]); gqy -= 0.5 * (qi + qj) * (xy[2 * j] - xy[2 * i]);
      a2 += xy[2 * i] * xy[2 * j + 1] - xy[2 * j] * xy[2 * i + 1];
    }
    if (qmax - qmin <= 0) continue;
    gqx /= a2 / 2; gqy /= a2 / 2;
    const q1 = e1x * gqx + e1y * gqy, q2 = -e1y * gqx + e1x * gqy;
    const o = FIELD * c, cx = field[o], cy = field[o + 1], h = field[o + 2];
    work.fit(n);
    const np = fanPoints(xy, cellVerts, s, e, cx, cy, tip, tipAngle(tip, cx, cy), work), fan = work.fan;
    for (let p = 0; p < 5 * np; p += 5) {
      const x = fan[p], y = fan[p + 1], wt = fan[p + 2];
      // computed field at the point, in the tip frame
      gradientAt2(field, o + 3, h, (x - cx) / h, (y - cy) / h, H);
      const exx = H[0], eyy = H[3], gxy = H[1] + H[2];
      const sxx = D[0] * exx + D[1] * eyy + D[2] * gxy, syy = D[3] * exx + D[4] * eyy + D[5] * gxy, sxy = D[6] * exx + D[7] * eyy + D[8] * gxy;
      const s11 = e1x * e1x * sxx + 2 * e1x * e1y * sxy + e1y * e1y * syy;
      const s22 = e1y * e1y * sxx - 2 * e1x * e1y * sxy + e1x * e1x * syy;
      const s12 = -e1x * e1y * sxx + (e1x * e1x - e1y * e1y) * sxy + e1x * e1y * syy;
      const t11 = H[0] * e1x + H[1] * e1y, t21 = H[2] * e1x + H[3] * e1y;
      const t12 = -H[0] * e1y + H[1] * e1x, t22 = -H[2] * e1y + H[3] * e1x;
      const u11 = e1x * t11 + e1y * t21, u21 = -e1y * t11 + e1x * t21;
      const u12 = e1x * t12 + e1y * t22, u22 = -e1y * t12 + e1x * t22;
      const ep12 = 0.5 * (u12 + u21);
      // auxiliary field at the point
      williams(fan[p + 3], fan[p + 4], mu, kappa, w);
      const f1 = s11 * q1 + s12 * q2, f2 = s12 * q1 + s22 * q2;
      for (let mode = 0; mode < 2; mode++) {
        const k = 5 * mode, a11 = w[k], a22 = w[k + 1], a12 = w[k + 2];
        const val = f1 * w[k + 3] + f2 * w[k + 4] + (a11 * q1 + a12 * q2) * u11 + (a12 * q1 + a22 * q2) * u21
          - (a11 * u11 + a22 * u22 + 2 * a12 * ep12) * q1;
        if (mode === 0) II += wt * val; else III += wt * val;
      }
      const W = 0.5 * (s11 * u11 + s22 * u22 + 2 * s12 * ep12);
      JJ += wt * (f1 * u11 + f2 * u21 - W * q1);
    }
  }
  return { KI: 0.5 * Ep * II, KII: 0.5 * Ep * III, J: JJ };
}

/** The two rings of sif.ts's tipFactors, (¼R, ½R) and (½R, R), on the projected field. */
export function tipFactors2(m: PolyMesh, field: Float64Array, el: Elastic, tip: TipFrame, R: number, work = new SifWork()): TipResult {
  const a = interactionIntegral2(m, field, el, tip, 0.25 * R, 0.5 * R, work);
  const b = interactionIntegral2(m, field, el, tip, 0.5 * R, R, work);
  const mag = Math.hypot(b.KI, b.KII);
  const spread = mag > 0 ? Math.max(Math.abs(a.KI - b.KI), Math.abs(a.KII - b.KII)) / mag : 0;
  return { KI: b.KI, KII: b.KII, J: b.J, rings: [a, b], spread };
}

/** K at every slit tip of an order-2 state: tips.ts's domains on the base mesh, the field of its cells. */
export function measureTips2(
  wm: WorkMesh, cracks: CrackLine[], cp: { mesh: PolyMesh; vertexOf: Int32Array; compactOf: Int32Array },
  field: Float64Array, el: Elastic, c: CaseModel,
): TipMeasure[] {
  return measureTips(wm, cracks, cp, new Float64Array(0), el, c, () => true, undefined, (tip, R, work) => tipFactors2(cp.mesh, field, el, tip, R, work));
}
