// Error norms against a known field, for orders 1 and 2, by quadrature over each polygon.
import type { PolyMesh } from '../mesh/polymesh.js';
import { strainVectors } from './element.js';
import { displacementAt2, strainAtPoint2 } from './system2.js';

export type Field = (x: number, y: number) => [number, number];
export type StrainField = (x: number, y: number) => [number, number, number];

// 3-point Gauss–Legendre on [0, 1] (exact to degree 5)
const GX = [0.5 - 0.5 * Math.sqrt(0.6), 0.5, 0.5 + 0.5 * Math.sqrt(0.6)], GW = [5 / 18, 8 / 18, 5 / 18];

/**
 * Quadrature over polygon cellVerts[s..e): a signed fan of triangles from the first vertex,
 * each mapped from the unit square (collapsed coordinates) with 3 × 3 Gauss points; exact for
 * polynomials of degree 4, non-convex cells included.
 */
export function polygonQuadrature(xy: Float64Array, cellVerts: Int32Array, s: number, e: number, f: (x: number, y: number, w: number) => void): void {
  const p0 = cellVerts[s], x0 = xy[2 * p0], y0 = xy[2 * p0 + 1];
  for (let k = s + 1; k + 1 < e; k++) {
    const p1 = cellVerts[k], p2 = cellVerts[k + 1];
    const ax = xy[2 * p1] - x0, ay = xy[2 * p1 + 1] - y0, bx = xy[2 * p2] - x0, by = xy[2 * p2 + 1] - y0;
    const j2 = ax * by - ay * bx; // twice the signed area
    for (let i = 0; i < 3; i++) for (let l = 0; l < 3; l++) {
      const u = GX[i], v = GX[l];
      f(x0 + u * ((1 - v) * ax + v * bx), y0 + u * ((1 - v) * ay + v * by), j2 * u * GW[i] * GW[l]);
    }
  }
}

export interface ErrorNorms {
  /** Relative L² error of the displacement, ‖u − Πu_h‖ / ‖u‖. */
  l2: number;
  /** Relative energy error, ‖ε − ε_h‖_C / ‖ε‖_C. */
  energy: number;
}

const energyDensity = (C: Float64Array, a: number, b: number, c: number) =>
  a * (C[0] * a + C[1] * b + C[2] * c) + b * (C[3] * a + C[4] * b + C[5] * c) + c * (C[6] * a + C[7] * b + C[8] * c);

/** Norms of an order-2 solution (field from solveOrder2): Πu and its strain, cell by cell. */
export function errorNorms2(m: PolyMesh, field: Float64Array, C: Float64Array, u: Field, strain: StrainField): ErrorNorms {
  const nc = m.cellStart.length - 1, uh = [0, 0], sh = [0, 0, 0];
  let e2 = 0, n2 = 0, ee = 0, en = 0;
  for (let c = 0; c < nc; c++) {
    polygonQuadrature(m.xy, m.cellVerts, m.cellStart[c], m.cellStart[c + 1], (x, y, w) => {
      const ex = u(x, y), es = strain(x, y);
      displacementAt2(field, c, x, y, uh);
      strainAtPoint2(field, c, x, y, sh);
      const a = sh[0] - es[0], b = sh[1] - es[1], g = sh[2] - es[2];
      e2 += w * ((uh[0] - ex[0]) ** 2 + (uh[1] - ex[1]) ** 2); n2 += w * (ex[0] ** 2 + ex[1] ** 2);
      ee += w * energyDensity(C, a, b, g); en += w * energyDensity(C, es[0], es[1], es[2]);
    });
  }
  return { l2: Math.sqrt(e2 / n2), energy: Math.sqrt(ee / en) };
}

/**
 * Norms of an order-1 solution (vertex displacements u): its projection onto linear fields,
 * ū + ∇̄u (x − x̄), with ū the vertex mean and ∇̄u = (1/|E|)∮ u ⊗ n the mean gradient.
 */
export function errorNorms1(m: PolyMesh, uv: Float64Array, C: Float64Array, u: Field, strain: StrainField): ErrorNorms {
  const nc = m.cellStart.length - 1;
  let maxn = 3;
  for (let c = 0; c < nc; c++) maxn = Math.max(maxn, m.cellStart[c + 1] - m.cellStart[c]);
  const q = new Float64Array(2 * maxn);
  let e2 = 0, n2 = 0, ee = 0, en = 0;
  for (let c = 0; c < nc; c++) {
    const s = m.cellStart[c], e = m.cellStart[c + 1], n = e - s;
    strainVectors(m.xy, m.cellVerts, s, e, q);
    let mx = 0, my = 0, ux = 0, uy = 0, gxx = 0, gxy = 0, gyx = 0, gyy = 0;
    for (let k = 0; k < n; k++) {
      const v = m.cellVerts[s + k], ax = uv[2 * v], ay = uv[2 * v + 1];
      mx += m.xy[2 * v] / n; my += m.xy[2 * v + 1] / n; ux += ax / n; uy += ay / n;
      gxx += q[2 * k] * ax; gxy += q[2 * k + 1] * ax; gyx += q[2 * k] * ay; gyy += q[2 * k + 1] * ay;
    }
    polygonQuadrature(m.xy, m.cellVerts, s, e, (x, y, w) => {
      const ex = u(x, y), es = strain(x, y);
      const hx = ux + gxx * (x - mx) + gxy * (y - my), hy = uy + gyx * (x - mx) + gyy * (y - my);
      e2 += w * ((hx - ex[0]) ** 2 + (hy - ex[1]) ** 2); n2 += w * (ex[0] ** 2 + ex[1] ** 2);
      ee += w * energyDensity(C, gxx - es[0], gyy - es[1], gxy + gyx - es[2]); en += w * energyDensity(C, es[0], es[1], es[2]);
    });
  }
  return { l2: Math.sqrt(e2 / n2), energy: Math.sqrt(ee / en) };
}
