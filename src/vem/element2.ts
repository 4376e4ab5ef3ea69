// Second-order virtual element (k = 2) for plane elasticity on one polygon.
// Local dofs, 4n + 2 of them: vertex values ux0 uy0 … (2n), edge-midpoint values (2n; edge a
// joins vertices a and a+1), then the cell mean of the displacement (ūx, ūy).
// Midpoint values rather than edge moments: with the two vertices they are the 3-point
// Gauss–Lobatto (Simpson) nodes of the edge, so every boundary integral below is a weighted
// sum of dofs, boundary conditions are plain nodal values, and a shared edge needs no
// orientation sign.
//
// Projection Π onto [P₂]² (linear strains), after Beirão da Veiga, Brezzi, Marini, Russo
// (2014) with the elasticity form of Beirão da Veiga, Brezzi, Marini (2013):
//   ∫_E ε(p):ε(Πu) = ∫_E ε(p):ε(u) for all p ∈ [P₂]², plus the cell mean and the mean
//   rotation of Πu equal to those of u (they fix the rigid modes).
// ε([P₂]²) is every linear symmetric tensor field, so Π is also the energy projection for any
// constant C; hence Kc = t ∫ ε(Πu)ᵀ C ε(Πu) passes the quadratic patch test.

/** Vector quadratic basis size: 3 rigid modes, 3 constant strains, 6 quadratic fields. */
export const NB = 12;

// Basis p_j = (Σ ax_α m_α, Σ ay_α m_α) on the scaled monomials m = [1, ξ, η, ξ², ξη, η²],
// ξ = (x − x_c)/h, η = (y − y_c)/h: (1,0) (0,1) (−η,ξ) (ξ,0) (0,η) (η,ξ) then ξ², ξη, η² in x and in y.
const BASIS = new Float64Array(NB * 12);
{
  const set = (j: number, comp: 0 | 1, a: number, v: number) => { BASIS[12 * j + 6 * comp + a] = v; };
  set(0, 0, 0, 1); set(1, 1, 0, 1); set(2, 0, 2, -1); set(2, 1, 1, 1);
  set(3, 0, 1, 1); set(4, 1, 2, 1); set(5, 0, 2, 1); set(5, 1, 1, 1);
  for (let a = 0; a < 3; a++) { set(6 + a, 0, 3 + a, 1); set(9 + a, 1, 3 + a, 1); }
}
// Strains of p_j times h, as linear fields: STRAIN[9j + 3k + c] for component c ∈ {xx, yy, γxy}
// and coefficient k of [1, ξ, η].
const STRAIN = new Float64Array(NB * 9);
for (let j = 0; j < NB; j++) {
  const ax = BASIS.subarray(12 * j, 12 * j + 6), ay = BASIS.subarray(12 * j + 6, 12 * j + 12);
  const dxux = [ax[1], 2 * ax[3], ax[4]], dyux = [ax[2], ax[4], 2 * ax[5]];
  const dxuy = [ay[1], 2 * ay[3], ay[4]], dyuy = [ay[2], ay[4], 2 * ay[5]];
  for (let k = 0; k < 3; k++) {
    STRAIN[9 * j + 3 * k] = dxux[k]; STRAIN[9 * j + 3 * k + 1] = dyuy[k]; STRAIN[9 * j + 3 * k + 2] = dyux[k] + dxuy[k];
  }
}

const mono = (xi: number, eta: number, a: Float64Array, o: number) =>
  a[o] + a[o + 1] * xi + a[o + 2] * eta + a[o + 3] * xi * xi + a[o + 4] * xi * eta + a[o + 5] * eta * eta;

/** Scratch space for one element, sized for the largest polygon, reused across cells. */
export class Element2Work {
  readonly xi: Float64Array;   // scaled vertex coordinates (ξ, η)
  readonly B: Float64Array;    // 12 × ndof: the projection's right-hand side
  readonly Dm: Float64Array;   // ndof × 12: dofs of the basis
  readonly G = new Float64Array(NB * NB);
  readonly H = new Float64Array(NB * NB); // ∫ ε(p_i)ᵀ C ε(p_j)
  /** 12 × ndof: basis coefficients of Πu from the dofs (Π* of the hitchhiker's guide). */
  readonly Pi: Float64Array;
  readonly HP: Float64Array;
  readonly mom = new Float64Array(6); // ∫ m_α dA for m = 1, ξ, η, ξ², ξη, η²
  readonly M = new Float64Array(9);   // ∫ φ_k φ_l dA for φ = [1, ξ, η]
  cx = 0; cy = 0; h = 1; area = 0;
  constructor(readonly maxVerts: number) {
    const nd = 4 * maxVerts + 2;
    this.xi = new Float64Array(2 * maxVerts);
    this.B = new Float64Array(NB * nd);
    this.Dm = new Float64Array(nd * NB);
    this.Pi = new Float64Array(NB * nd);
    this.HP = new Float64Array(NB * nd);
  }
}

/** Area, area centroid, diameter and the monomial moments of polygon cellVerts[s..e) into w. */
function geometry(xy: Float64Array, cellVerts: Int32Array, s: number, e: number, w: Element2Work): void {
  const n = e - s, x0 = xy[2 * cellVerts[s]], y0 = xy[2 * cellVerts[s] + 1];
  let a2 = 0, sx = 0, sy = 0, h2 = 0;
  for (let a = 0; a < n; a++) {
    const i = cellVerts[s + a], j = cellVerts[s + (a + 1) % n];
    const xi = xy[2 * i] - x0, yi = xy[2 * i + 1] - y0, xj = xy[2 * j] - x0, yj = xy[2 * j + 1] - y0;
    const cr = xi * yj - xj * yi;
    a2 += cr; sx += (xi + xj) * cr; sy += (yi + yj) * cr;
    for (let b = a + 1; b < n; b++) {
      const k = cellVerts[s + b];
      h2 = Math.max(h2, (xy[2 * k] - xy[2 * i]) ** 2 + (xy[2 * k + 1] - xy[2 * i + 1]) ** 2);
    }
  }
  w.area = a2 / 2; w.cx = x0 + sx / (3 * a2); w.cy = y0 + sy / (3 * a2); w.h = Math.sqrt(h2);
  const ih = 1 / w.h, xi = w.xi, mom = w.mom;
  for (let a = 0; a < n; a++) { const i = cellVerts[s + a]; xi[2 * a] = (xy[2 * i] - w.cx) * ih; xi[2 * a + 1] = (xy[2 * i + 1] - w.cy) * ih; }
  // signed fan of triangles from the centroid, each with the edge-midpoint rule (exact for
  // degree 2); signed areas keep it exact on non-convex cells too
  mom.fill(0);
  for (let a = 0; a < n; a++) {
    const b = (a + 1) % n, pa = xi[2 * a], qa = xi[2 * a + 1], pb = xi[2 * b], qb = xi[2 * b + 1];
    const wt = w.h * w.h * (pa * qb - pb * qa) / 6; // triangle area / 3
    for (let m = 0; m < 3; m++) {
      const u = m === 0 ? pa / 2 : m === 1 ? pb / 2 : (pa + pb) / 2, v = m === 0 ? qa / 2 : m === 1 ? qb / 2 : (qa + qb) / 2;
      mom[0] += wt; mom[1] += wt * u; mom[2] += wt * v; mom[3] += wt * u * u; mom[4] += wt * u * v; mom[5] += wt * v * v;
    }
  }
}

/** Solve A X = B in place for a dense 12 × 12 A (destroyed) and a 12 × ncol B, partial pivoting. */
function solve12(A: Float64Array, X: Float64Array, ncol: number): void {
  for (let k = 0; k < NB; k++) {
    let p = k, best = Math.abs(A[k * NB + k]);
    for (let i = k + 1; i < NB; i++) { const v = Math.abs(A[i * NB + k]); if (v > best) { best = v; p = i; } }
    if (p !== k) {
      for (let j = 0; j < NB; j++) { const t = A[k * NB + j]; A[k * NB + j] = A[p * NB + j]; A[p * NB + j] = t; }
      for (let j = 0; j < ncol; j++) { const t = X[k * ncol + j]; X[k * ncol + j] = X[p * ncol + j]; X[p * ncol + j] = t; }
    }
    const ip = 1 / A[k * NB + k];
    for (let i = k + 1; i < NB; i++) {
      const f = A[i * NB + k] * ip;
      if (f === 0) continue;
      for (let j = k; j < NB; j++) A[i * NB + j] -= f * A[k * NB + j];
      for (let j = 0; j < ncol; j++) X[i * ncol + j] -= f * X[k * ncol + j];
    }
  }
  for (let k = NB - 1; k >= 0; k--) {
    const ip = 1 / A[k * NB + k];
    for (let j = 0; j < ncol; j++) {
      let v = X[k * ncol + j];
      for (let i = k + 1; i < NB; i++) v -= A[k * NB + i] * X[i * ncol + j];
      X[k * ncol + j] = v * ip;
    }
  }
}

/**
 * The projection Π* (12 × ndof, into w.Pi) of polygon cellVerts[s..e): Πu = Σ_j (Π* u)_j p_j.
 * Also fills w.Dm (dofs of the basis), and the geometry of w.
 */
export function projection2(xy: Float64Array, cellVerts: Int32Array, s: number, e: number, w: Element2Work): void {
  const n = e - s, nd = 4 * n + 2, { xi, B, Dm, G, Pi, mom } = w;
  geometry(xy, cellVerts, s, e, w);
  const h = w.h, ih = 1 / h, area = w.area;
  B.fill(0, 0, NB * nd);
  // rows 0, 1: cell mean; row 2: mean rotation × h/2, (h/2|E|) ∮ (uy nx − ux ny) ds
  B[4 * n] = 1; B[nd + 4 * n + 1] = 1;
  const rs = h / (2 * area);
  for (let a = 0; a < n; a++) {
    const b = (a + 1) % n;
    // |e| n = (Δy, −Δx) for a counter-clockwise cell, in physical units
    const Nx = (xi[2 * b + 1] - xi[2 * a + 1]) * h, Ny = -(xi[2 * b] - xi[2 * a]) * h;
    const mx = (xi[2 * a] + xi[2 * b]) / 2, my = (xi[2 * a + 1] + xi[2 * b + 1]) / 2;
    // Simpson weights 1/6, 4/6, 1/6 at the vertex a, the midpoint, the vertex b
    const r = 2 * nd;
    B[r + 2 * a] -= rs * Ny / 6; B[r + 2 * a + 1] += rs * Nx / 6;
    B[r + 2 * b] -= rs * Ny / 6; B[r + 2 * b + 1] += rs * Nx / 6;
    B[r + 2 * n + 2 * a] -= rs * Ny * 4 / 6; B[r + 2 * n + 2 * a + 1] += rs * Nx * 4 / 6;
    // rows 3…11: ∫ T:∇u = −∫ div T · u + ∮ (T n)·u, with T = ε(p_i) as a tensor
    for (let i = 3; i < NB; i++) {
      const S = 9 * i, ri = i * nd;
      for (let q = 0; q < 3; q++) {
        const u = q === 0 ? xi[2 * a] : q === 1 ? xi[2 * b] : mx, v = q === 0 ? xi[2 * a + 1] : q === 1 ? xi[2 * b + 1] : my;
        const txx = (STRAIN[S] + STRAIN[S + 3] * u + STRAIN[S + 6] * v) * ih;
        const tyy = (STRAIN[S + 1] + STRAIN[S + 4] * u + STRAIN[S + 7] * v) * ih;
        const txy = (STRAIN[S + 2] + STRAIN[S + 5] * u + STRAIN[S + 8] * v) * ih / 2;
        const wq = q === 2 ? 4 / 6 : 1 / 6, col = q === 0 ? 2 * a : q === 1 ? 2 * b : 2 * n + 2 * a;
        B[ri + col] += wq * (txx * Nx + txy * Ny);
        B[ri + col + 1] += wq * (txy * Nx + tyy * Ny);
      }
    }
  }
  for (let i = 3; i < NB; i++) {
    const S = 9 * i;
    // div T = (∂x Txx + ∂y Txy, ∂x Txy + ∂y Tyy), constant
    const dx = (STRAIN[S + 3] + STRAIN[S + 8] / 2) * ih * ih, dy = (STRAIN[S + 5] / 2 + STRAIN[S + 7]) * ih * ih;
    B[i * nd + 4 * n] -= area * dx; B[i * nd + 4 * n + 1] -= area * dy;
  }
  // D: dof values of every basis function
  for (let j = 0; j < NB; j++) {
    const c = 12 * j;
    for (let a = 0; a < n; a++) {
      const b = (a + 1) % n, u = xi[2 * a], v = xi[2 * a + 1];
      const mx = (u + xi[2 * b]) / 2, my = (v + xi[2 * b + 1]) / 2;
      Dm[(2 * a) * NB + j] = mono(u, v, BASIS, c); Dm[(2 * a + 1) * NB + j] = mono(u, v, BASIS, c + 6);
      Dm[(2 * n + 2 * a) * NB + j] = mono(mx, my, BASIS, c); Dm[(2 * n + 2 * a + 1) * NB + j] = mono(mx, my, BASIS, c + 6);
    }
    let mxv = 0, myv = 0;
    for (let k = 0; k < 6; k++) { mxv += BASIS[c + k] * mom[k]; myv += BASIS[c + 6 + k] * mom[k]; }
    Dm[(4 * n) * NB + j] = mxv / area; Dm[(4 * n + 1) * NB + j] = myv / area;
  }
  // G = B D, then Π* = G⁻¹ B
  for (let i = 0; i < NB; i++) for (let j = 0; j < NB; j++) {
    let sum = 0;
    for (let k = 0; k < nd; k++) sum += B[i * nd + k] * Dm[k * NB + j];
    G[i * NB + j] = sum;
  }
  for (let k = 0; k < NB * nd; k++) Pi[k] = B[k];
  solve12(G, Pi, nd);
}

/**
 * Element stiffness (row-major, ndof × ndof, ndof = 4n + 2) into Ke; returns the cell area.
 * Stabilisation: α (I − Π)ᵀ(I − Π) in dof space, α = tr(Kc)/ndof (the mean diagonal of the
 * consistency part): it vanishes on [P₂]², so the patch test stays exact, and it scales with the
 * material and the cell.
 */
export function elementStiffness2(
  xy: Float64Array, cellVerts: Int32Array, s: number, e: number,
  C: Float64Array, t: number, Ke: Float64Array, w: Element2Work,
): number {
  const n = e - s, nd = 4 * n + 2, { H, Pi, HP, Dm, mom } = w;
  projection2(xy, cellVerts, s, e, w);
  // H_ij = Σ_kl (e_ikᵀ C e_jl) ∫ φ_k φ_l, φ = [1, ξ, η]; strains carry 1/h each
  const M = w.M, ih2 = 1 / (w.h * w.h);
  M[0] = mom[0]; M[1] = M[3] = mom[1]; M[2] = M[6] = mom[2]; M[4] = mom[3]; M[5] = M[7] = mom[4]; M[8] = mom[5];
  for (let i = 0; i < NB; i++) for (let j = 0; j < NB; j++) {
    let sum = 0;
    if (i >= 3 && j >= 3) {
      for (let k = 0; k < 3; k++) {
        const ei = 9 * i + 3 * k;
        for (let l = 0; l < 3; l++) {
          const ej = 9 * j + 3 * l;
          let q = 0;
          for (let r = 0; r < 3; r++) {
            const ce = C[3 * r] * STRAIN[ej] + C[3 * r + 1] * STRAIN[ej + 1] + C[3 * r + 2] * STRAIN[ej + 2];
            q += STRAIN[ei + r] * ce;
          }
          sum += q * M[3 * k + l];
        }
      }
    }
    H[i * NB + j] = sum * ih2;
  }
  for (let i = 0; i < NB; i++) for (let c = 0; c < nd; c++) {
    let sum = 0;
    for (let k = 3; k < NB; k++) sum += H[i * NB + k] * Pi[k * nd + c];
    HP[i * nd + c] = sum;
  }
  let trace = 0;
  for (let a = 0; a < nd; a++) for (let b = 0; b < nd; b++) {
    let sum = 0;
    for (let k = 3; k < NB; k++) sum += Pi[k * nd + a] * HP[k * nd + b];
    Ke[a * nd + b] = t * sum;
    if (a === b) trace += t * sum;
  }
  // (I − P)ᵀ(I − P) with P = D Π*: I − P − Pᵀ + Π*ᵀ (DᵀD) Π*, all through 12-wide products
  const DtD = w.G; // G is free again once Π* is known
  for (let i = 0; i < NB; i++) for (let j = 0; j < NB; j++) {
    let sum = 0;
    for (let k = 0; k < nd; k++) sum += Dm[k * NB + i] * Dm[k * NB + j];
    DtD[i * NB + j] = sum;
  }
  for (let i = 0; i < NB; i++) for (let c = 0; c < nd; c++) {
    let sum = 0;
    for (let k = 0; k < NB; k++) sum += DtD[i * NB + k] * Pi[k * nd + c];
    HP[i * nd + c] = sum;
  }
  const alpha = trace / nd;
  for (let a = 0; a < nd; a++) for (let b = a; b < nd; b++) {
    let pab = 0, pba = 0, ptp = 0;
    for (let k = 0; k < NB; k++) {
      pab += Dm[a * NB + k] * Pi[k * nd + b];
      pba += Dm[b * NB + k] * Pi[k * nd + a];
      ptp += Pi[k * nd + a] * HP[k * nd + b];
    }
    const v = alpha * ((a === b ? 1 : 0) - pab - pba + ptp);
    Ke[a * nd + b] += v;
    if (b !== a) Ke[b * nd + a] += v;
  }
  return w.area;
}

/** Strain [εxx, εyy, γxy] of Πu at the scaled point (ξ, η), from the basis coefficients coef[o … o+11]. */
export function strainAt2(coef: Float64Array, o: number, h: number, xi: number, eta: number, out: Float64Array | number[]): void {
  let exx = 0, eyy = 0, gxy = 0;
  for (let j = 3; j < NB; j++) {
    const c = coef[o + j], S = 9 * j;
    if (c === 0) continue;
    exx += c * (STRAIN[S] + STRAIN[S + 3] * xi + STRAIN[S + 6] * eta);
    eyy += c * (STRAIN[S + 1] + STRAIN[S + 4] * xi + STRAIN[S + 7] * eta);
    gxy += c * (STRAIN[S + 2] + STRAIN[S + 5] * xi + STRAIN[S + 8] * eta);
  }
  out[0] = exx / h; out[1] = eyy / h; out[2] = gxy / h;
}

/** Displacement of Πu at the scaled point (ξ, η) from the basis coefficients c, into out[0..1]. */
export function displacement2(coef: Float64Array | number[], xi: number, eta: number, out: Float64Array | number[]): void {
  let ux = 0, uy = 0;
  for (let j = 0; j < NB; j++) {
    if (coef[j] === 0) continue;
    ux += coef[j] * mono(xi, eta, BASIS, 12 * j); uy += coef[j] * mono(xi, eta, BASIS, 12 * j + 6);
  }
  out[0] = ux; out[1] = uy;
}

/** Displacement gradient [∂ux/∂x, ∂ux/∂y, ∂uy/∂x, ∂uy/∂y] of Πu at the scaled point (ξ, η), from coef[o … o+11] (rotation included). */
export function gradientAt2(coef: Float64Array, o: number, h: number, xi: number, eta: number, out: Float64Array | number[]): void {
  let a = 0, b = 0, c = 0, d = 0;
  for (let j = 0; j < NB; j++) {
    const k = coef[o + j];
    if (k === 0) continue;
    const x = 12 * j, y = x + 6;
    a += k * (BASIS[x + 1] + 2 * BASIS[x + 3] * xi + BASIS[x + 4] * eta);
    b += k * (BASIS[x + 2] + BASIS[x + 4] * xi + 2 * BASIS[x + 5] * eta);
    c += k * (BASIS[y + 1] + 2 * BASIS[y + 3] * xi + BASIS[y + 4] * eta);
    d += k * (BASIS[y + 2] + BASIS[y + 4] * xi + 2 * BASIS[y + 5] * eta);
  }
  out[0] = a / h; out[1] = b / h; out[2] = c / h; out[3] = d / h;
}
