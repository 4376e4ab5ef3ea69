// Corrections of a measured curve before it meets a prediction: a seating load on which the
// readings were zeroed, the testing machine's compliance in a crosshead reading, and the toe
// (the soft start while the specimen beds in). Each returns a new curve and says what it did.

import { InputError } from '../errors.js';
import { initialStiffness, peakIndex, type Curve } from './compare.js';

export interface Corrections {
  /** Seating load (N) on the specimen when both readings were zeroed. */
  preload_N?: number;
  /** Machine compliance (mm/N) in series with the specimen; only for a displacement reading. */
  compliance_mm_per_N?: number;
  /** Shift the opening so the linear part of the rising branch passes through zero load. */
  toe?: boolean;
}

export interface Corrected { curve: Curve; notes: string[] }

/**
 * Readings zeroed under a seating load P0: every load gets P0 back, and the opening the
 * specimen had already taken under it (P0 over the initial stiffness) is added, so the curve
 * starts from the unloaded specimen at (0, 0).
 */
export function addPreload(c: Curve, P0: number): Corrected {
  const k = initialStiffness(c);
  if (!(k > 0)) throw new InputError('--preload: the initial slope of the measured curve could not be measured, so the opening under the seating load is unknown');
  const dx = P0 / k, n = c.x.length;
  const x = new Float64Array(n + 1), y = new Float64Array(n + 1);
  for (let i = 0; i < n; i++) { x[i + 1] = c.x[i]! + dx; y[i + 1] = c.y[i]! + P0; }
  return { curve: { x, y }, notes: [`preload ${P0} N added to every load and ${dx.toPrecision(3)} mm to every opening (preload over the initial stiffness ${k.toPrecision(4)} N/mm)`] };
}

/** The specimen's own displacement: the machine's share C·P taken out of a crosshead reading. */
export function removeCompliance(c: Curve, C_mm_per_N: number): Corrected {
  const x = Float64Array.from(c.x, (v, i) => v - C_mm_per_N * c.y[i]!);
  const P = c.y[peakIndex(c.y)]!;
  return { curve: { x, y: Float64Array.from(c.y) }, notes: [`machine compliance ${(1000 * C_mm_per_N).toPrecision(4)} mm/kN taken out of the displacement (${(C_mm_per_N * P).toPrecision(3)} mm at the peak)`] };
}

/**
 * Toe correction as the usual test standards describe it (common practice): the straight part
 * of the rising branch (least squares between 10 and 40 % of the peak) is extended to zero load
 * and its intercept becomes the zero of the opening; the toe below 10 % of the peak is replaced
 * by that line, so the curve starts at (0, 0).
 */
export function toeCorrection(c: Curve): Corrected & { offset_mm: number } {
  const kp = peakIndex(c.y), P = c.y[kp]!;
  let inBand = 0;
  for (let i = 0; i <= kp; i++) if (c.y[i]! >= 0.1 * P && c.y[i]! <= 0.4 * P) inBand++;
  if (inBand < 3) throw new InputError(`--toe: only ${inBand} measured point${inBand === 1 ? '' : 's'} between 10 and 40 % of the peak: the straight part of the rising branch needs at least 3`);
  const k = initialStiffness(c, 0.1, 0.4);
  if (!(k > 0)) throw new InputError('--toe: the rising branch has no straight part between 10 and 40 % of the peak, so the toe cannot be corrected');
  // intercept of the line through the mean point of the band
  let sx = 0, sy = 0, n = 0;
  for (let i = 0; i <= kp; i++) if (c.y[i]! >= 0.1 * P && c.y[i]! <= 0.4 * P) { sx += c.x[i]!; sy += c.y[i]!; n++; }
  const x0 = n > 0 ? sx / n - sy / n / k : c.x[0]!;
  // the toe (below 10 % of the peak on the rising branch) is replaced by the straight line from zero
  let first = 0;
  while (first < kp && c.y[first]! < 0.1 * P) first++;
  const xs: number[] = [0], ys: number[] = [0];
  for (let i = first; i < c.x.length; i++) { xs.push(c.x[i]! - x0); ys.push(c.y[i]!); }
  return { curve: { x: Float64Array.from(xs), y: Float64Array.from(ys) }, offset_mm: x0, notes: [`toe corrected: the straight part of the rising branch (10–40 % of the peak, ${k.toPrecision(4)} N/mm) meets zero load at ${x0.toPrecision(3)} mm, now the zero of the opening`] };
}

/** Preload, then compliance, then toe: the order in which they arise in the machine. */
export function correctCurve(c: Curve, k: Corrections, isDisplacement: boolean): Corrected {
  let cur = c;
  const notes: string[] = [];
  if (k.preload_N !== undefined && k.preload_N > 0) { const r = addPreload(cur, k.preload_N); cur = r.curve; notes.push(...r.notes); }
  if (k.compliance_mm_per_N !== undefined && k.compliance_mm_per_N !== 0) {
    if (!isDisplacement) throw new InputError('--compliance applies to a crosshead or load-point displacement, but the measured curve is against CMOD, which a clip gauge reads on the specimen itself: leave --compliance out');
    const r = removeCompliance(cur, k.compliance_mm_per_N); cur = r.curve; notes.push(...r.notes);
  }
  if (k.toe) { const r = toeCorrection(cur); cur = r.curve; notes.push(...r.notes); }
  return { curve: cur, notes };
}

export interface ComplianceEstimate {
  /** Machine compliance, mm/N. */
  C_mm_per_N: number;
  /** E of the specimen over E of the model, from the CMOD slopes. */
  eRatio: number;
  notes: string[];
}

/**
 * Machine compliance from one test that recorded both CMOD and crosshead displacement. The
 * clip gauge sits on the specimen, so its slope against the model's gives the specimen's E
 * (the elastic slopes are proportional to E); the model then says how stiff the specimen is at
 * the load point, and whatever the crosshead shows beyond that is the machine:
 *   C = 1/k_crosshead − 1/(k_model,disp · k_cmod / k_model,cmod).
 * Slopes are all taken the same way (5–40 % of each curve's own peak) so the slight bending of
 * the rising branch before the peak affects model and measurement alike.
 */
export function estimateCompliance(measuredDisp: Curve, measuredCmod: Curve, modelDisp: Curve, modelCmod: Curve): ComplianceEstimate {
  const kd = initialStiffness(measuredDisp), kc = initialStiffness(measuredCmod);
  const md = initialStiffness(modelDisp), mc = initialStiffness(modelCmod);
  if (!(kd > 0 && kc > 0 && md > 0 && mc > 0)) throw new InputError('--compliance estimate: the initial slopes of the measured or predicted curves could not be measured (each needs points between 5 and 40 % of its peak)');
  const eRatio = kc / mc, spec = md * eRatio;
  let C = 1 / kd - 1 / spec;
  const notes = [`machine compliance estimated from the initial slopes: crosshead ${kd.toPrecision(4)} N/mm, CMOD ${kc.toPrecision(4)} N/mm; the CMOD slope puts E at ${(100 * eRatio).toFixed(1)} % of the model's, so the specimen alone would give ${spec.toPrecision(4)} N/mm at the load point`];
  if (C < 0) { notes.push(`the estimate came out negative (${(1000 * C).toPrecision(3)} mm/kN): the crosshead is no softer than the specimen, so no compliance is taken out`); C = 0; }
  return { C_mm_per_N: C, eRatio, notes };
}
