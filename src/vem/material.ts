// Elastic constitutive matrix for plane problems, Voigt order [xx, yy, xy] with engineering shear.

export type PlaneModel = 'plane-stress' | 'plane-strain';

/** D as a row-major 3×3 Float64Array (MPa). */
export function elasticMatrix(E: number, nu: number, model: PlaneModel): Float64Array {
  const D = new Float64Array(9);
  if (model === 'plane-stress') {
    const c = E / (1 - nu * nu);
    D[0] = c; D[1] = c * nu; D[3] = c * nu; D[4] = c; D[8] = c * (1 - nu) / 2;
  } else {
    const c = E / ((1 + nu) * (1 - 2 * nu));
    D[0] = c * (1 - nu); D[1] = c * nu; D[3] = c * nu; D[4] = c * (1 - nu); D[8] = c * (1 - 2 * nu) / 2;
  }
  return D;
}

/** Major principal stress and its direction angle (radians) from σxx, σyy, σxy. */
export function principal(sxx: number, syy: number, sxy: number): { s1: number; s2: number; angle: number } {
  const m = (sxx + syy) / 2, r = Math.hypot((sxx - syy) / 2, sxy);
  return { s1: m + r, s2: m - r, angle: 0.5 * Math.atan2(2 * sxy, sxx - syy) };
}
