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
// Where pairs link more than two faces (cracks that join) the jumps are those of a spanning
// tree of the linked faces, and a pair off the tree opens by B·j, a signed sum of them: its
// force enters as Bᵀf, its tangent as Bᵀ M B.
// A face that is not an unknown (held, driven, or a rig's point that follows λ and its masters
// as a rocker's strip does) moves by b = λ·z + Σ w·q_M, so the free face paired with it is
// q = b + j: the map y → q_c is affine, q_c = E y + λ h, with the masters (ordered last) as
// means of their own. On y the bulk then reads S_y = Eᵀ S E, s_y = Eᵀ(s + S h) and
// κ_y = κ + 2 s·h + hᵀ S h; the jump stays the pair's own, so the cohesive force is unchanged.
import { factorize, matVec, trailingSchur, type Factor } from '../linalg/index.js';
import type { CohesiveParams } from '../cohesive/interface.js';
import { SingularMatrixError } from '../errors.js';
import type { System } from './system.js';

/** Largest count of face dofs condensed (dense storage, and the means' LDLᵀ once per topology). */
export const MAX_CONDENSED = 1200;

/** A face that is not an unknown and moves: λ·z + Σ w·q over free unknowns q. */
interface Bound { z: number; free: Int32Array; w: Float64Array }

/** The coordinates of the trailing block (see the fields of Condensation). */
interface Layout {
  jumpOf: Int32Array; ePtr: Int32Array; eY: Int32Array; eW: Float64Array; h: Float64Array | null;
  bPtr: Int32Array; bJ: Int32Array; bW: Float64Array;
  tChild: Int32Array; tSign: Float64Array; tPtr: Int32Array; tIdx: Int32Array; tW: Float64Array; tBeta: Float64Array | null;
  bound: Map<number, Bound>; nJ: number; nM: number;
}

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
  /** Jump index of each pair's x and y where the pair is on its group's tree (else −1). */
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
  /** y → q_c: trailing dof i is Σ eW[t]·y[eY[t]] over t in ePtr[i]..ePtr[i+1] (jumps first, then means at nc + m) plus λ·h[i] (h null: all zero). */
  private readonly ePtr: Int32Array; private readonly eY: Int32Array; private readonly eW: Float64Array; private readonly h: Float64Array | null;
  /** Each pair's x or y jump on the jumps: Σ bW[t]·j[bJ[t]] over t in bPtr[2p+c]..; simple[p] when both are a tree jump or zero. */
  private readonly bPtr: Int32Array; private readonly bJ: Int32Array; private readonly bW: Float64Array;
  private readonly simple: Uint8Array;
  /**
   * Each jump's tree pair: the face dof beyond it and its sign; the trailing dofs the face before
   * it moves with (tIdx, tW over tPtr[j]..tPtr[j+1]: that face itself, or a bound face's masters);
   * the jump's change with λ at fixed unknowns (null: none); face residual scratch.
   */
  private readonly tChild: Int32Array; private readonly tSign: Float64Array;
  private readonly tPtr: Int32Array; private readonly tIdx: Int32Array; private readonly tW: Float64Array;
  private readonly tBeta: Float64Array | null;
  private readonly rFace: Float64Array;
  /** Faces that are not unknowns and move: full dof → λ-coefficient and (free index, weight) terms. */
  private readonly bound: Map<number, Bound>;
  private readonly nM: number;
  /** First level: S + αI, α, s, k_b (zero on c), k_c, K⁻¹[k_b; 0]. */
  private readonly SA: Float64Array; private readonly alpha: number;
  private readonly s1: Float64Array; private readonly kb: Float64Array; private readonly kc: Float64Array; private readonly xk: Float64Array;
  /** Second level: the means' factor, X = S_MM⁻¹ S_MJ (nM × nc), zM = S_MM⁻¹ s_M; the means of a recovered state (scratch). */
  private readonly SMM: Float64Array; private readonly dM: Float64Array;
  private readonly X: Float64Array; private readonly zM: Float64Array; private readonly mWork: Float64Array;
  private readonly rhs: Float64Array;
  /** The face dofs of a recovered state (scratch). */
  private readonly qcWork: Float64Array;
  private readonly gauges = new Map<string, CondensedGauge>();

  private constructor(private readonly sys: System, private readonly F: Factor, first: number, alpha: number,
    lay: Layout) {
    const n = sys.nFree, n1 = n - first;
    this.n1 = n1; this.alpha = alpha;
    this.cFree = sys.sym.perm.slice(first);
    this.jumpOf = lay.jumpOf; this.ePtr = lay.ePtr; this.eY = lay.eY; this.eW = lay.eW; this.h = lay.h;
    this.bPtr = lay.bPtr; this.bJ = lay.bJ; this.bW = lay.bW;
    this.tChild = lay.tChild; this.tSign = lay.tSign; this.tPtr = lay.tPtr; this.tIdx = lay.tIdx; this.tW = lay.tW;
    this.tBeta = lay.tBeta; this.bound = lay.bound; this.rFace = new Float64Array(n1);
    this.simple = new Uint8Array(lay.jumpOf.length >> 1);
    for (let p = 0; p < this.simple.length; p++) {
      let ok = 1;
      for (let e = 2 * p; e < 2 * p + 2; e++) if (lay.bPtr[e + 1] > lay.bPtr[e] && lay.jumpOf[e] < 0) ok = 0;
      this.simple[p] = ok;
    }
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
    const eP = this.ePtr, eY = this.eY, eW = this.eW;
    for (let i = 0; i < n1; i++) {
      for (let r = 0; r < n1; r++) {
        const v = r === i ? SA[r * n1 + i] - alpha : SA[r * n1 + i];
        for (let t = eP[i]; t < eP[i + 1]; t++) W[r * ny + eY[t]] += eW[t] * v;
      }
    }
    for (let r = 0; r < n1; r++) {
      for (let c = 0; c < ny; c++) {
        const v = W[r * ny + c];
        for (let t = eP[r]; t < eP[r + 1]; t++) Sy[eY[t] * ny + c] += eW[t] * v;
      }
    }
    // the bound faces' λ-part: s_y = Eᵀ(s + S h), κ_y = κ + 2 s·h + hᵀ S h
    let s1h = this.s1;
    const h = this.h;
    if (h) {
      const Sh = this.mulSA(h);
      s1h = new Float64Array(n1);
      let sh = 0, hSh = 0;
      for (let p = 0; p < n1; p++) { Sh[p] -= alpha * h[p]; s1h[p] = this.s1[p] + Sh[p]; sh += this.s1[p] * h[p]; hSh += h[p] * Sh[p]; }
      kll += 2 * sh + hSh;
    }
    const sy = this.toY(s1h);
    this.SMM = new Float64Array(nM * nM); this.dM = new Float64Array(nM);
    for (let i = 0; i < nM; i++) for (let j = 0; j < nM; j++) this.SMM[i * nM + j] = Sy[(nJ + i) * ny + nJ + j];
    this.wk = new Float64Array(Math.max(nJ, nM));
    if (ldltDense(this.SMM, nM, this.dM, this.wk) >= 0) throw new SingularMatrixError('the faces held together do not hold the specimen', 0);
    // X = S_MM⁻¹ S_MJ, all columns at once (row by row, so that the inner loops run along
    // rows; each entry meets the same operations in the same order as a column's solveDense)
    const X = this.X = new Float64Array(nM * nJ), A = this.SMM;
    for (let i = 0; i < nM; i++) X.set(Sy.subarray((nJ + i) * ny, (nJ + i) * ny + nJ), i * nJ);
    for (let i = 0; i < nM; i++) {
      const oi = i * nJ;
      for (let k = 0; k < i; k++) { const a = A[i * nM + k], ok = k * nJ; for (let j = 0; j < nJ; j++) X[oi + j] -= a * X[ok + j]; }
    }
    for (let i = 0; i < nM; i++) { const di = this.dM[i], oi = i * nJ; for (let j = 0; j < nJ; j++) X[oi + j] /= di; }
    for (let i = nM - 1; i > 0; i--) {
      const oi = i * nJ;
      for (let k = 0; k < i; k++) { const a = A[i * nM + k], ok = k * nJ; for (let j = 0; j < nJ; j++) X[ok + j] -= a * X[oi + j]; }
    }
    this.zM = sy.slice(nJ);
    solveDense(this.SMM, nM, this.dM, this.zM);
    // S_N = S_JJ − S_JM X,  s_N = s_J − Xᵀ s_M,  κ_N = κ − s_M·zM (row by row, each entry's sum in the order of m)
    this.SN = new Float64Array(nJ * nJ);
    this.s = new Float64Array(nJ);
    for (let i = 0; i < nJ; i++) {
      const oi = i * nJ, SN = this.SN;
      SN.set(Sy.subarray(i * ny, i * ny + nJ), oi);
      for (let m = 0; m < nM; m++) {
        const a = Sy[i * ny + nJ + m], om = m * nJ;
        for (let j = 0; j < nJ; j++) SN[oi + j] -= a * X[om + j];
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
    this.mWork = new Float64Array(nM);
  }

  /**
   * The condensation of sys, or null where it does not apply: no face pairs, a pair whose two
   * faces are both bound (not unknowns) but do not move alike, a bound face whose masters are
   * faces themselves, a cycle of pairs through bound faces that move apart, too many face dofs,
   * or a bulk that is not held once the faces are (the full Newton then reports it). A pair
   * whose two faces move alike (a crack run through to a load point and its twin) has a jump of
   * zero there, and its forces on the two faces cancel in the machine force, so it counts as held.
   */
  static build(sys: System): Condensation | null {
    const P = sys.pairs, np = P.plus.length;
    if (np === 0) return null;
    const sym = sys.sym, n = sys.nFree, fo = sys.freeOf, ne = 2 * np;
    const faceDof = (e: number, plus: boolean): number => 2 * (plus ? P.plus[e >> 1] : P.minus[e >> 1]) + (e & 1);
    // the faces that are not unknowns (as λ·z + Σ w·q), and the trailing block: every free face
    // dof and every master of a bound face (the ordering puts them all last)
    const forms = new Map<number, { z: number; free: number[]; w: number[] }>(), alike = new Uint8Array(ne);
    let first = n;
    for (let e = 0; e < ne; e++) {
      const a = faceDof(e, true), b = faceDof(e, false);
      if (fo[a] < 0 && fo[b] < 0) {
        if (!sys.boundAlike(a, b)) return null;
        alike[e] = 1;
        continue;
      }
      for (const d of [a, b]) {
        if (fo[d] >= 0) { first = Math.min(first, sym.iperm[fo[d]]); continue; }
        if (forms.has(d)) continue;
        const f = sys.boundForm(d);
        forms.set(d, f);
        for (const q of f.free) first = Math.min(first, sym.iperm[q]);
      }
    }
    const n1 = n - first;
    if (n1 <= 0 || n1 > MAX_CONDENSED) return null;
    // coordinates: the face dofs the pairs link, with the bound faces as one node "ground", form
    // groups; each group takes a spanning tree, a jump coordinate for each tree pair and, unless
    // it holds ground, a mean. Two faces split their jump half and half about the mean; in a
    // larger group the root (the dof on most pairs) is the mean and every other dof lies the
    // jumps of its tree path from it; in a grounded group from the bound face its path starts
    // at. A pair off the tree (a cycle, as where a crack joins another's face: the junction dof,
    // its twin and the joining copy pair with each other) opens by the signed sum of the tree
    // jumps round its cycle.
    const posOf = new Int32Array(n).fill(-1);
    for (let q = first; q < n; q++) posOf[sym.perm[q]] = q - first;
    const G = n1;
    const endA = new Int32Array(ne).fill(-1), endB = new Int32Array(ne).fill(-1);
    const deg = new Int32Array(n1 + 1);
    for (let e = 0; e < ne; e++) {
      if (alike[e]) continue;
      const fp = fo[faceDof(e, true)], fm = fo[faceDof(e, false)];
      const a = fp >= 0 ? posOf[fp] : G, b = fm >= 0 ? posOf[fm] : G;
      endA[e] = a; endB[e] = b; deg[a]++; deg[b]++;
    }
    // a bound face moves with its masters, which must be trailing dofs of no face
    for (const f of forms.values()) for (const q of f.free) if (deg[posOf[q]] > 0) return null;
    const adjPtr = new Int32Array(n1 + 2);
    for (let i = 0; i <= n1; i++) adjPtr[i + 1] = adjPtr[i] + deg[i];
    const adj = new Int32Array(adjPtr[n1 + 1]), fill = adjPtr.slice(0, n1 + 1);
    for (let e = 0; e < ne; e++) if (endA[e] >= 0) { adj[fill[endA[e]]++] = e; adj[fill[endB[e]]++] = e; }
    // breadth-first spanning trees, ground's first, then each group from its dof on most pairs
    const comp = new Int32Array(n1 + 1).fill(-1), parentEdge = new Int32Array(n1 + 1).fill(-1);
    const inTree = new Uint8Array(ne), order: number[] = [], compSize: number[] = [], compRoot: number[] = [];
    const grow = (root: number): void => {
      const id = compSize.length, head = order.length;
      comp[root] = id; order.push(root);
      for (let h = head; h < order.length; h++) {
        const i = order[h];
        for (let t = adjPtr[i]; t < adjPtr[i + 1]; t++) {
          const e = adj[t], o = endA[e] === i ? endB[e] : endA[e];
          if (comp[o] >= 0) continue;
          comp[o] = id; parentEdge[o] = e; inTree[e] = 1; order.push(o);
        }
      }
      compSize.push(order.length - head); compRoot.push(root);
    };
    if (deg[G] > 0) grow(G);
    for (;;) {
      let best = -1;
      for (let i = 0; i < n1; i++) if (deg[i] > 0 && comp[i] < 0 && (best < 0 || deg[i] > deg[best])) best = i;
      if (best < 0) break;
      grow(best);
    }
    // jumps in the pairs' order, a group's mean where its first pair is met
    const jumpOf = new Int32Array(ne).fill(-1), meanOfComp = new Int32Array(compSize.length).fill(-1);
    let nJ = 0, nM = 0;
    for (let e = 0; e < ne; e++) {
      if (endA[e] < 0) continue;
      const k = comp[endA[e]];
      if (compRoot[k] !== G && meanOfComp[k] < 0) meanOfComp[k] = nM++;
      if (inTree[e]) jumpOf[e] = nJ++;
    }
    // y → q_c: each face dof's tree path (jump, weight) from its group's root, and the bound
    // face its path starts at in a grounded group (−1: none, or one that does not move)
    const path: { j: number[]; w: number[] }[] = new Array(n1 + 1);
    path[G] = { j: [], w: [] };
    const boundOf = new Int32Array(n1).fill(-1);
    const moving = (d: number): number => { const f = forms.get(d); return f && (f.z !== 0 || f.free.length > 0) ? d : -1; };
    for (const i of order) {
      const e = parentEdge[i];
      if (e < 0) { path[i] = { j: [], w: [] }; continue; }
      const up = endA[e] === i ? endB[e] : endA[e], k = comp[i];
      boundOf[i] = up === G ? moving(faceDof(e, endA[e] === G)) : boundOf[up];
      if (compRoot[k] !== G && compSize[k] === 2) {
        path[i] = { j: [jumpOf[e]], w: [endA[e] === i ? 0.5 : -0.5] };
        path[up] = { j: [jumpOf[e]], w: [endA[e] === i ? -0.5 : 0.5] };
      } else path[i] = { j: [...path[up].j, jumpOf[e]], w: [...path[up].w, endA[e] === i ? 1 : -1] };
    }
    // each pair's jump on the coordinates: u_a − u_b (one tree jump, or its cycle's signed sum;
    // the bound faces at the two ends of a cycle must move alike, else it is not on the jumps alone)
    const bPtr = new Int32Array(ne + 1), bJ: number[] = [], bW: number[] = [], acc = new Float64Array(nJ);
    for (let e = 0; e < ne; e++) {
      if (endA[e] >= 0 && inTree[e]) { bJ.push(jumpOf[e]); bW.push(1); } else if (endA[e] >= 0) {
        const ka = endA[e] === G ? moving(faceDof(e, true)) : boundOf[endA[e]];
        const kb = endB[e] === G ? moving(faceDof(e, false)) : boundOf[endB[e]];
        if (ka !== kb && !(ka >= 0 && kb >= 0 && sys.boundAlike(ka, kb))) return null;
        const pa = path[endA[e]], pb = path[endB[e]];
        for (let t = 0; t < pa.j.length; t++) acc[pa.j[t]] += pa.w[t];
        for (let t = 0; t < pb.j.length; t++) acc[pb.j[t]] -= pb.w[t];
        const touched = [...pa.j, ...pb.j].sort((x, y) => x - y);
        for (let t = 0; t < touched.length; t++) {
          const j = touched[t];
          if (t > 0 && touched[t - 1] === j) continue;
          if (acc[j] !== 0) { bJ.push(j); bW.push(acc[j]); }
          acc[j] = 0;
        }
      }
      bPtr[e + 1] = bJ.length;
    }
    // trailing dofs of no face (the ordering may put some there; the bound faces' masters) are means of their own
    const ownMean = new Int32Array(n1).fill(-1);
    for (let i = 0; i < n1; i++) if (comp[i] < 0) ownMean[i] = nM++;
    // E row by row: tree path, the group's (or own) mean, a bound face's masters; h its λ-coefficient
    const ePtr = new Int32Array(n1 + 1), eY: number[] = [], eW: number[] = [];
    let h: Float64Array | null = null;
    for (let i = 0; i < n1; i++) {
      if (comp[i] >= 0) {
        eY.push(...path[i].j); eW.push(...path[i].w);
        if (compRoot[comp[i]] !== G) { eY.push(nJ + meanOfComp[comp[i]]); eW.push(1); }
        const b = boundOf[i];
        if (b >= 0) {
          const f = forms.get(b)!;
          for (let t = 0; t < f.free.length; t++) { eY.push(nJ + ownMean[posOf[f.free[t]]]); eW.push(f.w[t]); }
          if (f.z !== 0) (h ??= new Float64Array(n1))[i] = f.z;
        }
      } else { eY.push(nJ + ownMean[i]); eW.push(1); }
      ePtr[i + 1] = eY.length;
    }
    // each tree jump: the face beyond it, its sign, what the face before it moves with, its change with λ
    const tChild = new Int32Array(nJ), tSign = new Float64Array(nJ), tPtr = new Int32Array(nJ + 1);
    const tIdx: number[] = [], tW: number[] = [], tByJ: { idx: number[]; w: number[] }[] = new Array(nJ);
    let tBeta: Float64Array | null = null;
    for (let i = 0; i < n1; i++) {
      const e = parentEdge[i];
      if (e < 0) continue;
      const up = endA[e] === i ? endB[e] : endA[e], j = jumpOf[e];
      tChild[j] = i; tSign[j] = endA[e] === i ? 1 : -1;
      if (up !== G) { tByJ[j] = { idx: [up], w: [1] }; continue; }
      const b = moving(faceDof(e, endA[e] === G)), f = b >= 0 ? forms.get(b)! : null;
      tByJ[j] = f ? { idx: f.free.map((q) => posOf[q]), w: f.w } : { idx: [], w: [] };
      // j = sign·(q_child − b): at fixed unknowns it moves by −sign·z per unit λ
      if (f && f.z !== 0) (tBeta ??= new Float64Array(nJ))[j] = -tSign[j] * f.z;
    }
    for (let j = 0; j < nJ; j++) { tIdx.push(...tByJ[j].idx); tW.push(...tByJ[j].w); tPtr[j + 1] = tIdx.length; }
    const bound = new Map<number, Bound>();
    for (const [d, f] of forms) if (moving(d) >= 0) bound.set(d, { z: f.z, free: Int32Array.from(f.free), w: Float64Array.from(f.w) });
    const lay: Layout = {
      jumpOf, ePtr, eY: Int32Array.from(eY), eW: Float64Array.from(eW), h, bPtr, bJ: Int32Array.from(bJ), bW: Float64Array.from(bW),
      tChild, tSign, tPtr, tIdx: Int32Array.from(tIdx), tW: Float64Array.from(tW), tBeta, bound, nJ, nM,
    };
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
      return new Condensation(sys, factorize(K, sym), first, alpha, lay);
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
      for (let t = this.ePtr[i]; t < this.ePtr[i + 1]; t++) y[this.eY[t]] += this.eW[t] * v[i];
    }
    return y;
  }

  private mulSA(x: Float64Array): Float64Array {
    const n1 = this.n1, y = new Float64Array(n1), S = this.SA;
    for (let i = 0; i < n1; i++) { let t = 0; const o = i * n1; for (let j = 0; j < n1; j++) t += S[o + j] * x[j]; y[i] = t; }
    return y;
  }

  /** The jumps of a free vector at λ. */
  gatherC(uf: Float64Array, lambda: number, out = new Float64Array(this.nc)): Float64Array {
    // j = u⁺ − u⁻ (a held face counts as zero, a bound one moves by λ·z + Σ w·q)
    const P = this.sys.pairs, fo = this.sys.freeOf, J = this.jumpOf;
    for (let p = 0; p < P.plus.length; p++) for (let c = 0; c < 2; c++) {
      const j = J[2 * p + c];
      if (j < 0) continue;
      const dp = 2 * P.plus[p] + c, dm = 2 * P.minus[p] + c, fp = fo[dp], fm = fo[dm];
      out[j] = (fp >= 0 ? uf[fp] : this.boundValue(dp, uf, lambda)) - (fm >= 0 ? uf[fm] : this.boundValue(dm, uf, lambda));
    }
    return out;
  }

  /** Where a face that is not an unknown stands (0 for one held). */
  private boundValue(d: number, uf: Float64Array, lambda: number): number {
    const b = this.bound.get(d);
    if (!b) return 0;
    let v = lambda * b.z;
    for (let t = 0; t < b.free.length; t++) v += b.w[t] * uf[b.free[t]];
    return v;
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
    // the bound faces' λ-part: ĝ·q_c = ĝ·E y + λ ĝ·h
    const h = this.h;
    if (h) for (let p = 0; p < n1; p++) gl1 += g1[p] * h[p];
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
    // means: m = −X j − λ zM; faces: q_c = E y + λ h
    const qc = this.qcWork, mv = this.mWork, eY = this.eY, eW = this.eW, h = this.h;
    for (let m = 0; m < this.nM; m++) {
      let t = -lambda * this.zM[m];
      for (let j = 0; j < nJ; j++) t -= this.X[m * nJ + j] * yJ[j];
      mv[m] = t;
    }
    for (let i = 0; i < n1; i++) {
      let v = 0;
      for (let t = this.ePtr[i]; t < this.ePtr[i + 1]; t++) v += eW[t] * (eY[t] < nJ ? yJ[eY[t]] : mv[eY[t] - nJ]);
      qc[i] = h ? v + lambda * h[i] : v;
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
   * into kappaTrial). Returns ‖r‖∞ (Infinity when not finite), the machine force F at these
   * unknowns and Fr, the part of it the out-of-balance on jumps that move with λ carries (F − Fr
   * is F's change with λ at fixed jumps, s·y + κ̂λ: the force control's Newton step is taken on
   * it, which is the full iterations' step; their test is on F).
   */
  evaluate(y: Float64Array, lambda: number, coh: CohesiveParams, kappa: Float64Array, kappaTrial: Float64Array,
    tangent: boolean, floor: number, secant: boolean): { rmax: number; F: number; Fr: number } {
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
      if (!this.simple[p]) { this.cyclePair(p, y, coh, kappa, kappaTrial, tangent, floor, secant); continue; }
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
    // the out-of-balance on each face dof, as the full iterations measure it: the jump of a tree
    // pair carries the sum over the faces beyond it, and a group's forces sum to zero
    // (the face before it, or a bound face's masters by their levers)
    const rf = this.rFace, tC = this.tChild, tS = this.tSign, tP = this.tPtr, tI = this.tIdx, tW = this.tW;
    rf.fill(0);
    for (let j = 0; j < nc; j++) {
      const v = tS[j] * r[j];
      rf[tC[j]] += v;
      for (let t = tP[j]; t < tP[j + 1]; t++) rf[tI[t]] -= tW[t] * v;
    }
    let rmax = 0;
    for (let i = 0; i < this.n1; i++) { const av = Math.abs(rf[i]); if (av > rmax || av !== av) rmax = av !== av ? Infinity : av; }
    // F = ∂Π/∂λ at fixed unknowns: at fixed jumps, plus Σ r·∂j/∂λ
    let Fr = 0;
    const beta = this.tBeta;
    if (beta) for (let j = 0; j < nc; j++) Fr += r[j] * beta[j];
    return { rmax, F: beta ? F + Fr : F, Fr };
  }

  /**
   * A pair off its group's tree: its jump is a signed sum of tree jumps B·y, so its force enters
   * the residual as Bᵀf and its 2×2 tangent the tangent as Bᵀ M B.
   */
  private cyclePair(p: number, y: Float64Array, coh: CohesiveParams, kappa: Float64Array, kappaTrial: Float64Array,
    tangent: boolean, floor: number, secant: boolean): void {
    const bP = this.bPtr, bJ = this.bJ, bW = this.bW, r = this.r, T = this.T, nc = this.nc, sys = this.sys, M = sys.m4;
    const x0 = bP[2 * p], x1 = bP[2 * p + 1], y1 = bP[2 * p + 2];
    let dx = 0, dy = 0;
    for (let t = x0; t < x1; t++) dx += bW[t] * y[bJ[t]];
    for (let t = x1; t < y1; t++) dy += bW[t] * y[bJ[t]];
    const fx = sys.pairResponse(p, dx, dy, coh, kappa, kappaTrial, tangent, floor, secant);
    const fy = sys.pairFy;
    for (let t = x0; t < x1; t++) r[bJ[t]] += bW[t] * fx;
    for (let t = x1; t < y1; t++) r[bJ[t]] += bW[t] * fy;
    if (!tangent) return;
    // rows from x (x0..x1) and y (x1..y1) against columns likewise: M[0] xx, M[1] xy, M[2] yx, M[3] yy
    for (let s = x0; s < y1; s++) {
      const o = bJ[s] * nc, ws = bW[s], row = s < x1 ? 0 : 2;
      for (let t = x0; t < y1; t++) T[o + bJ[t]] += ws * bW[t] * M[row + (t < x1 ? 0 : 1)];
    }
  }

  /**
   * The energy the faces dissipate from the histories kappa at the jumps y, D(y) = Σ A·d
   * (System.dissipation): a function of the jumps alone, so on them it is exact and does not
   * depend on λ. With grad (length nc) its gradient on the jumps, overwritten.
   */
  dissipation(y: Float64Array, coh: CohesiveParams, kappa: Float64Array, grad: Float64Array | null): number {
    const sys = this.sys, J = this.jumpOf, np = J.length >> 1, g = sys.dg, bP = this.bPtr, bJ = this.bJ, bW = this.bW;
    if (grad) grad.fill(0);
    let D = 0;
    for (let p = 0; p < np; p++) {
      if (this.simple[p]) {
        const jx = J[2 * p], jy = J[2 * p + 1];
        D += sys.pairDissipation(p, jx >= 0 ? y[jx] : 0, jy >= 0 ? y[jy] : 0, coh, kappa);
        if (!grad) continue;
        if (jx >= 0) grad[jx] += g[0];
        if (jy >= 0) grad[jy] += g[1];
        continue;
      }
      // off the tree: the jump is B·y, the gradient Bᵀ∂d
      const x0 = bP[2 * p], x1 = bP[2 * p + 1], y1 = bP[2 * p + 2];
      let dx = 0, dy = 0;
      for (let t = x0; t < x1; t++) dx += bW[t] * y[bJ[t]];
      for (let t = x1; t < y1; t++) dy += bW[t] * y[bJ[t]];
      D += sys.pairDissipation(p, dx, dy, coh, kappa);
      if (!grad) continue;
      for (let t = x0; t < x1; t++) grad[bJ[t]] += bW[t] * g[0];
      for (let t = x1; t < y1; t++) grad[bJ[t]] += bW[t] * g[1];
    }
    return D;
  }

  /** Scratch for the dissipation's gradient on the jumps. */
  private dGrad: Float64Array | null = null;
  get dissipationGrad(): Float64Array { return this.dGrad ??= new Float64Array(this.nc); }

  /** LDLᵀ of the tangent T in place; throws on a zero pivot. */
  factorT(): void {
    const j = ldltDense(this.T, this.nc, this.d, this.wk);
    if (j >= 0) throw new SingularMatrixError(`the condensed tangent is singular at jump ${j}`, this.faceOfJump(j));
  }

  /** A free index on the faces of jump j (for the message). */
  private faceOfJump(j: number): number {
    for (let i = 0; i < this.n1; i++) for (let t = this.ePtr[i]; t < this.ePtr[i + 1]; t++) if (this.eY[t] === j) return this.cFree[i];
    return -1;
  }

  /** x = T⁻¹ x in place with the factor of factorT. */
  solveT(x: Float64Array): void { solveDense(this.T, this.nc, this.d, x); }
}
