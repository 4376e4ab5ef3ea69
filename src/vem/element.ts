// First-order virtual element for plane elasticity on one polygon.
// Dofs are ordered ux0 uy0 ux1 uy1 …; the stiffness is Kc (consistency, exact for
// linear fields) + Ks (stabilisation acting only on the non-linear remainder).

/**
 * Stabilisation of the non-linear remainder (I − Π)u:
 * - `boundary`: τ·t·d̄/h_E ∫_∂E (I − Π)u·(I − Π)v ds (the boundary L² form of the VEM stability
 *   analyses, Beirão da Veiga, Lovadina & Russo 2017). On order 1 the remainder is linear along
 *   each edge, so the integral is exact with each edge's linear mass matrix, and Π itself is
 *   taken from boundary integrals (mean over ∂E, boundary centroid): a collinear vertex carrying
 *   the interpolated value changes neither, so a cell keeps its stiffness when a neighbour's
 *   refinement adds a vertex to one of its edges.
 * - `vertex`: α (I − Π)ᵀ(I − Π) on the vertex values, α = tr(Kc)/(2n), Π with the vertex mean
 *   (depends on the vertex count; kept to compare the two).
 */
export type Stabilisation = 'boundary' | 'vertex';

/**
 * τ of the boundary form, with d̄ = (D₁₁ + D₂₂ + 2D₃₃)/4 and h_E the cell's diameter: 1.3 gives
 * the trace of the vertex form on a regular hexagon (0.77 with τ = 1), so a typical Voronoi
 * cell is about as stiff in its non-linear modes as with it (our own calibration).
 */
export const BOUNDARY_TAU = 1.3;

/**
 * The default: the boundary form closed the gaps of gradual refinement under load but left the
 * rig events of the shear beam and the disc worse (DEVELOPERS.md, known gaps), so not yet.
 */
export const DEFAULT_STABILISATION: Stabilisation = 'vertex';

/** Scratch space for one element; sized for the largest polygon, reused across cells. */
export class ElementWork {
  readonly q: Float64Array;   // q_a (x, y) per vertex: ε̄ = B u
  readonly r: Float64Array;   // vertex position relative to the centre of the projection
  readonly len: Float64Array; // edge lengths, edge a from vertex a to a+1
  readonly N: Float64Array;   // 2n × 6: vertex values of the linear basis
  readonly W: Float64Array;   // 2n × 6: functionals giving the basis coefficients
  readonly MN: Float64Array;  // 2n × 6: M·N (M the boundary mass, or the identity)
  readonly NtN: Float64Array = new Float64Array(36); // Nᵀ M N
  readonly WNtN: Float64Array; // 2n × 6: W·(NᵀMN)
  constructor(readonly maxVerts: number) {
    this.q = new Float64Array(2 * maxVerts);
    this.r = new Float64Array(2 * maxVerts);
    this.len = new Float64Array(maxVerts);
    this.N = new Float64Array(12 * maxVerts);
    this.W = new Float64Array(12 * maxVerts);
    this.MN = new Float64Array(12 * maxVerts);
    this.WNtN = new Float64Array(12 * maxVerts);
  }
}

/**
 * Strain-projection vectors q_a of the polygon cellVerts[s..e) into w.q; returns its area.
 * q_a = (|e_{a-1}| n_{a-1} + |e_a| n_a) / (2|E|), so that ε̄ = (1/|E|)∮ sym(u ⊗ n).
 */
export function strainVectors(xy: Float64Array, cellVerts: Int32Array, s: number, e: number, q: Float64Array): number {
  const n = e - s;
  let area2 = 0;
  for (let a = 0; a < n; a++) {
    const i = cellVerts[s + a], j = cellVerts[s + (a + 1) % n];
    area2 += xy[2 * i] * xy[2 * j + 1] - xy[2 * j] * xy[2 * i + 1];
  }
  const inv = 1 / area2; // 1/(2|E|)
  for (let a = 0; a < n; a++) {
    // |e| n for edge (p→q) of a CCW polygon is (qy−py, −(qx−px)); summing both edges at a
    // telescopes to the vector from the previous to the next vertex, rotated.
    const prev = cellVerts[s + (a + n - 1) % n], next = cellVerts[s + (a + 1) % n];
    q[2 * a] = (xy[2 * next + 1] - xy[2 * prev + 1]) * inv;
    q[2 * a + 1] = -(xy[2 * next] - xy[2 * prev]) * inv;
  }
  return area2 / 2;
}

/**
 * Element stiffness (row-major, 2n × 2n) into Ke. D is the 3×3 elastic matrix, t the thickness.
 * Kc is exact for linear fields and the stabilisation vanishes on them, so the patch test is
 * exact with either stabilisation.
 */
export function elementStiffness(
  xy: Float64Array, cellVerts: Int32Array, s: number, e: number,
  D: Float64Array, t: number, Ke: Float64Array, w: ElementWork, stab: Stabilisation = DEFAULT_STABILISATION,
): number {
  const n = e - s, m = 2 * n;
  const { q, r, len, N, W, MN, NtN, WNtN } = w;
  const area = strainVectors(xy, cellVerts, s, e, q);

  // consistency: Kc = t|E| Bᵀ D B, with B_a = [[qx,0],[0,qy],[qy,qx]]
  const ta = t * area;
  const d00 = D[0], d01 = D[1], d02 = D[2], d11 = D[4], d12 = D[5], d22 = D[8];
  let trace = 0;
  for (let a = 0; a < n; a++) {
    const ax = q[2 * a], ay = q[2 * a + 1];
    // columns of D B_a for the ux_a and uy_a dofs
    const u0 = d00 * ax + d02 * ay, u1 = d01 * ax + d12 * ay, u2 = d02 * ax + d22 * ay;
    const v0 = d01 * ay + d02 * ax, v1 = d11 * ay + d12 * ax, v2 = d12 * ay + d22 * ax;
    for (let b = 0; b < n; b++) {
      const bx = q[2 * b], by = q[2 * b + 1];
      // row of B_bᵀ: ux_b -> (bx, 0, by), uy_b -> (0, by, bx)
      Ke[(2 * b) * m + 2 * a] = ta * (bx * u0 + by * u2);
      Ke[(2 * b) * m + 2 * a + 1] = ta * (bx * v0 + by * v2);
      Ke[(2 * b + 1) * m + 2 * a] = ta * (by * u1 + bx * u2);
      Ke[(2 * b + 1) * m + 2 * a + 1] = ta * (by * v1 + bx * v2);
    }
    trace += ta * (ax * u0 + ay * u2) + ta * (ay * v1 + ax * v2);
  }

  // the translation part of Π: a weight per vertex and the centre the linear basis is taken about
  const boundary = stab === 'boundary';
  let per = 0, diam2 = 0;
  for (let a = 0; a < n; a++) {
    const i = cellVerts[s + a], j = cellVerts[s + (a + 1) % n];
    len[a] = Math.hypot(xy[2 * j] - xy[2 * i], xy[2 * j + 1] - xy[2 * i + 1]);
    per += len[a];
    if (boundary) for (let b = a + 1; b < n; b++) {
      const k = cellVerts[s + b], dx = xy[2 * k] - xy[2 * i], dy = xy[2 * k + 1] - xy[2 * i + 1];
      diam2 = Math.max(diam2, dx * dx + dy * dy);
    }
  }
  let mx = 0, my = 0;
  if (boundary) for (let a = 0; a < n; a++) { const i = cellVerts[s + a], wa = vertexWeight(len, a, n, per, true); mx += wa * xy[2 * i]; my += wa * xy[2 * i + 1]; }
  else { for (let a = 0; a < n; a++) { const i = cellVerts[s + a]; mx += xy[2 * i]; my += xy[2 * i + 1]; } mx /= n; my /= n; }
  for (let a = 0; a < n; a++) { const i = cellVerts[s + a]; r[2 * a] = xy[2 * i] - mx; r[2 * a + 1] = xy[2 * i + 1] - my; }

  // projection onto linear fields: Π = N Wᵀ (basis: 2 translations, rotation, εxx, εyy, γxy)
  for (let a = 0; a < n; a++) {
    const rx = r[2 * a], ry = r[2 * a + 1], qx = q[2 * a], qy = q[2 * a + 1], wa = vertexWeight(len, a, n, per, boundary);
    const ox = 12 * a, oy = 12 * a + 6; // rows of ux_a, uy_a
    N[ox] = 1; N[ox + 1] = 0; N[ox + 2] = -ry; N[ox + 3] = rx; N[ox + 4] = 0; N[ox + 5] = ry / 2;
    N[oy] = 0; N[oy + 1] = 1; N[oy + 2] = rx; N[oy + 3] = 0; N[oy + 4] = ry; N[oy + 5] = rx / 2;
    W[ox] = wa; W[ox + 1] = 0; W[ox + 2] = -qy / 2; W[ox + 3] = qx; W[ox + 4] = 0; W[ox + 5] = qy;
    W[oy] = 0; W[oy + 1] = wa; W[oy + 2] = qx / 2; W[oy + 3] = 0; W[oy + 4] = qy; W[oy + 5] = qx;
  }
  // M·N: boundary mass (per component, |e|/6·[[2,1],[1,2]] per edge) or the identity
  for (let a = 0; a < n; a++) {
    const p = (a + n - 1) % n, nx = (a + 1) % n, lp = len[p], la = len[a];
    for (let c = 0; c < 12; c++) {
      const o = 12 * a + c;
      MN[o] = boundary ? ((lp + la) * N[o] + lp * N[12 * p + c] * 0.5 + la * N[12 * nx + c] * 0.5) / 3 : N[o];
    }
  }
  NtN.fill(0);
  for (let i = 0; i < m; i++) {
    const o = 6 * i;
    for (let k = 0; k < 6; k++) { const nk = N[o + k]; if (nk !== 0) for (let l = 0; l < 6; l++) NtN[6 * k + l] += nk * MN[o + l]; }
  }
  for (let i = 0; i < m; i++) {
    const o = 6 * i;
    for (let l = 0; l < 6; l++) {
      let sum = 0;
      for (let k = 0; k < 6; k++) sum += W[o + k] * NtN[6 * k + l];
      WNtN[o + l] = sum;
    }
  }
  // Ks_ij = β (M_ij − (MP)_ij − (MP)_ji + (PᵀMP)_ij), P_ij = N_i·W_j, (MP)_ij = (MN)_i·W_j
  const beta = boundary ? BOUNDARY_TAU * t * (d00 + d11 + 2 * d22) / (4 * Math.sqrt(diam2)) : trace / m;
  for (let i = 0; i < m; i++) {
    const oi = 6 * i, a = i >> 1;
    for (let j = 0; j < m; j++) {
      const oj = 6 * j;
      let pij = 0, pji = 0, ptp = 0;
      for (let k = 0; k < 6; k++) {
        pij += MN[oi + k] * W[oj + k];
        pji += MN[oj + k] * W[oi + k];
        ptp += WNtN[oi + k] * W[oj + k];
      }
      let mij = 0;
      if ((i & 1) === (j & 1)) {
        const b = j >> 1;
        if (!boundary) mij = a === b ? 1 : 0;
        else if (a === b) mij = (len[(a + n - 1) % n] + len[a]) / 3;
        else if (b === (a + 1) % n) mij = len[a] / 6;
        else if (a === (b + 1) % n) mij = len[b] / 6;
      }
      Ke[i * m + j] += beta * (mij - pij - pji + ptp);
    }
  }
  return area;
}

/** Translation functional's weight of vertex a: (|e_{a−1}| + |e_a|)/(2|∂E|), the mean over ∂E of a field linear on each edge; or 1/n. */
function vertexWeight(len: Float64Array, a: number, n: number, per: number, boundary: boolean): number {
  return boundary ? (len[(a + n - 1) % n] + len[a]) / (2 * per) : 1 / n;
}

/** Constant strain [εxx, εyy, γxy] of one cell from the vertex displacements u (2 per vertex). */
export function cellStrain(
  xy: Float64Array, cellVerts: Int32Array, s: number, e: number, u: Float64Array, q: Float64Array, out: Float64Array, o = 0,
): void {
  strainVectors(xy, cellVerts, s, e, q);
  let exx = 0, eyy = 0, gxy = 0;
  for (let a = 0; a < e - s; a++) {
    const v = cellVerts[s + a], ux = u[2 * v], uy = u[2 * v + 1], qx = q[2 * a], qy = q[2 * a + 1];
    exx += qx * ux; eyy += qy * uy; gxy += qy * ux + qx * uy;
  }
  out[o] = exx; out[o + 1] = eyy; out[o + 2] = gxy;
}
