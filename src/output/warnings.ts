// What a finished run says about itself: the first peak of the curve (and a later maximum),
// the work of fracture with the energy still stored taken off, and one-sentence warnings
// where the result is not physical. Physics gives numbers; these turn them into sentences.
import type { CaseModel, Vec2 } from '../case/model.js';
import type { AnalysisResult, Snapshot, StepRow } from '../fracture/analysis.js';
import type { Peak } from '../fracture/checkpoint.js';

/** A drop of this fraction of the first maximum makes it the peak (small wobbles of growth steps are not). */
export const PEAK_DROP = 0.1;
/** A rise of this fraction of the peak after the post-peak minimum is a load that rises again. */
export const RISE_AGAIN = 0.1;
/** σ1 above this multiple of ft in the bulk, far from every crack, notch and bearing, is flagged. */
export const BULK_OVER_FT = 1.2;

const peakOf = (r: StepRow): Peak => ({ load_N: r.load_N, displacement_mm: r.displacement_mm, cmod_mm: r.cmod_mm, step: r.step });

export interface CurvePeaks {
  /** The first maximum: the load falls by PEAK_DROP of it afterwards (else the largest load). */
  peak: Peak;
  /** Lowest load after the peak, before any rise (index into rows). */
  minimum: number;
  /** Largest load after that minimum when the load rises again by RISE_AGAIN of the peak. */
  later: Peak | null;
  /** Index of the later maximum in rows (−1 without one). */
  laterIndex: number;
  peakIndex: number;
}

export function curvePeaks(rows: StepRow[]): CurvePeaks {
  const none: Peak = { load_N: 0, displacement_mm: 0, cmod_mm: null, step: 0 };
  if (rows.length === 0) return { peak: none, minimum: -1, later: null, laterIndex: -1, peakIndex: -1 };
  const a = (i: number) => Math.abs(rows[i].load_N);
  let ip = 0, dropped = false;
  for (let i = 1; i < rows.length; i++) {
    if (a(i) > a(ip)) ip = i;
    else if (a(i) < (1 - PEAK_DROP) * a(ip)) { dropped = true; break; }
  }
  if (!dropped) for (let i = 0; i < rows.length; i++) if (a(i) > a(ip)) ip = i;
  // lowest point after the peak, then the highest after that
  let im = ip;
  for (let i = ip + 1; i < rows.length; i++) if (a(i) < a(im)) im = i;
  let il = im;
  for (let i = im + 1; i < rows.length; i++) if (a(i) > a(il)) il = i;
  // the minimum that matters is the lowest point before the later maximum
  let imin = ip;
  for (let i = ip + 1; i <= il; i++) if (a(i) < a(imin)) imin = i;
  const rises = il > imin && a(il) - a(imin) > RISE_AGAIN * a(ip);
  return { peak: peakOf(rows[ip]), peakIndex: ip, minimum: imin, later: rises ? peakOf(rows[il]) : null, laterIndex: rises ? il : -1 };
}

export interface WorkOfFracture {
  /** Work of fracture so far: the machine's work less the elastic energy still stored (N·mm). */
  W_Nmm: number; ligamentArea_mm2: number; GF_Nmm: number;
  externalWork_Nmm: number; storedElastic_Nmm: number;
  /** True when the estimate cannot exceed what the complete test would give. */
  lowerBound: boolean;
  note: string;
}

/**
 * Work of fracture (RILEM TC 50-FMC: the work of the machine over the ligament area, no
 * self-weight term). The elastic energy still stored at the last step would come back on
 * unloading, so it is taken off: what remains is the energy dissipated so far. Dissipation
 * never decreases, so this is a lower bound of the complete test's work whenever the energy
 * balance of the run holds; when it does not, the estimate is no bound at all.
 */
export function workOfFractureEstimate(c: CaseModel, result: AnalysisResult): WorkOfFracture | null {
  const last = result.rows[result.rows.length - 1];
  if (!c.crack || !last) return null;
  let lig = 0;
  for (const n of c.geometry.notches) lig += ligamentLength(c, n.to, [n.to[0] - n.from[0], n.to[1] - n.from[1]]);
  if (!(lig > 0)) lig = last.crack_length_mm;
  const A = lig * c.thickness;
  const Wext = last.external_work_Nmm, U = last.elastic_energy_Nmm, W = Wext - U;
  const gap = Wext - U - last.dissipated_Nmm;
  const balanced = Math.abs(gap) <= 0.01 * Math.max(Math.abs(Wext), 1e-300);
  const { peak } = curvePeaks(result.rows);
  const frac = peak.load_N !== 0 ? last.load_N / peak.load_N : 0;
  const pct = `${(100 * frac).toFixed(1).replace(/^-(0\.0)$/, '$1')} %`;
  const note = !balanced
    ? `the energy balance of the last step is off by ${(100 * Math.abs(gap) / Math.abs(Wext)).toFixed(1)} % of the work, so the estimate is no bound`
    : `run ended at ${pct} of the peak load; the elastic energy still stored is taken off and the tail beyond the last step is not counted, so the estimate is a lower bound`;
  return {
    W_Nmm: W, ligamentArea_mm2: A, GF_Nmm: A > 0 ? W / A : 0,
    externalWork_Nmm: Wext, storedElastic_Nmm: U, lowerBound: balanced, note,
  };
}

function ligamentLength(c: CaseModel, p: Vec2, d: Vec2): number {
  const L = Math.hypot(d[0], d[1]);
  const ux = d[0] / L, uy = d[1] / L;
  const o = c.geometry.outline;
  let best = Infinity;
  for (let i = 0; i < o.length; i++) {
    const a = o[i], b = o[(i + 1) % o.length];
    const ex = b[0] - a[0], ey = b[1] - a[1], den = ux * ey - uy * ex;
    if (Math.abs(den) < 1e-12) continue;
    const wx = a[0] - p[0], wy = a[1] - p[1];
    const t = (wx * ey - wy * ex) / den, s = (wx * uy - wy * ux) / den;
    if (t > 1e-9 && s >= 0 && s <= 1) best = Math.min(best, t);
  }
  return Number.isFinite(best) ? best : 0;
}

/** Distance from p to the segment ab. */
function segDist(px: number, py: number, ax: number, ay: number, bx: number, by: number): number {
  const ex = bx - ax, ey = by - ay, L2 = ex * ex + ey * ey;
  const t = L2 > 0 ? Math.max(0, Math.min(1, ((px - ax) * ex + (py - ay) * ey) / L2)) : 0;
  return Math.hypot(px - ax - t * ex, py - ay - t * ey);
}

export interface BulkOverstress { ratio: number; at: Vec2; distance: number }

/**
 * Largest σ1/ft of a cell farther than `distance` from every crack, notch, support and load
 * (where the bulk cannot crack in the model unless a crack is started there); null when
 * every such cell stays below BULK_OVER_FT·ft.
 */
export function bulkOverstress(c: CaseModel, snap: Snapshot, distance: number): BulkOverstress | null {
  const { mesh, cellStress } = snap, ft = c.material.ft;
  const segs: number[] = [];
  for (const k of snap.cracks) for (let i = 1; i < k.points.length; i++) segs.push(...k.points[i - 1], ...k.points[i]);
  for (const n of c.geometry.notches) segs.push(...n.from, ...n.to);
  const spots: Vec2[] = [];
  for (const s of [...c.supports, ...c.loads]) {
    if (s.at) spots.push(s.at);
    else if (s.along) segs.push(...s.along[0], ...s.along[1]);
  }
  let worst: BulkOverstress | null = null;
  const nc = mesh.cellStart.length - 1;
  for (let cI = 0; cI < nc; cI++) {
    const sxx = cellStress[3 * cI], syy = cellStress[3 * cI + 1], sxy = cellStress[3 * cI + 2];
    const s1 = (sxx + syy) / 2 + Math.hypot((sxx - syy) / 2, sxy);
    if (!(s1 > BULK_OVER_FT * ft) || (worst && s1 / ft <= worst.ratio)) continue;
    let x = 0, y = 0;
    const a = mesh.cellStart[cI], b = mesh.cellStart[cI + 1];
    for (let k = a; k < b; k++) { x += mesh.xy[2 * mesh.cellVerts[k]]; y += mesh.xy[2 * mesh.cellVerts[k] + 1]; }
    x /= b - a; y /= b - a;
    let far = true;
    for (let i = 0; far && i < segs.length; i += 4) if (segDist(x, y, segs[i], segs[i + 1], segs[i + 2], segs[i + 3]) <= distance) far = false;
    for (const p of spots) if (far && Math.hypot(x - p[0], y - p[1]) <= distance) far = false;
    if (far) worst = { ratio: s1 / ft, at: [x, y], distance };
  }
  return worst;
}

/** Distance from cracks beyond which σ1 over ft is flagged: three averaging radii (at least a tenth of the specimen's smaller side). */
export function farDistance(c: CaseModel): number {
  let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity;
  for (const [x, y] of c.geometry.outline) { x0 = Math.min(x0, x); x1 = Math.max(x1, x); y0 = Math.min(y0, y); y1 = Math.max(y1, y); }
  return Math.max(3 * (c.crack?.averagingRadius ?? 0), 0.1 * Math.min(x1 - x0, y1 - y0));
}

/** Vertical machine force per splitting force of a frictionless wedge of the given included angle: 2·tan(angle/2) (statics). */
export const wedgeRatio = (angleDeg: number): number => 2 * Math.tan((angleDeg * Math.PI) / 360);

/** A load as the pictures and sentences write it. */
export const fmtLoad = (F: number): string => (Math.abs(F) >= 1000 ? `${(F / 1000).toFixed(2)} kN` : `${(Math.abs(F) < 0.05 ? 0 : F).toFixed(1)} N`);

const mm = (v: number) => Number(v.toPrecision(3)).toString();

/**
 * Share of the machine's work above which a run's energy balance is worth a warning: the
 * templates close within about 1 % and a crack that snaps through in one step leaves tens of
 * per cent, so 5 % separates the two (our own threshold).
 */
export const ENERGY_WARN = 0.05;

/** The step whose energy balance is worst, as a share of the machine's work (null before any work). */
export function worstEnergyGap(rows: readonly StepRow[]): { step: number; share: number } | null {
  const end = rows.length > 0 ? Math.abs(rows[rows.length - 1].external_work_Nmm) : 0;
  let worst: { step: number; share: number } | null = null;
  for (const r of rows) {
    const W = Math.abs(r.external_work_Nmm);
    // the first thousandth of the work is rounding of near-zero numbers
    if (!(W > 1e-3 * end)) continue;
    const share = Math.abs(r.external_work_Nmm - r.elastic_energy_Nmm - r.dissipated_Nmm) / W;
    if (!worst || share > worst.share) worst = { step: r.step, share };
  }
  return worst;
}

/** One sentence per problem the run shows; empty for a run that looks physical. */
export function runWarnings(c: CaseModel, result: AnalysisResult, final: Snapshot | null): string[] {
  const out: string[] = [];
  const rows = result.rows, pk = curvePeaks(rows);
  if (pk.later) {
    const lo = rows[pk.minimum], hi = rows[pk.laterIndex];
    const grown = hi.crack_length_mm - lo.crack_length_mm;
    const stopped = grown < Math.max(c.crack?.growthStep ?? 0, 0.01 * Math.abs(lo.crack_length_mm));
    out.push(`The load rises again after the peak of ${fmtLoad(pk.peak.load_N)} at step ${pk.peak.step}, from ${fmtLoad(lo.load_N)} at step ${lo.step} to ${fmtLoad(hi.load_N)} at step ${hi.step}`
      + (stopped ? ' while the crack does not grow' : ` while the crack grows by only ${mm(grown)} mm`)
      + ': something other than the crack carries the load (a held strip, a hole or face the crack cannot pass), so the curve past the first peak is not physical.');
  }
  const gap = worstEnergyGap(rows);
  if (gap && gap.share > ENERGY_WARN) {
    out.push(`At step ${gap.step} the machine's work and the stored plus dissipated energy differ by ${(100 * gap.share).toFixed(1)} % of the work: a crack snapped further in one step than the control could follow, so the curve across that step is no path the specimen takes.`);
  }
  if (final && c.crack) {
    const d = farDistance(c), b = bulkOverstress(c, final, d);
    if (b) {
      out.push(`At step ${final.step} the major principal stress reaches ${b.ratio.toFixed(2)} ft at [${mm(b.at[0])}, ${mm(b.at[1])}] mm, more than ${mm(d)} mm from every crack, notch, support and load, where no crack has started: past that point the result is not physical.`);
    }
  }
  return out;
}
