// Mixed-mode response of one point of a zero-thickness interface: an intact penalty
// branch up to ft, then the softening law in the effective opening, with secant
// unloading to the origin and a contact penalty against interpenetration.

import { makeLaw, type SofteningLaw } from './laws.js';

export interface CohesiveParams {
  law: SofteningLaw;
  /** kp, N/mm³: stiffness of the intact interface and of the contact. */
  penalty: number;
  /** β (shearWeight) in λ = √(⟨w⟩₊² + β s²). */
  beta: number;
}

/**
 * The interface where the material's strength is ft: the same kind of law, penalty and shear
 * weight, ft in place of the mean and GF kept, so the critical opening follows as the law
 * defines it (w_c = 2, 3.6 or 5.14·GF/ft).
 */
export function atStrength(p: CohesiveParams, ft: number): CohesiveParams {
  return { law: makeLaw(p.law.kind, ft, p.law.GF), penalty: p.penalty, beta: p.beta };
}

/**
 * Tractions and consistent tangent at opening w and sliding s (mm), given the history
 * kappa (largest effective opening λ reached, mm). Writes out = [tn, ts, dtn/dw, dtn/ds,
 * dts/dw, dts/ds] (MPa, MPa/mm) and returns the trial history max(kappa, λ); the caller
 * commits it after convergence.
 *
 * The effective traction τ(λ) = kp·λ for λ ≤ λ0 = ft/kp, τ(λ) = σ(λ − λ0) beyond, is the
 * derivative of a potential of λ, so t = τ/λ·(w, βs) and the tangent is symmetric.
 */
export function cohesivePoint(p: CohesiveParams, w: number, s: number, kappa: number, out: Float64Array): number {
  const kp = p.penalty, beta = p.beta, law = p.law;
  const l0 = law.ft / kp;
  const wp = w > 0 ? w : 0;
  const lam = Math.sqrt(wp * wp + beta * s * s);
  let D: number; // secant stiffness τ/λ
  let g = 0; // (dD/dλ)/λ, nonzero only on the loading branch
  if (lam > l0 && lam >= kappa) {
    // λ > λ0 > 0 here, so the divisions are safe.
    const u = lam - l0;
    const tau = law.stress(u);
    D = tau / lam;
    g = (law.slope(u) * lam - tau) / (lam * lam * lam);
  } else {
    const k = kappa > l0 ? kappa : l0;
    D = k === l0 ? kp : law.stress(k - l0) / k;
  }
  const bs = beta * s;
  out[1] = D * bs;
  out[5] = D * beta + g * bs * bs;
  if (w >= 0) {
    out[0] = D * w;
    out[2] = D + g * w * w;
    out[3] = g * w * bs;
    out[4] = out[3];
  } else {
    // Closed faces: contact penalty in the normal direction, λ is shear only.
    out[0] = kp * w;
    out[2] = kp;
    out[3] = 0;
    out[4] = 0;
  }
  return lam > kappa ? lam : kappa;
}

/**
 * Energy per unit area (N/mm) of the interface point at (w, s) with history kappa
 * (κ = max(kappa, λ, λ0)). With Ψ(κ) = ∫0^κ τ dλ = ½ ft λ0 + ∫0^(κ−λ0) σ dw:
 *   stored     = ½ τ(κ)/κ · λ² + ½ kp ⟨−w⟩₊²   (recovered on unloading along the secant),
 *   dissipated = Ψ(κ) − ½ τ(κ) κ               (non-decreasing in κ because τ' ≤ 0).
 * The secant branch and the contact are exact differentials, and on the loading branch
 * (λ = κ) stored + dissipated = Ψ(λ), so ∫ t·d(w, s) = stored + dissipated along any path.
 * At full separation dissipated = GF + ½ ft²/kp: the penalty energy at the peak is lost too.
 */
export function interfaceEnergy(p: CohesiveParams, w: number, s: number, kappa: number): { stored: number; dissipated: number } {
  const kp = p.penalty, law = p.law;
  const l0 = law.ft / kp;
  const wp = w > 0 ? w : 0;
  const lam2 = wp * wp + p.beta * s * s;
  const lam = Math.sqrt(lam2);
  let k = kappa > l0 ? kappa : l0;
  if (lam > k) k = lam;
  const tau = k === l0 ? law.ft : law.stress(k - l0);
  const contact = w < 0 ? 0.5 * kp * w * w : 0;
  return {
    stored: 0.5 * (tau / k) * lam2 + contact,
    dissipated: dissipatedAt(law, l0, k, tau),
  };
}

/** Dissipated energy per unit area (N/mm) at history k ≥ λ0 with τ = τ(k): Ψ(k) − ½ τ(k) k. */
function dissipatedAt(law: SofteningLaw, l0: number, k: number, tau: number): number {
  return 0.5 * law.ft * l0 + law.energy(k - l0) - 0.5 * tau * k;
}

/**
 * Energy dissipated per unit area (N/mm) by a point driven from history kappa to (w, s):
 * d(max(kappa, λ, λ0)) (see interfaceEnergy), a function of the opening alone. Writes
 * ∂d/∂(w, s) into grad: on the loading branch (λ ≥ kappa, λ > λ0) d'(λ)·∂λ/∂(w, s) with
 * d'(λ) = ½ (τ − τ'λ) ≥ 0, elsewhere zero (an unloading or intact point dissipates nothing).
 * Summed over the faces it is the constraint of the dissipation-driven path following.
 */
export function dissipationPoint(p: CohesiveParams, w: number, s: number, kappa: number, grad: Float64Array): number {
  const law = p.law, l0 = law.ft / p.penalty;
  const wp = w > 0 ? w : 0;
  const lam = Math.sqrt(wp * wp + p.beta * s * s);
  grad[0] = 0; grad[1] = 0;
  const k0 = kappa > l0 ? kappa : l0;
  // at λ = κ (where each converged step leaves a point that was opening) the derivative on
  // the loading side: the drive asks for more dissipation, and a zero there would stall it
  if (!(lam >= k0 && lam > l0)) return dissipatedAt(law, l0, k0, k0 === l0 ? law.ft : law.stress(k0 - l0));
  const u = lam - l0, tau = law.stress(u);
  const rate = 0.5 * (tau - law.slope(u) * lam) / lam;
  grad[0] = rate * wp; grad[1] = rate * p.beta * s;
  return dissipatedAt(law, l0, lam, tau);
}

/**
 * Penalty stiffness for cells of size h (mm) in a material of modulus E (MPa).
 * In series with a cell (compliance about h/E per unit area) the intact interface adds
 * the fraction E/(kp·h) = 0.05 % of compliance; the margin up to 0.1 % covers the stiffer
 * laterally constrained cell. Larger values only worsen the conditioning of the system.
 */
export function penaltyFor(E: number, h: number): number {
  if (!(E > 0) || !(h > 0) || !Number.isFinite(E) || !Number.isFinite(h)) {
    throw new RangeError(`penaltyFor needs a positive modulus and cell size (found E = ${E}, h = ${h})`);
  }
  return 2e3 * E / h;
}
