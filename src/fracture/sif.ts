// Stress intensity factors at a crack tip by the interaction integral: the domain form of the
// J-integral for the sum of the computed field and an auxiliary near-tip field of Williams'
// leading term (Yau, Wang & Corten 1980; Moran & Shih 1987),
//   I = ∫_A (σ_ij u^a_i,1 + σ^a_ij u_i,1 − σ_ij ε^a_ij δ_1j) q_,j dA = 2 (K_I K^a_I + K_II K^a_II) / E′,
// in the crack-tip frame (x1 along the crack, x2 to its left). q is 1 at the tip and 0 outside
// the ring, given by its vertex values; per cell the computed stress and displacement gradient
// are the order-1 VEM constants and ∇q is the cell average ∮ q n / |E|, so only the auxiliary
// fields vary inside a cell: they are integrated on a fan of triangles from the cell centroid.
// Without face data the crack faces inside the domain are taken traction-free and straight
// along x1, so their term vanishes. With it (FaceData), the line integral over the faces in the
// domain is added: by the divergence theorem over the domain less the faces,
//   I = ∫_A P_1j q,j dA − ∫_faces P_1j m_j q ds,  P_1j m_j = t_i u^a_i,1 + σ^a_ij m_j u_i,1 − σ_ij ε^a_ij m_1,
// m the outward normal of the material on the face and t = σ m its traction (cohesive or
// pressure; zero on free faces). On straight faces behind the tip σ^a m = 0 and m_1 = 0, so
// only the traction term is left; past a kink the other two count as well (Moran & Shih 1987).
import type { PolyMesh } from '../mesh/polymesh.js';
import type { PlaneModel } from '../vem/material.js';
import { strainVectors } from '../vem/element.js';

export interface TipFrame { x: number; y: number; dx: number; dy: number }

/** K in MPa√mm (mesh in mm, stress in MPa); J in N/mm. */
export interface TipFactors { KI: number; KII: number; J: number }

export interface Elastic { E: number; nu: number; model: PlaneModel; D: Float64Array }

/**
 * The crack faces of the mesh for the face term: onFace[v] = 1 for a vertex of a crack face
 * (an edge of a cell with no neighbour across, both ends on faces, is a face edge). traction:
 * 2 per vertex, the traction on the material there in the face's own frame, normal
 * t·m (tension positive: a cohesive pull; a pressure p is −p) and tangential t·(−m_y, m_x),
 * m the outward normal of the material; both faces of a pair and the tip vertex share these
 * values. Linear along each edge; null for traction-free faces.
 */
export interface FaceData { onFace: Uint8Array; traction: Float64Array | null }

/** E′ of J = (K_I² + K_II²)/E′: E in plane stress, E/(1 − ν²) in plane strain. */
export function effectiveModulus(E: number, nu: number, model: PlaneModel): number {
  return model === 'plane-strain' ? E / (1 - nu * nu) : E;
}

/** Kolosov's constant κ: 3 − 4ν (plane strain), (3 − ν)/(1 + ν) (plane stress). */
export function kolosov(nu: number, model: PlaneModel): number {
  return model === 'plane-strain' ? 3 - 4 * nu : (3 - nu) / (1 + nu);
}

/**
 * Williams' leading term for unit K at local polar (r, θ), into out:
 * [σ11, σ22, σ12, u1,1, u2,1] of mode I, then the same five of mode II (local frame).
 * Displacements u = K/(2μ) √(r/2π) f(θ); their x1-derivative is K/(2μ√(2πr)) (½ cos θ f − sin θ f′).
 */
export function williams(r: number, th: number, mu: number, kappa: number, out: Float64Array): void {
  const sr = 1 / Math.sqrt(2 * Math.PI * r);
  const c = Math.cos(th / 2), s = Math.sin(th / 2), c3 = Math.cos(1.5 * th), s3 = Math.sin(1.5 * th);
  const ct = Math.cos(th), st = Math.sin(th);
  const g = sr / (2 * mu);
  // mode I
  out[0] = sr * c * (1 - s * s3);
  out[1] = sr * c * (1 + s * s3);
  out[2] = sr * s * c * c3;
  let f = c * (kappa - 1 + 2 * s * s), fp = -0.5 * s * (kappa - 1 + 2 * s * s) + c * st;
  out[3] = g * (0.5 * ct * f - st * fp);
  f = s * (kappa + 1 - 2 * c * c); fp = 0.5 * c * (kappa + 1 - 2 * c * c) + s * st;
  out[4] = g * (0.5 * ct * f - st * fp);
  // mode II
  out[5] = -sr * s * (2 + c * c3);
  out[6] = sr * s * c * c3;
  out[7] = sr * c * (1 - s * s3);
  f = s * (kappa + 1 + 2 * c * c); fp = 0.5 * c * (kappa + 1 + 2 * c * c) - s * st;
  out[8] = g * (0.5 * ct * f - st * fp);
  f = -c * (kappa - 1 - 2 * s * s); fp = 0.5 * s * (kappa - 1 - 2 * s * s) + c * st;
  out[9] = g * (0.5 * ct * f - st * fp);
}

/** Interior 3-point rule on a triangle (degree 2): barycentric weights of the points, area weight 1/3 each. */
const GP = [[2 / 3, 1 / 6, 1 / 6], [1 / 6, 2 / 3, 1 / 6], [1 / 6, 1 / 6, 2 / 3]];

/** Scratch for one evaluation, sized for the largest cell. */
export class SifWork {
  q: Float64Array; qv: Float64Array;
  /** The fan's quadrature points of one cell (fanPoints): x, y, weight, r, θ each. */
  fan: Float64Array;
  readonly w = new Float64Array(10);
  readonly acc = new Float64Array(10);
  constructor(maxVerts = 16) { this.q = new Float64Array(2 * maxVerts); this.qv = new Float64Array(maxVerts); this.fan = new Float64Array(15 * maxVerts); }
  fit(n: number): void { if (this.qv.length < n) { this.q = new Float64Array(2 * n); this.qv = new Float64Array(n); this.fan = new Float64Array(15 * n); } }
  private edgesOf: PolyMesh | null = null;
  private edges = new Set<number>();
  /** The directed edge i → j of a cell has no cell on its other side (no cell holds j → i). */
  isOpenEdge(m: PolyMesh, i: number, j: number): boolean {
    const nv = m.xy.length >> 1;
    if (this.edgesOf !== m) {
      this.edges.clear();
      const { cellStart, cellVerts } = m;
      for (let c = 0; c + 1 < cellStart.length; c++) {
        const s = cellStart[c], e = cellStart[c + 1];
        for (let k = s; k < e; k++) this.edges.add(cellVerts[k] * nv + cellVerts[k + 1 < e ? k + 1 : s]);
      }
      this.edgesOf = m;
    }
    return !this.edges.has(j * nv + i);
  }
}

/** θ of (x, y) about the tip, in the tip frame (rad, from the crack direction). */
export function tipAngle(tip: TipFrame, x: number, y: number): number {
  return Math.atan2(-tip.dy * (x - tip.x) + tip.dx * (y - tip.y), tip.dx * (x - tip.x) + tip.dy * (y - tip.y));
}

/**
 * Quadrature of cell cellVerts[s..e) on the fan of triangles from (cx, cy), 3 interior points
 * each: per point x, y, weight, and r, θ about the tip with θ on the branch of thc (θ of the
 * centroid, so a cell just behind the tip is not split by the cut at ±π), into work.fan (fit to
 * the cell first). Returns the number of points.
 */
export function fanPoints(xy: Float64Array, cellVerts: Int32Array, s: number, e: number, cx: number, cy: number, tip: TipFrame, thc: number, work: SifWork): number {
  const n = e - s, e1x = tip.dx, e1y = tip.dy, out = work.fan;
  let np = 0;
  for (let a = 0; a < n; a++) {
    const i = cellVerts[s + a], j = cellVerts[s + (a + 1) % n];
    const xi = xy[2 * i], yi = xy[2 * i + 1], xj = xy[2 * j], yj = xy[2 * j + 1];
    const triA = 0.5 * ((xi - cx) * (yj - cy) - (xj - cx) * (yi - cy));
    if (triA === 0) continue;
    for (const g of GP) {
      const x = g[0] * cx + g[1] * xi + g[2] * xj, y = g[0] * cy + g[1] * yi + g[2] * yj;
      const px = x - tip.x, py = y - tip.y, lx = e1x * px + e1y * py, ly = -e1y * px + e1x * py;
      const th = Math.atan2(ly, lx), o = 5 * np++;
      out[o] = x; out[o + 1] = y; out[o + 2] = triA / 3;
      out[o + 3] = Math.hypot(lx, ly); out[o + 4] = thc + Math.atan2(Math.sin(th - thc), Math.cos(th - thc));
    }
  }
  return np;
}

/** 4-point Gauss rule on [0, 1]: points and weights. */
const G4X = [0.0694318442029737, 0.3300094782075719, 0.6699905217924281, 0.9305681557970263];
const G4W = [0.1739274225687269, 0.3260725774312731, 0.3260725774312731, 0.1739274225687269];

/**
 * ∫ P_1j m_j q ds over the face edge i → j of a cell (outward normal m), for unit auxiliary
 * K_I and K_II, into acc[0], acc[1]. u11, u21 (u_1,1, u_2,1) and ε11, ε22, ε12: the cell's
 * constants in the tip frame; thc: θ of the cell centroid (the branch for θ = ±π).
 * An edge that ends at the tip is integrated in ξ with s = ξ²·L, which takes out the 1/√r.
 */
function faceTerm(
  traction: Float64Array | null, xy: Float64Array, i: number, j: number, qi: number, qj: number,
  tip: TipFrame, thc: number, mu: number, kappa: number,
  u11: number, u21: number, ep11: number, ep22: number, ep12: number, w: Float64Array, acc: Float64Array,
): void {
  acc[0] = 0; acc[1] = 0;
  const e1x = tip.dx, e1y = tip.dy;
  let ax = xy[2 * i], ay = xy[2 * i + 1], bx = xy[2 * j], by = xy[2 * j + 1];
  const L = Math.hypot(bx - ax, by - ay);
  if (L === 0) return;
  const mx = (by - ay) / L, my = -(bx - ax) / L;
  const m1 = e1x * mx + e1y * my, m2 = -e1y * mx + e1x * my;
  // traction in the tip frame from its face-frame components (normal along m, tangent (−m_y, m_x))
  let tna = 0, tsa = 0, tnb = 0, tsb = 0;
  if (traction) { tna = traction[2 * i]; tsa = traction[2 * i + 1]; tnb = traction[2 * j]; tsb = traction[2 * j + 1]; }
  let qa = qi, qb = qj;
  // parametrise from the end at the tip, if one is
  const atTip = (x: number, y: number) => Math.hypot(x - tip.x, y - tip.y) < 1e-9 * L;
  let singular = false;
  if (atTip(bx, by)) { [ax, ay, bx, by] = [bx, by, ax, ay]; [tna, tnb] = [tnb, tna]; [tsa, tsb] = [tsb, tsa]; [qa, qb] = [qb, qa]; singular = true; }
  else if (atTip(ax, ay)) singular = true;
  for (let g = 0; g < 4; g++) {
    const xi = G4X[g];
    const f = singular ? xi * xi : xi, ds = singular ? 2 * xi * L * G4W[g] : L * G4W[g];
    const px = ax + f * (bx - ax) - tip.x, py = ay + f * (by - ay) - tip.y;
    const lx = e1x * px + e1y * py, ly = -e1y * px + e1x * py;
    let th = Math.atan2(ly, lx);
    th = thc + Math.atan2(Math.sin(th - thc), Math.cos(th - thc));
    williams(Math.hypot(lx, ly), th, mu, kappa, w);
    const q = qa + f * (qb - qa);
    const tn = tna + f * (tnb - tna), ts = tsa + f * (tsb - tsa);
    // t = tn m + ts (−m2, m1) in the tip frame
    const t1 = tn * m1 - ts * m2, t2 = tn * m2 + ts * m1;
    for (let mode = 0; mode < 2; mode++) {
      const o = 5 * mode, a11 = w[o], a22 = w[o + 1], a12 = w[o + 2], du1 = w[o + 3], du2 = w[o + 4];
      const pm = t1 * du1 + t2 * du2 + (a11 * m1 + a12 * m2) * u11 + (a12 * m1 + a22 * m2) * u21
        - (a11 * ep11 + a22 * ep22 + 2 * a12 * ep12) * m1;
      acc[mode] += ds * q * pm;
    }
  }
}

/** Weight q(r): 1 within r1, 0 beyond r2, linear between. */
export function ringWeight(r: number, r1: number, r2: number): number {
  return r <= r1 ? 1 : r >= r2 ? 0 : (r2 - r) / (r2 - r1);
}

/**
 * K_I, K_II and J at one tip over the ring r1 < r < r2 (q on the vertices). u holds 2
 * displacements per vertex of m (mm). The tip frame's direction (dx, dy) is the crack's
 * direction at the tip, pointing into the material ahead.
 */
export function interactionIntegral(
  m: PolyMesh, u: Float64Array, el: Elastic, tip: TipFrame, r1: number, r2: number, work = new SifWork(), faces: FaceData | null = null,
): TipFactors {
  const { xy, cellStart, cellVerts } = m, D = el.D;
  const mu = el.E / (2 * (1 + el.nu)), kappa = kolosov(el.nu, el.model), Ep = effectiveModulus(el.E, el.nu, el.model);
  const e1x = tip.dx, e1y = tip.dy; // e2 = (−e1y, e1x)
  const reach2 = r2 * r2;
  let II = 0, III = 0, JJ = 0;
  const nc = cellStart.length - 1;
  for (let c = 0; c < nc; c++) {
    const s = cellStart[c], e = cellStart[c + 1], n = e - s;
    // a cell with no vertex inside the ring's outer radius has q = 0 throughout
    let inside = false;
    for (let k = s; k < e; k++) {
      const v = cellVerts[k], rx = xy[2 * v] - tip.x, ry = xy[2 * v + 1] - tip.y;
      if (rx * rx + ry * ry < reach2) { inside = true; break; }
    }
    if (!inside) continue;
    work.fit(n);
    const qv = work.qv, qa = work.q;
    let qmin = Infinity, qmax = -Infinity;
    for (let a = 0; a < n; a++) {
      const v = cellVerts[s + a];
      qv[a] = ringWeight(Math.hypot(xy[2 * v] - tip.x, xy[2 * v + 1] - tip.y), r1, r2);
      qmin = Math.min(qmin, qv[a]); qmax = Math.max(qmax, qv[a]);
    }
    // ∇q = 0: no domain contribution; a cell on a face with q > 0 still has its face term
    if (qmax - qmin <= 0 && !(faces && qmax > 0)) continue;
    const area = strainVectors(xy, cellVerts, s, e, qa);
    // cell averages of ∇q and of the displacement gradient H_ij = ∂u_i/∂x_j (global frame)
    let gqx = 0, gqy = 0, h11 = 0, h12 = 0, h21 = 0, h22 = 0;
    for (let a = 0; a < n; a++) {
      const v = cellVerts[s + a], px = qa[2 * a], py = qa[2 * a + 1], ux = u[2 * v], uy = u[2 * v + 1];
      gqx += px * qv[a]; gqy += py * qv[a];
      h11 += ux * px; h12 += ux * py; h21 += uy * px; h22 += uy * py;
    }
    const exx = h11, eyy = h22, gxy = h12 + h21;
    const sxx = D[0] * exx + D[1] * eyy + D[2] * gxy, syy = D[3] * exx + D[4] * eyy + D[5] * gxy, sxy = D[6] * exx + D[7] * eyy + D[8] * gxy;
    // to the tip frame: a' = R a, R rows e1, e2
    const q1 = e1x * gqx + e1y * gqy, q2 = -e1y * gqx + e1x * gqy;
    const s11 = e1x * e1x * sxx + 2 * e1x * e1y * sxy + e1y * e1y * syy;
    const s22 = e1y * e1y * sxx - 2 * e1x * e1y * sxy + e1x * e1x * syy;
    const s12 = -e1x * e1y * sxx + (e1x * e1x - e1y * e1y) * sxy + e1x * e1y * syy;
    // H' = R H Rᵀ; only the x1-derivatives u'_i,1 and the strain ε'_ij are needed
    const t11 = h11 * e1x + h12 * e1y, t21 = h21 * e1x + h22 * e1y; // (H e1)
    const t12 = -h11 * e1y + h12 * e1x, t22 = -h21 * e1y + h22 * e1x; // (H e2)
    const u11 = e1x * t11 + e1y * t21, u21 = -e1y * t11 + e1x * t21;
    const u12 = e1x * t12 + e1y * t22, u22 = -e1y * t12 + e1x * t22;
    const ep11 = u11, ep22 = u22, ep12 = 0.5 * (u12 + u21);
    // ∫ of the auxiliary fields over the cell: fan of triangles from the centroid
    let cx = 0, cy = 0, a2 = 0;
    for (let a = 0; a < n; a++) {
      const i = cellVerts[s + a], j = cellVerts[s + (a + 1) % n];
      const cr = xy[2 * i] * xy[2 * j + 1] - xy[2 * j] * xy[2 * i + 1];
      a2 += cr; cx += (xy[2 * i] + xy[2 * j]) * cr; cy += (xy[2 * i + 1] + xy[2 * j + 1]) * cr;
    }
    cx /= 3 * a2; cy /= 3 * a2;
    const thc = tipAngle(tip, cx, cy), acc = work.acc, w = work.w, fan = work.fan;
    acc.fill(0);
    const np = fanPoints(xy, cellVerts, s, e, cx, cy, tip, thc, work);
    for (let p = 0; p < 5 * np; p += 5) {
      williams(fan[p + 3], fan[p + 4], mu, kappa, w);
      for (let k = 0; k < 10; k++) acc[k] += fan[p + 2] * w[k];
    }
    // integrand per mode: (σ_i1 q1 + σ_i2 q2) u^a_i,1 + (σ^a_i1 q1 + σ^a_i2 q2) u_i,1 − σ_ij ε^a_ij q1,
    // with σ_ij ε^a_ij = σ^a_ij ε_ij (Hooke's law is symmetric)
    const f1 = s11 * q1 + s12 * q2, f2 = s12 * q1 + s22 * q2;
    for (let mode = 0; mode < 2; mode++) {
      const o = 5 * mode;
      const a11 = acc[o], a22 = acc[o + 1], a12 = acc[o + 2], du1 = acc[o + 3], du2 = acc[o + 4];
      const val = f1 * du1 + f2 * du2
        + (a11 * q1 + a12 * q2) * u11 + (a12 * q1 + a22 * q2) * u21
        - (a11 * ep11 + a22 * ep22 + 2 * a12 * ep12) * q1;
      if (mode === 0) II += val; else III += val;
    }
    if (faces) {
      // the face edges of this cell (no neighbour across; both ends on crack faces)
      for (let a = 0; a < n; a++) {
        const i = cellVerts[s + a], j = cellVerts[s + (a + 1) % n];
        if (!faces.onFace[i] || !faces.onFace[j] || qv[a] + qv[(a + 1) % n] === 0 || !work.isOpenEdge(m, i, j)) continue;
        faceTerm(faces.traction, xy, i, j, qv[a], qv[(a + 1) % n], tip, thc, mu, kappa, u11, u21, ep11, ep22, ep12, w, acc);
        // acc[0..1] now hold the face integral of P_1j m_j q for modes I and II
        II -= acc[0]; III -= acc[1];
      }
    }
    // J of the computed field alone: (σ_ij u_i,1 − W δ1j) q,j, W = ½ σ_ij ε_ij (constant in the cell)
    const W = 0.5 * (s11 * ep11 + s22 * ep22 + 2 * s12 * ep12);
    JJ += area * (f1 * u11 + f2 * u21 - W * q1);
  }
  // I = 2 K/E′ for a unit auxiliary K; the thickness cancels (everything per unit thickness)
  return { KI: 0.5 * Ep * II, KII: 0.5 * Ep * III, J: JJ };
}

/** K at two rings and their spread: max |ΔK| over √(K_I² + K_II²) of their mean. */
export interface TipResult extends TipFactors { rings: [TipFactors, TipFactors]; spread: number }

/**
 * Two nested rings within radius R of the tip: (¼R, ½R) and (½R, R). The reported K is that of
 * the outer ring (more cells, the tip cells left out); the inner one measures path independence.
 */
export function tipFactors(m: PolyMesh, u: Float64Array, el: Elastic, tip: TipFrame, R: number, work = new SifWork(), faces: FaceData | null = null): TipResult {
  const a = interactionIntegral(m, u, el, tip, 0.25 * R, 0.5 * R, work, faces);
  const b = interactionIntegral(m, u, el, tip, 0.5 * R, R, work, faces);
  const mag = Math.hypot(b.KI, b.KII);
  const spread = mag > 0 ? Math.max(Math.abs(a.KI - b.KI), Math.abs(a.KII - b.KII)) / mag : 0;
  return { KI: b.KI, KII: b.KII, J: b.J, rings: [a, b], spread };
}

/**
 * Kink angle (rad, from the crack direction, positive counter-clockwise) by the maximum
 * tangential stress criterion (Erdogan & Sih 1963): θ = 2 arctan[(K_I − √(K_I² + 8K_II²))/(4K_II)].
 */
export function mtsKink(KI: number, KII: number): number {
  if (KII === 0) return 0;
  return 2 * Math.atan((KI - Math.sqrt(KI * KI + 8 * KII * KII)) / (4 * KII));
}

/** Equivalent mode-I factor of the MTS criterion: K_eq = cos(θ/2) [K_I cos²(θ/2) − 1.5 K_II sin θ]. */
export function mtsEquivalent(KI: number, KII: number): number {
  const th = mtsKink(KI, KII), c = Math.cos(th / 2);
  return c * (KI * c * c - 1.5 * KII * Math.sin(th));
}

/** MPa√mm → MPa√m. */
export const PER_SQRT_M = 1 / Math.sqrt(1000);
