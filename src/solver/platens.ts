// Rigid platens and spreaders as linear constraints on the strip points: each point follows
// the platen's translation and rotation, and a spreader's platens follow one machine travel
// λ = Σ sⱼ·aⱼ (the weighted mean of their travels), which shares the machine force as sⱼ·F.
// Constraints are written as slaves u = λ·z + Σ w·u(master) and eliminated in the System.
import type { Load, Vec2 } from '../case/model.js';
import type { PolyMesh } from '../mesh/polymesh.js';

/** A vertex dof with a weight: comp 0 = x, 1 = y. */
export interface VertexDof { v: number; comp: 0 | 1; w: number }

/** A dof that follows the load factor and master dofs: u = λ·z + Σ w·u(master). */
export interface SlaveDof { v: number; comp: 0 | 1; z: number; masters: VertexDof[] }

/**
 * Levers of a rocker platen on the points of a strip: along axis `comp` every point follows
 * the platen's translation a at the centre and its rotation θ, u = a + θ·s with s the offset
 * across the axis. The point farthest from the centre (index e) is the master that carries θ
 * (u_e = a + θ·s_e), so u_i = a·(1 − c_i) + c_i·u_e with c_i = s_i/s_e. e = −1 (all c = 0)
 * when the platen cannot rotate: clamped, a single point, or no lever arm across the axis.
 */
export function platenLevers(m: PolyMesh, pts: number[], centre: Vec2, comp: 0 | 1, rocker: boolean, tol: number): { c: number[]; e: number } {
  const zero = { c: pts.map(() => 0), e: -1 };
  if (!rocker || pts.length < 2) return zero;
  const across = 1 - comp, s = pts.map((v) => m.xy[2 * v + across] - centre[across]);
  let e = 0;
  for (let i = 1; i < pts.length; i++) if (Math.abs(s[i]) > Math.abs(s[e])) e = i;
  if (!(Math.abs(s[e]) > tol)) return zero;
  return { c: s.map((x) => x / s[e]), e };
}

/** Centre of a load: its point, or the middle of its edge. */
const centreOf = (l: Load): Vec2 => l.at ?? [(l.along![0][0] + l.along![1][0]) / 2, (l.along![0][1] + l.along![1][1]) / 2];

/**
 * Loads that share one machine force through a spreader (statically determinate: a beam on
 * a pivot for two points, a tree of them for more). With shares sⱼ (normalised to sum 1)
 * and travels aⱼ of the load platens along their directions, λ = Σ sⱼ·aⱼ; by virtual work the
 * platen j then carries sⱼ·F. The first load's travel is eliminated,
 * a₁ = (λ − Σⱼ₌₂ sⱼ·aⱼ)/s₁, and every other platen's travel is read at its centre point
 * pⱼ and its lever end eⱼ: aⱼ = (u_p − c_p·u_e)/(dⱼ·(1 − c_p)) (dⱼ = ±1, the direction's sign).
 * Directions must lie along x or y (checked with the case).
 */
export function spreaderSlaves(loads: Load[], pts: number[][], m: PolyMesh, tol: number, normalise = true):
  { masters: (VertexDof & { load: number })[]; slaves: (SlaveDof & { load: number })[] } {
  // shares as written give each point sⱼ·F; normalised they split F (a wedge keeps them: F on each face)
  const total = normalise ? loads.reduce((a, l) => a + (l.share ?? 0), 0) : 1;
  const plat = loads.map((l, j) => {
    const comp: 0 | 1 = Math.abs(l.direction[0]) > Math.abs(l.direction[1]) ? 0 : 1;
    const d = Math.sign(l.direction[comp]), ctr = centreOf(l), P = pts[j];
    const { c, e } = platenLevers(m, P, ctr, comp, !!l.at && l.width > 0 && l.platen !== 'clamped', tol);
    let p = 0;
    for (let i = 1; i < P.length; i++) {
      if (i === e) continue;
      const di = Math.hypot(m.xy[2 * P[i]] - ctr[0], m.xy[2 * P[i] + 1] - ctr[1]), dp = Math.hypot(m.xy[2 * P[p]] - ctr[0], m.xy[2 * P[p] + 1] - ctr[1]);
      if (p === e || di < dp) p = i;
    }
    return { comp, d, c, e, p, share: (l.share ?? 0) / total };
  });
  const masters: (VertexDof & { load: number })[] = [], slaves: (SlaveDof & { load: number })[] = [];
  // aⱼ (j ≥ 2) in terms of its own masters
  const travel = (j: number): VertexDof[] => {
    const q = plat[j], P = pts[j], cp = q.c[q.p], k = 1 / (q.d * (1 - cp));
    const t: VertexDof[] = [{ v: P[q.p], comp: q.comp, w: k }];
    if (q.e >= 0) t.push({ v: P[q.e], comp: q.comp, w: -cp * k });
    return t;
  };
  plat.forEach((q, j) => {
    const P = pts[j];
    if (q.e >= 0) masters.push({ v: P[q.e], comp: q.comp, w: 1, load: j });
    if (j > 0) masters.push({ v: P[q.p], comp: q.comp, w: 1, load: j });
  });
  const q1 = plat[0], others: VertexDof[] = [];
  for (let j = 1; j < plat.length; j++) for (const t of travel(j)) others.push({ ...t, w: -t.w * plat[j].share / q1.share });
  plat.forEach((q, j) => {
    const P = pts[j];
    P.forEach((v, i) => {
      if (i === q.e || (j > 0 && i === q.p)) return;
      const lever = 1 - q.c[i], ms: VertexDof[] = [];
      if (q.e >= 0) ms.push({ v: P[q.e], comp: q.comp, w: q.c[i] });
      if (j === 0) {
        // u = d₁·(1 − c)·a₁ + c·u_e, with a₁ = λ/s₁ − Σ (sⱼ/s₁)·aⱼ
        for (const t of others) ms.push({ ...t, w: q.d * lever * t.w });
        slaves.push({ v, comp: q.comp, z: q.d * lever / q.share, masters: ms, load: j });
      } else {
        for (const t of travel(j)) ms.push({ ...t, w: q.d * lever * t.w });
        slaves.push({ v, comp: q.comp, z: 0, masters: ms, load: j });
      }
    });
  });
  return { masters, slaves };
}
