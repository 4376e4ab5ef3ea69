// Energy from a measured curve: the work of fracture and the fracture energy it implies.

import { InputError } from '../errors.js';

/** ∫ y dx along the recorded path by the trapezoid rule (N·mm for N and mm); unloading counts negative. */
export function workOfFracture(x: ArrayLike<number>, y: ArrayLike<number>): number {
  if (x.length !== y.length) throw new InputError(`work of fracture needs as many loads as openings (found ${y.length} and ${x.length})`);
  let w = 0;
  for (let i = 1; i < x.length; i++) w += 0.5 * (y[i]! + y[i - 1]!) * (x[i]! - x[i - 1]!);
  return w;
}

/**
 * Fracture energy (N/mm) from the work of fracture W0 (N·mm) over the ligament area
 * A_lig = (D − a)·B (mm²), with the optional self-weight work m·g·δ0 (N·mm).
 */
export function rilemGF(W0: number, ligamentArea: number, selfWeightTerm = 0): number {
  if (!(ligamentArea > 0) || !Number.isFinite(ligamentArea)) {
    throw new InputError(`the ligament area must be positive in mm² (found ${ligamentArea})`);
  }
  return (W0 + selfWeightTerm) / ligamentArea;
}
