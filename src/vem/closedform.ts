// Closed-form plane-stress fields used to verify the elements and to benchmark them.
import type { Field } from './norms.js';

/**
 * Cantilever 0 ≤ x ≤ L, |y − D/2| ≤ D/2 (the mesh sits on 0 ≤ y ≤ D), parabolic end shear P per
 * unit thickness (Timoshenko & Goodier, Theory of Elasticity, 3rd ed.). The shear stress is
 * τ = +P(D²/4 − y²)/(2I), the sign that follows from this displacement field.
 */
export function cantilever(L: number, D: number, P: number, E: number, nu: number): { u: Field; strain: (x: number, y: number) => [number, number, number] } {
  const I = D ** 3 / 12;
  return {
    u: (x, y0) => {
      const y = y0 - D / 2;
      return [
        -P * y / (6 * E * I) * ((6 * L - 3 * x) * x + (2 + nu) * (y * y - D * D / 4)),
        P / (6 * E * I) * (3 * nu * y * y * (L - x) + (4 + 5 * nu) * D * D * x / 4 + (3 * L - x) * x * x),
      ];
    },
    strain: (x, y0) => {
      const y = y0 - D / 2, sxx = -P * (L - x) * y / I, txy = P * (D * D / 4 - y * y) / (2 * I);
      return [sxx / E, -nu * sxx / E, 2 * (1 + nu) * txy / E];
    },
  };
}

/**
 * Circular hole of radius a centred at (cx, cy) in an infinite plate under remote tension S
 * along x, plane stress (Kirsch 1898): the displacement, whose hoop stress at the edge is
 * S(1 − 2 cos 2θ).
 */
export function kirsch(S: number, a: number, cx: number, cy: number, E: number, nu: number): Field {
  const G = E / (2 * (1 + nu)), K = (3 - nu) / (1 + nu);
  return (x0, y0) => {
    const x = x0 - cx, y = y0 - cy, r = Math.hypot(x, y), t = Math.atan2(y, x);
    const ur = S / (8 * G) * (r * (K - 1) + 2 * a * a / r + 2 * (r + (K + 1) * a * a / r - a ** 4 / r ** 3) * Math.cos(2 * t));
    const ut = -S / (8 * G) * 2 * (r + (K - 1) * a * a / r + a ** 4 / r ** 3) * Math.sin(2 * t);
    return [ur * Math.cos(t) - ut * Math.sin(t), ur * Math.sin(t) + ut * Math.cos(t)];
  };
}
