// The bulk is linear elastic and only the face pairs are not, so once per topology the bulk
// stiffness is condensed onto the free dofs of the faces (a Schur complement) and Newton
// iterates on those alone: an iteration costs a dense LDLᵀ of their order, not full-size
// solves. With q = (q_b, q_c) the free unknowns, k the bulk's coupling with the load factor λ
// and κ = zᵀKz (z the load pattern):
//   q_b = −K_bb⁻¹ (K_bc q_c + λ k_b)                 (bulk equilibrium, exact)
//   r_c = S q_c + λ s + f_coh(q_c),  S = K_cc − K_cb K_bb⁻¹ K_bc,  s = k_c − K_cb K_bb⁻¹ k_b
//   F   = s·q_c + κ̂ λ,  κ̂ = κ − k_bᵀ K_bb⁻¹ k_b       (machine force)
// A gauge Σ G·q + g_λ λ reads ĝ·q_c + ĝ_λ λ in the same way. S comes out of one sparse LDLᵀ of
// K + αI_cc with the face dofs eliminated last: its trailing block L_cc D L_ccᵀ is S + αI.
import { factorize, matVec, trailingSchur, type Factor } from '../linalg/index.js';
import type { CohesiveParams } from '../cohesive/interface.js';
import { SingularMatrixError } from '../errors.js';
import type { System } from './system.js';

/** Largest crack system condensed (dense storage and an n³/6 factorization per iteration). */
export const MAX_CONDENSED = 1200;

/** A gauge as it reads on the condensed unknowns. */
export interface CondensedGauge { gc: Float64Array; gl: number }

export class Condensation {
  /** Number of condensed unknowns and the free index of each (their elimination order). */
  readonly nc: number;
  readonly cFree: Int32Array;
  /** Condensed index of each pair's dofs (plus x, plus y, minus x, minus y), −1 when held at zero. */
  readonly pairPos: Int32Array;
  /** S + αI (dense, row-major), the λ coupling s and κ̂. */
  readonly SA: Float64Array;
  readonly alpha: number;
  readonly s: Float64Array;
  readonly kll: number;
  /** Scratch: tangent and its factor, residual, steps, trial, constraint gradient, pivots. */
  readonly T: Float64Array; readonly r: Float64Array; readonly a: Float64Array; readonly b: Float64Array;
  readonly qTry: Float64Array; readonly gf: Float64Array; readonly d: Float64Array;
  private readonly kb: Float64Array;
  private readonly kc: Float64Array;
  private readonly wk: Float64Array;
  private readonly xk: Float64Array;
  private readonly rhs: Float64Array;
  private readonly gauges = new Map<string, CondensedGauge>();

  private constructor(private readonly sys: System, private readonly F: Factor, first: number, alpha: number) {
    const n = sys.nFree, nc = n - first, sym = sys.sym;
    this.nc = nc;
    this.alpha = alpha;
    this.cFree = sym.perm.slice(first);
    const posOf = new Int32Array(n).fill(-1);
    for (let p = 0; p < nc; p++) posOf[this.cFree[p]] = p;
    const P = sys.pairs, np = P.plus.length;
    this.pairPos = new Int32Array(4 * np);
    for (let p = 0; p < np; p++) {
      const dofs = [2 * P.plus[p], 2 * P.plus[p] + 1, 2 * P.minus[p], 2 * P.minus[p] + 1];
      for (let i = 0; i < 4; i++) { const fi = sys.freeOf[dofs[i]]; this.pairPos[4 * p + i] = fi >= 0 ? posOf[fi] : -1; }
    }
    this.SA = new Float64Array(nc * nc);
    trailingSchur(F, first, this.SA);
    this.T = new Float64Array(nc * nc);
    this.r = new Float64Array(nc); this.a = new Float64Array(nc); this.b = new Float64Array(nc);
    this.qTry = new Float64Array(nc); this.gf = new Float64Array(nc); this.d = new Float64Array(nc);
    this.rhs = new Float64Array(n);
    // the bulk's coupling with λ: k = Tᵀ K z on the unknowns, κ = zᵀ K z
    const u = new Float64Array(sys.nDof), f = new Float64Array(sys.nDof), k = new Float64Array(n);
    sys.expand(new Float64Array(n), 1, u);
    matVec(sys.kBulk, u, f);
    sys.restrict(f, k);
    const kappa = sys.loadForce(f);
    this.kb = k.slice();
    this.kc = this.gatherC(k);
    this.wk = new Float64Array(nc);
    for (let p = 0; p < nc; p++) this.kb[this.cFree[p]] = 0;
    this.xk = F.solve(this.kb);
    const xc = this.gatherC(this.xk), Sx = this.mulSA(xc);
    this.s = new Float64Array(nc);
    let kbx = 0, xSx = 0;
    for (let i = 0; i < n; i++) kbx += this.kb[i] * this.xk[i];
    for (let p = 0; p < nc; p++) { this.s[p] = k[this.cFree[p]] + Sx[p]; xSx += xc[p] * Sx[p]; }
    this.kll = kappa - (kbx - xSx);
  }

  /**
   * The condensation of sys, or null where it does not apply: no face pairs, a face dof driven
   * or slaved (its force would reach the machine), too many face dofs, or a bulk that is not
   * held once the faces are (the full Newton then reports it).
   */
  static build(sys: System): Condensation | null {
    const P = sys.pairs, np = P.plus.length;
    if (np === 0) return null;
    const held = new Uint8Array(sys.nDof);
    for (const d of sys.driven.fixed) held[d] = 1;
    for (let p = 0; p < np; p++) for (const v of [P.plus[p], P.minus[p]]) for (let c = 0; c < 2; c++) {
      const d = 2 * v + c;
      if (sys.freeOf[d] < 0 && !held[d]) return null;
    }
    const sym = sys.sym, n = sys.nFree;
    let first = n;
    for (let p = 0; p < np; p++) for (const v of [P.plus[p], P.minus[p]]) for (let c = 0; c < 2; c++) {
      const fi = sys.freeOf[2 * v + c];
      if (fi >= 0) first = Math.min(first, sym.iperm[fi]);
    }
    if (first >= n || n - first > MAX_CONDENSED) return null;
    // the bulk's free–free stiffness, with α added on the trailing diagonal so that it is
    // positive definite even where the faces alone join the pieces of the specimen
    const K = sys.stiffnessOfBulk();
    const inTrail = new Uint8Array(n);
    for (let q = first; q < n; q++) inTrail[sym.perm[q]] = 1;
    let alpha = 0;
    const diag: number[] = [];
    for (let i = 0; i < n; i++) {
      if (!inTrail[i]) continue;
      for (let q = K.rowPtr[i]; q < K.rowPtr[i + 1]; q++) if (K.colIdx[q] === i) { diag.push(q); alpha = Math.max(alpha, K.values[q]); }
    }
    if (!(alpha > 0)) return null;
    for (const q of diag) K.values[q] += alpha;
    let F: Factor;
    try { F = factorize(K, sym); } catch (e) {
      if (e instanceof SingularMatrixError) return null;
      throw e;
    }
    return new Condensation(sys, F, first, alpha);
  }

  /** The condensed unknowns of a free vector. */
  gatherC(uf: Float64Array, out = new Float64Array(this.nc)): Float64Array {
    for (let p = 0; p < this.nc; p++) out[p] = uf[this.cFree[p]];
    return out;
  }

  private mulSA(x: Float64Array): Float64Array {
    const nc = this.nc, y = new Float64Array(nc), S = this.SA;
    for (let i = 0; i < nc; i++) { let t = 0; const o = i * nc; for (let j = 0; j < nc; j++) t += S[o + j] * x[j]; y[i] = t; }
    return y;
  }

  /** A gauge with gradient gf (free unknowns) and gl (λ) as it reads on the condensed unknowns; once per topology and name. */
  gauge(name: string, gf: Float64Array, gl: number): CondensedGauge {
    const known = this.gauges.get(name);
    if (known) return known;
    const nc = this.nc, gc = this.gatherC(gf), gb = gf.slice();
    for (let p = 0; p < nc; p++) gb[this.cFree[p]] = 0;
    let any = false;
    for (let i = 0; i < gb.length; i++) if (gb[i] !== 0) { any = true; break; }
    let gl2 = gl;
    if (any) {
      const xg = this.F.solve(gb), Sx = this.mulSA(this.gatherC(xg)), xkc = this.gatherC(this.xk);
      let gbx = 0;
      for (let i = 0; i < gb.length; i++) gbx += gb[i] * this.xk[i];
      gl2 -= gbx;
      for (let p = 0; p < nc; p++) { gc[p] += Sx[p]; gl2 += Sx[p] * xkc[p]; }
    }
    const g = { gc, gl: gl2 };
    this.gauges.set(name, g);
    return g;
  }

  /** The free unknowns in bulk equilibrium with the condensed ones qc at λ (one sparse solve). */
  recover(qc: Float64Array, lambda: number, uf: Float64Array): void {
    const nc = this.nc, rhs = this.rhs, SA = this.SA, kb = this.kb;
    for (let i = 0; i < rhs.length; i++) rhs[i] = -lambda * kb[i];
    for (let p = 0; p < nc; p++) {
      let t = 0;
      const o = p * nc;
      for (let j = 0; j < nc; j++) t += SA[o + j] * qc[j];
      // s − k_c = −K_cb K_bb⁻¹ k_b
      rhs[this.cFree[p]] = t + lambda * (this.s[p] - this.kc[p]);
    }
    this.F.solve(rhs, uf);
    for (let p = 0; p < nc; p++) uf[this.cFree[p]] = qc[p];
  }

  /**
   * Residual on the condensed unknowns at (qc, λ) into r, with the tangent in T when asked
   * (trial histories into kappaTrial). Returns ‖r‖∞ (Infinity when not finite) and the machine force.
   */
  evaluate(qc: Float64Array, lambda: number, coh: CohesiveParams, kappa: Float64Array, kappaTrial: Float64Array,
    tangent: boolean, floor: number, secant: boolean): { rmax: number; F: number } {
    const nc = this.nc, SA = this.SA, al = this.alpha, r = this.r, s = this.s, T = this.T;
    let F = this.kll * lambda;
    for (let i = 0; i < nc; i++) {
      let t = -al * qc[i];
      const o = i * nc;
      for (let j = 0; j < nc; j++) t += SA[o + j] * qc[j];
      r[i] = t + lambda * s[i];
      F += s[i] * qc[i];
    }
    if (tangent) {
      T.set(SA);
      for (let i = 0; i < nc; i++) T[i * nc + i] -= al;
    }
    const sys = this.sys, pos = this.pairPos, np = pos.length >> 2, M = sys.m4;
    const at = (k: number) => (k >= 0 ? qc[k] : 0);
    for (let p = 0; p < np; p++) {
      const o = 4 * p, p0 = pos[o], p1 = pos[o + 1], p2 = pos[o + 2], p3 = pos[o + 3];
      const fx = sys.pairResponse(p, at(p0) - at(p2), at(p1) - at(p3), coh, kappa, kappaTrial, tangent, floor, secant);
      const fy = sys.pairFy;
      if (p0 >= 0) r[p0] += fx;
      if (p1 >= 0) r[p1] += fy;
      if (p2 >= 0) r[p2] -= fx;
      if (p3 >= 0) r[p3] -= fy;
      if (!tangent) continue;
      for (let i = 0; i < 4; i++) {
        const pi = pos[o + i];
        if (pi < 0) continue;
        for (let j = 0; j < 4; j++) {
          const pj = pos[o + j];
          if (pj < 0) continue;
          const sgn = (i < 2) === (j < 2) ? 1 : -1;
          T[pi * nc + pj] += sgn * M[2 * (i & 1) + (j & 1)];
        }
      }
    }
    let rmax = 0;
    for (let i = 0; i < nc; i++) { const av = Math.abs(r[i]); if (av > rmax || av !== av) rmax = av !== av ? Infinity : av; }
    return { rmax, F };
  }

  /** LDLᵀ of T in place (lower triangle, row-major; D in d), no pivoting; throws on a zero pivot. */
  factorT(): void {
    const n = this.nc, T = this.T, d = this.d, w = this.wk;
    let maxDiag = 0;
    for (let i = 0; i < n; i++) maxDiag = Math.max(maxDiag, Math.abs(T[i * n + i]));
    const tiny = 1e-12 * maxDiag;
    for (let j = 0; j < n; j++) {
      const oj = j * n;
      let dj = T[oj + j];
      for (let k = 0; k < j; k++) { w[k] = T[oj + k] * d[k]; dj -= T[oj + k] * w[k]; }
      if (!(Math.abs(dj) > tiny)) {
        throw new SingularMatrixError(`the condensed tangent is singular at unknown ${this.cFree[j]}: pivot ${dj}`, this.cFree[j]);
      }
      d[j] = dj;
      const inv = 1 / dj;
      for (let i = j + 1; i < n; i++) {
        const oi = i * n;
        let t = T[oi + j];
        for (let k = 0; k < j; k++) t -= T[oi + k] * w[k];
        T[oi + j] = t * inv;
      }
    }
  }

  /** x = T⁻¹ x in place with the factor of factorT. */
  solveT(x: Float64Array): void {
    const n = this.nc, T = this.T, d = this.d;
    for (let i = 0; i < n; i++) {
      const oi = i * n;
      let t = x[i];
      for (let k = 0; k < i; k++) t -= T[oi + k] * x[k];
      x[i] = t;
    }
    for (let i = 0; i < n; i++) x[i] /= d[i];
    for (let i = n - 1; i > 0; i--) {
      const oi = i * n, xi = x[i];
      for (let k = 0; k < i; k++) x[k] -= T[oi + k] * xi;
    }
  }
}
