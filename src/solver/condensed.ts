// The bulk is linear elastic and only the face pairs are not, so once per topology the bulk
// stiffness is condensed onto the openings of the pairs and Newton iterates on those alone: an
// iteration costs a dense LDLᵀ of order 2 × pairs, not full-size solves.
//
// First level, the free dofs q = (q_b, q_c) with c the faces' free dofs (k: the bulk's coupling
// with the load factor λ, κ = zᵀKz with z the load pattern):
//   q_b = −K_bb⁻¹ (K_bc q_c + λ k_b)                 (bulk equilibrium, exact)
//   r_c = S q_c + λ s + f_coh(q_c),  S = K_cc − K_cb K_bb⁻¹ K_bc,  s = k_c − K_cb K_bb⁻¹ k_b
//   F   = s·q_c + κ̂ λ,  κ̂ = κ − k_bᵀ K_bb⁻¹ k_b       (machine force)
// A gauge G·q + g_λ λ reads ĝ·q_c + ĝ_λ λ in the same way. S comes out of one sparse LDLᵀ of
// K + αI_cc with the face dofs eliminated last: its trailing block L_cc D L_ccᵀ is S + αI.
// Second level, the same algebra once more in the coordinates y = (j, m) of each pair's two
// faces: the jump j = u⁺ − u⁻ and the mean m = (u⁺ + u⁻)/2. The cohesive force acts on j
// alone (on j it is just the pair's force, its tangent the pair's 2×2 block), so the means,
// which S holds together as the uncracked body would, are condensed out too.
import { factorize, matVec, trailingSchur, type Factor } from '../linalg/index.js';
import type { CohesiveParams } from '../cohesive/interface.js';
import { SingularMatrixError } from '../errors.js';
import type { System } from './system.js';

/** Largest count of face dofs condensed (dense storage, and the means' LDLᵀ once per topology). */
export const MAX_CONDENSED = 1200;

/** A gauge as it reads on the jumps. */
export interface CondensedGauge { gc: Float64Array; gl: number }

/** LDLᵀ in place of the dense n×n row-major A (lower triangle; D into d), no pivoting. Returns the first zero pivot, or −1. */
function ldltDense(A: Float64Array, n: number, d: Float64Array, w: Float64Array): number {
  let maxDiag = 0;
  for (let i = 0; i < n; i++) maxDiag = Math.max(maxDiag, Math.abs(A[i * n + i]));
  const tiny = 1e-12 * maxDiag;
  for (let j = 0; j < n; j++) {
    const oj = j * n;
    let dj = A[oj + j];
    for (let k = 0; k < j; k++) { w[k] = A[oj + k] * d[k]; dj -= A[oj + k] * w[k]; }
    if (!(Math.abs(dj) > tiny)) return j;
    d[j] = dj;
    const inv = 1 / dj;
    for (let i = j + 1; i < n; i++) {
      const oi = i * n;
      let t = A[oi + j];
      for (let k = 0; k < j; k++) t -= A[oi + k] * w[k];
      A[oi + j] = t * inv;
    }
  }
  return -1;
}

/** x = A⁻¹ x in place with the factor of ldltDense. */
function solveDense(A: Float64Array, n: number, d: Float64Array, x: Float64Array): void {
  for (let i = 0; i < n; i++) {
    const oi = i * n;
    let t = x[i];
    for (let k = 0; k < i; k++) t -= A[oi + k] * x[k];
    x[i] = t;
  }
  for (let i = 0; i < n; i++) x[i] /= d[i];
  for (let i = n - 1; i > 0; i--) {
    const oi = i * n, xi = x[i];
    for (let k = 0; k < i; k++) x[k] -= A[oi + k] * xi;
  }
}

export class Condensation {
  /** Newton unknowns: the jumps (x and y of each pair, where a face dof is free). */
  readonly nc: number;
  /** Jump index of each pair's x and y (−1 when both faces are held). */
  readonly jumpOf: Int32Array;
  /** The bulk condensed onto the jumps (dense, row-major), the λ coupling s and κ̂. */
  readonly SN: Float64Array;
  readonly s: Float64Array;
  readonly kll: number;
  /** Scratch: tangent and its factor, residual, steps, trial, pivots. */
  readonly T: Float64Array; readonly r: Float64Array; readonly a: Float64Array; readonly b: Float64Array;
  readonly qTry: Float64Array; readonly d: Float64Array;
  private readonly wk: Float64Array;
  /** Face dofs (free index, elimination order) and their count. */
  private readonly cFree: Int32Array;
  private readonly n1: number;
  /** y → q_c: face dof i is ePlus[i]·j + m (its jump eJ[i] with factor eW[i], its mean eM[i], −1 for none). */
  private readonly eJ: Int32Array; private readonly eW: Float64Array; private readonly eM: Int32Array;
  private readonly nM: number;
  /** First level: S + αI, α, s, k_b (zero on c), k_c, K⁻¹[k_b; 0]. */
  private readonly SA: Float64Array; private readonly alpha: number;
  private readonly s1: Float64Array; private readonly kb: Float64Array; private readonly kc: Float64Array; private readonly xk: Float64Array;
  /** Second level: the means' factor, X = S_MM⁻¹ S_MJ (nM × nc), zM = S_MM⁻¹ s_M. */
  private readonly SMM: Float64Array; private readonly dM: Float64Array;
  private readonly X: Float64Array; private readonly zM: Float64Array;
  private readonly rhs: Float64Array;
  /** The face dofs of a recovered state (scratch). */
  private readonly qcWork: Float64Array;
  private readonly gauges = new Map<string, CondensedGauge>();

  private constructor(private readonly sys: System, private readonly F: Factor, first: number, alpha: number,
    lay: { jumpOf: Int32Array; eJ: Int32Array; eW: Float64Array; eM: Int32Array; nJ: number; nM: number }) {
    const n = sys.nFree, n1 = n - first;
    this.n1 = n1; this.alpha = alpha;
    this.cFree = sys.sym.perm.slice(first);
    this.jumpOf = lay.jumpOf; this.eJ = lay.eJ; this.eW = lay.eW; this.eM = lay.eM;
    const nJ = lay.nJ, nM = lay.nM;
    this.nc = nJ; this.nM = nM;
    this.SA = new Float64Array(n1 * n1);
    trailingSchur(F, first, this.SA);
    // the bulk's coupling with λ: k = Tᵀ K z on the unknowns, κ = zᵀ K z
    const u = new Float64Array(sys.nDof), f = new Float64Array(sys.nDof), k = new Float64Array(n);
    sys.expand(new Float64Array(n), 1, u);
    matVec(sys.kBulk, u, f);
    sys.restrict(f, k);
    const kappa = sys.loadForce(f);
    this.kb = k.slice();
    for (let p = 0; p < n1; p++) this.kb[this.cFree[p]] = 0;
    this.kc = this.gatherFaces(k);
    this.xk = F.solve(this.kb);
    const xc = this.gatherFaces(this.xk), Sx = this.mulSA(xc);
    this.s1 = new Float64Array(n1);
    let kbx = 0, xSx = 0;
    for (let i = 0; i < n; i++) kbx += this.kb[i] * this.xk[i];
    for (let p = 0; p < n1; p++) { this.s1[p] = this.kc[p] + Sx[p]; xSx += xc[p] * Sx[p]; }
    let kll = kappa - (kbx - xSx);
    // second level: S_y = Eᵀ S E in the jump and mean coordinates (jumps first)
    const ny = nJ + nM, Sy = new Float64Array(ny * ny), W = new Float64Array(n1 * ny);
    const SA = this.SA;
    for (let i = 0; i < n1; i++) {
      const ji = this.eJ[i], mi = this.eM[i], wi = this.eW[i];
      for (let r = 0; r < n1; r++) {
        const v = r === i ? SA[r * n1 + i] - alpha : SA[r * n1 + i];
        if (ji >= 0) W[r * ny + ji] += wi * v;
        if (mi >= 0) W[r * ny + nJ + mi] += v;
      }
    }
    for (let r = 0; r < n1; r++) {
      const jr = this.eJ[r], mr = this.eM[r], wr = this.eW[r];
      for (let c = 0; c < ny; c++) {
        const v = W[r * ny + c];
        if (jr >= 0) Sy[jr * ny + c] += wr * v;
        if (mr >= 0) Sy[(nJ + mr) * ny + c] += v;
      }
    }
    const sy = this.toY(this.s1);
    this.SMM = new Float64Array(nM * nM); this.dM = new Float64Array(nM);
    for (let i = 0; i < nM; i++) for (let j = 0; j < nM; j++) this.SMM[i * nM + j] = Sy[(nJ + i) * ny + nJ + j];
    this.wk = new Float64Array(Math.max(nJ, nM));
    if (ldltDense(this.SMM, nM, this.dM, this.wk) >= 0) throw new SingularMatrixError('the faces held together do not hold the specimen', 0);
    // X = S_MM⁻¹ S_MJ, column by column
    this.X = new Float64Array(nM * nJ);
    const col = new Float64Array(nM);
    for (let j = 0; j < nJ; j++) {
      for (let i = 0; i < nM; i++) col[i] = Sy[(nJ + i) * ny + j];
      solveDense(this.SMM, nM, this.dM, col);
      for (let i = 0; i < nM; i++) this.X[i * nJ + j] = col[i];
    }
    this.zM = sy.slice(nJ);
    solveDense(this.SMM, nM, this.dM, this.zM);
    // S_N = S_JJ − S_JM X,  s_N = s_J − Xᵀ s_M,  κ_N = κ − s_M·zM
    this.SN = new Float64Array(nJ * nJ);
    this.s = new Float64Array(nJ);
    for (let i = 0; i < nJ; i++) {
      for (let j = 0; j < nJ; j++) {
        let t = Sy[i * ny + j];
        for (let m = 0; m < nM; m++) t -= Sy[i * ny + nJ + m] * this.X[m * nJ + j];
        this.SN[i * nJ + j] = t;
      }
      let t = sy[i];
      for (let m = 0; m < nM; m++) t -= this.X[m * nJ + i] * sy[nJ + m];
      this.s[i] = t;
    }
    for (let m = 0; m < nM; m++) kll -= sy[nJ + m] * this.zM[m];
    this.kll = kll;
    this.T = new Float64Array(nJ * nJ);
    this.r = new Float64Array(nJ); this.a = new Float64Array(nJ); this.b = new Float64Array(nJ);
    this.qTry = new Float64Array(nJ); this.d = new Float64Array(nJ);
    this.rhs = new Float64Array(n);
    this.qcWork = new Float64Array(n1);
  }

  /**
   * The condensation of sys, or null where it does not apply: no face pairs, a face dof driven
   * or slaved (its force would reach the machine) while the other face of its pair is not
   * driven alike, a face dof shared by two pairs, too many face dofs, or a bulk that is not held
   * once the faces are (the full Newton then reports it). A pair whose two faces are driven
   * alike (a crack run through to a load point and its twin) has a jump of zero there, and its
   * forces on the two faces cancel in the machine force, so it counts as held.
   */
  static build(sys: System): Condensation | null {
    const P = sys.pairs, np = P.plus.length;
    if (np === 0) return null;
    const held = new Uint8Array(sys.nDof);
    for (const d of sys.driven.fixed) held[d] = 1;
    for (let p = 0; p < np; p++) for (let c = 0; c < 2; c++) {
      const a = 2 * P.plus[p] + c, b = 2 * P.minus[p] + c;
      if (sys.boundAlike(a, b)) held[a] = held[b] = 1;
    }
    const sym = sys.sym, n = sys.nFree;
    let first = n;
    for (let p = 0; p < np; p++) for (const v of [P.plus[p], P.minus[p]]) for (let c = 0; c < 2; c++) {
      const d = 2 * v + c, fi = sys.freeOf[d];
      if (fi < 0 && !held[d]) return null;
      if (fi >= 0) first = Math.min(first, sym.iperm[fi]);
    }
    const n1 = n - first;
    if (n1 <= 0 || n1 > MAX_CONDENSED) return null;
    // coordinates: a jump for each pair's x and y where a face dof is free, and a mean for each
    // group of face dofs the pairs link (two faces: the jump splits half and half about their
    // mean; a dof shared by several pairs where cracks join: it is the mean, and the others lie
    // one jump from it). Groups of other shapes, and a shared dof with a held partner, do not apply.
    const posOf = new Int32Array(n).fill(-1);
    for (let q = first; q < n; q++) posOf[sym.perm[q]] = q - first;
    const ends = (p: number, c: number): [number, number] => {
      const fp = sys.freeOf[2 * P.plus[p] + c], fm = sys.freeOf[2 * P.minus[p] + c];
      return [fp >= 0 ? posOf[fp] : -1, fm >= 0 ? posOf[fm] : -1];
    };
    const deg = new Int32Array(n1), half = new Int32Array(n1), root = new Int32Array(n1);
    for (let i = 0; i < n1; i++) root[i] = i;
    const find = (i: number): number => { while (root[i] !== i) i = root[i] = root[root[i]]; return i; };
    for (let p = 0; p < np; p++) for (let c = 0; c < 2; c++) {
      const [ip, im] = ends(p, c);
      if (ip >= 0 && im >= 0) { deg[ip]++; deg[im]++; root[find(ip)] = find(im); } else if (ip >= 0) half[ip]++; else if (im >= 0) half[im]++;
    }
    // each group: its dofs, links and the dof every link touches (its centre when it has more than one link)
    const gDofs = new Int32Array(n1), gLinks = new Int32Array(n1), centre = new Int32Array(n1).fill(-1);
    for (let i = 0; i < n1; i++) {
      if (half[i] > 1 || (half[i] > 0 && deg[i] > 0)) return null;
      if (deg[i] > 0) { const r = find(i); gDofs[r]++; gLinks[r] += deg[i]; }
    }
    for (let i = 0; i < n1; i++) {
      if (deg[i] === 0) continue;
      const r = find(i), links = gLinks[r] / 2;
      if (links !== gDofs[r] - 1) return null;
      if (links > 1 && deg[i] === links) centre[r] = i;
    }
    for (let i = 0; i < n1; i++) if (deg[i] > 0 && gDofs[find(i)] > 2 && centre[find(i)] < 0) return null;
    const jumpOf = new Int32Array(2 * np).fill(-1), eJ = new Int32Array(n1).fill(-1), eM = new Int32Array(n1).fill(-1), eW = new Float64Array(n1);
    const meanOf = new Int32Array(n1).fill(-1);
    let nJ = 0, nM = 0;
    for (let p = 0; p < np; p++) for (let c = 0; c < 2; c++) {
      const [ip, im] = ends(p, c);
      if (ip < 0 && im < 0) continue;
      const j = nJ++;
      jumpOf[2 * p + c] = j;
      if (ip >= 0 && im >= 0) {
        const r = find(ip);
        const m = meanOf[r] >= 0 ? meanOf[r] : (meanOf[r] = nM++);
        const o = centre[r];
        if (o < 0) {
          eJ[ip] = j; eW[ip] = 0.5; eM[ip] = m;
          eJ[im] = j; eW[im] = -0.5; eM[im] = m;
        } else {
          // u⁺ − u⁻ = j with the centre at the mean
          eM[o] = m;
          if (ip === o) { eJ[im] = j; eW[im] = -1; eM[im] = m; } else { eJ[ip] = j; eW[ip] = 1; eM[ip] = m; }
        }
      } else if (ip >= 0) { eJ[ip] = j; eW[ip] = 1; } else { eJ[im] = j; eW[im] = -1; }
    }
    // trailing dofs of no face (the ordering may put some there) are means of their own
    for (let i = 0; i < n1; i++) if (eJ[i] < 0 && eM[i] < 0) eM[i] = nM++;
    // the bulk's free–free stiffness, with α added on the trailing diagonal so that it is
    // positive definite even where the faces alone join the pieces of the specimen
    const K = sys.stiffnessOfBulk();
    let alpha = 0;
    const diag: number[] = [];
    for (let q = first; q < n; q++) {
      const i = sym.perm[q];
      for (let t = K.rowPtr[i]; t < K.rowPtr[i + 1]; t++) if (K.colIdx[t] === i) { diag.push(t); alpha = Math.max(alpha, K.values[t]); }
    }
    if (!(alpha > 0)) return null;
    for (const t of diag) K.values[t] += alpha;
    try {
      return new Condensation(sys, factorize(K, sym), first, alpha, { jumpOf, eJ, eW, eM, nJ, nM });
    } catch (e) {
      if (e instanceof SingularMatrixError) return null;
      throw e;
    }
  }

  /** Face dofs of a free vector (elimination order). */
  private gatherFaces(uf: Float64Array): Float64Array {
    const out = new Float64Array(this.n1);
    for (let p = 0; p < this.n1; p++) out[p] = uf[this.cFree[p]];
    return out;
  }

  /** Eᵀ v: a vector on the face dofs in the jump and mean coordinates. */
  private toY(v: Float64Array): Float64Array {
    const y = new Float64Array(this.nc + this.nM);
    for (let i = 0; i < this.n1; i++) {
      if (this.eJ[i] >= 0) y[this.eJ[i]] += this.eW[i] * v[i];
      if (this.eM[i] >= 0) y[this.nc + this.eM[i]] += v[i];
    }
    return y;
  }

  private mulSA(x: Float64Array): Float64Array {
    const n1 = this.n1, y = new Float64Array(n1), S = this.SA;
    for (let i = 0; i < n1; i++) { let t = 0; const o = i * n1; for (let j = 0; j < n1; j++) t += S[o + j] * x[j]; y[i] = t; }
    return y;
  }

  /** The jumps of a free vector. */
  gatherC(uf: Float64Array, out = new Float64Array(this.nc)): Float64Array {
    // j = u⁺ − u⁻ (a held face counts as zero)
    const P = this.sys.pairs, fo = this.sys.freeOf, J = this.jumpOf;
    for (let p = 0; p < P.plus.length; p++) for (let c = 0; c < 2; c++) {
      const j = J[2 * p + c];
      if (j < 0) continue;
      const fp = fo[2 * P.plus[p] + c], fm = fo[2 * P.minus[p] + c];
      out[j] = (fp >= 0 ? uf[fp] : 0) - (fm >= 0 ? uf[fm] : 0);
    }
    return out;
  }

  /**
   * A gauge as it reads on the jumps, once per topology and name: grad fills gf with its
   * gradient on the free unknowns and returns the one on λ (called only the first time).
   */
  gauge(name: string, gf: Float64Array, grad: (gf: Float64Array) => number): CondensedGauge {
    const known = this.gauges.get(name);
    if (known) return known;
    const gl = grad(gf);
    const n1 = this.n1, nJ = this.nc, nM = this.nM, g1 = this.gatherFaces(gf), gb = gf.slice();
    for (let p = 0; p < n1; p++) gb[this.cFree[p]] = 0;
    let any = false;
    for (let i = 0; i < gb.length; i++) if (gb[i] !== 0) { any = true; break; }
    let gl1 = gl;
    if (any) {
      const xg = this.F.solve(gb), Sx = this.mulSA(this.gatherFaces(xg)), xkc = this.gatherFaces(this.xk);
      let gbx = 0;
      for (let i = 0; i < gb.length; i++) gbx += gb[i] * this.xk[i];
      gl1 -= gbx;
      for (let p = 0; p < n1; p++) { g1[p] += Sx[p]; gl1 += Sx[p] * xkc[p]; }
    }
    // second level: ĝ_N = ĝ_J − Xᵀ ĝ_M, ĝ_λ − zM·ĝ_M
    const gy = this.toY(g1), gc = gy.slice(0, nJ);
    for (let m = 0; m < nM; m++) {
      const gm = gy[nJ + m];
      if (gm === 0) continue;
      for (let j = 0; j < nJ; j++) gc[j] -= this.X[m * nJ + j] * gm;
      gl1 -= this.zM[m] * gm;
    }
    const g = { gc, gl: gl1 };
    this.gauges.set(name, g);
    return g;
  }

  /** The free unknowns in bulk equilibrium with the jumps yJ at λ (one sparse solve). */
  recover(yJ: Float64Array, lambda: number, uf: Float64Array): void {
    const n1 = this.n1, nJ = this.nc, rhs = this.rhs, SA = this.SA, kb = this.kb;
    // means: m = −X j − λ zM; faces: q_c = E y
    const qc = this.qcWork;
    for (let i = 0; i < n1; i++) {
      let v = 0;
      if (this.eJ[i] >= 0) v += this.eW[i] * yJ[this.eJ[i]];
      const m = this.eM[i];
      if (m >= 0) {
        let t = -lambda * this.zM[m];
        for (let j = 0; j < nJ; j++) t -= this.X[m * nJ + j] * yJ[j];
        v += t;
      }
      qc[i] = v;
    }
    for (let i = 0; i < rhs.length; i++) rhs[i] = -lambda * kb[i];
    for (let p = 0; p < n1; p++) {
      let t = 0;
      const o = p * n1;
      for (let j = 0; j < n1; j++) t += SA[o + j] * qc[j];
      // s − k_c = −K_cb K_bb⁻¹ k_b
      rhs[this.cFree[p]] = t + lambda * (this.s1[p] - this.kc[p]);
    }
    this.F.solve(rhs, uf);
    for (let p = 0; p < n1; p++) uf[this.cFree[p]] = qc[p];
  }

  /**
   * Residual on the jumps at (y, λ) into r, with the tangent in T when asked (trial histories
   * into kappaTrial). Returns ‖r‖∞ (Infinity when not finite) and the machine force.
   */
  evaluate(y: Float64Array, lambda: number, coh: CohesiveParams, kappa: Float64Array, kappaTrial: Float64Array,
    tangent: boolean, floor: number, secant: boolean): { rmax: number; F: number } {
    const nc = this.nc, SN = this.SN, r = this.r, s = this.s, T = this.T;
    let F = this.kll * lambda;
    for (let i = 0; i < nc; i++) {
      let t = 0;
      const o = i * nc;
      for (let j = 0; j < nc; j++) t += SN[o + j] * y[j];
      r[i] = t + lambda * s[i];
      F += s[i] * y[i];
    }
    if (tangent) T.set(SN);
    // on a jump the pair's force and its 2×2 tangent enter as they are
    const sys = this.sys, J = this.jumpOf, np = J.length >> 1, M = sys.m4;
    for (let p = 0; p < np; p++) {
      const jx = J[2 * p], jy = J[2 * p + 1];
      if (jx < 0 && jy < 0) continue;
      const fx = sys.pairResponse(p, jx >= 0 ? y[jx] : 0, jy >= 0 ? y[jy] : 0, coh, kappa, kappaTrial, tangent, floor, secant);
      const fy = sys.pairFy;
      if (jx >= 0) r[jx] += fx;
      if (jy >= 0) r[jy] += fy;
      if (!tangent) continue;
      if (jx >= 0) { T[jx * nc + jx] += M[0]; if (jy >= 0) T[jx * nc + jy] += M[1]; }
      if (jy >= 0) { T[jy * nc + jy] += M[3]; if (jx >= 0) T[jy * nc + jx] += M[2]; }
    }
    let rmax = 0;
    for (let i = 0; i < nc; i++) { const av = Math.abs(r[i]); if (av > rmax || av !== av) rmax = av !== av ? Infinity : av; }
    return { rmax, F };
  }

  /** LDLᵀ of the tangent T in place; throws on a zero pivot. */
  factorT(): void {
    const j = ldltDense(this.T, this.nc, this.d, this.wk);
    if (j >= 0) throw new SingularMatrixError(`the condensed tangent is singular at jump ${j}`, this.faceOfJump(j));
  }

  /** A free index on the faces of jump j (for the message). */
  private faceOfJump(j: number): number {
    for (let i = 0; i < this.n1; i++) if (this.eJ[i] === j) return this.cFree[i];
    return -1;
  }

  /** x = T⁻¹ x in place with the factor of factorT. */
  solveT(x: Float64Array): void { solveDense(this.T, this.nc, this.d, x); }
}
