// Geometric scaling of a whole specimen for a size-effect series: every length of the
// case (outline, holes, notches, supports, loads and their strips, gauges, probes, crack
// start points, mesh sizes, growth step and averaging radius) is multiplied by the factor;
// the material stays. Lengths left to their defaults follow the outline by themselves.

type Raw = Record<string, unknown>;
type Pt = [number, number];

const isPt = (v: unknown): v is Pt => Array.isArray(v) && v.length === 2 && typeof v[0] === 'number' && typeof v[1] === 'number';
const sp = (v: unknown, f: number): unknown => (isPt(v) ? [v[0] * f, v[1] * f] : v);
const sl = (v: unknown, f: number): unknown => (Array.isArray(v) ? v.map((p) => sp(p, f)) : v);
const sn = (v: unknown, f: number): unknown => (typeof v === 'number' ? v * f : v);
const obj = (v: unknown): Raw | null => (v !== null && typeof v === 'object' && !Array.isArray(v) ? (v as Raw) : null);

/** Scales the specimen of raw case data in place by `f` (thickness too when asked). */
export function scaleCase(c: Raw, f: number, thickness: 'kept' | 'scaled' = 'kept'): void {
  if (thickness === 'scaled') c.thickness = sn(c.thickness, f);
  const g = obj(c.geometry);
  if (g) {
    g.outline = sl(g.outline, f);
    for (const h of Array.isArray(g.holes) ? g.holes : []) {
      const ho = obj(h); if (!ho) continue;
      const circ = obj(ho.circle);
      if (circ) { circ.center = sp(circ.center, f); circ.radius = sn(circ.radius, f); }
      if (ho.polygon) ho.polygon = sl(ho.polygon, f);
    }
    for (const n of Array.isArray(g.notches) ? g.notches : []) {
      const no = obj(n); if (!no) continue;
      no.from = sp(no.from, f); no.to = sp(no.to, f); no.width = sn(no.width, f);
    }
  }
  for (const key of ['supports', 'loads']) for (const s of Array.isArray(c[key]) ? (c[key] as unknown[]) : []) {
    const so = obj(s); if (!so) continue;
    if (so.at) so.at = sp(so.at, f);
    if (so.along) so.along = sl(so.along, f);
    so.width = sn(so.width, f);
  }
  const ctl = obj(c.control);
  if (ctl) {
    const gauge = obj(ctl.gauge);
    if (gauge) { gauge.from = sp(gauge.from, f); gauge.to = sp(gauge.to, f); }
    // an opening or travel grows with the specimen; below the base size the crack's own
    // opening (a material length) still has to be reached, so the base target is kept
    const by = ctl.by ?? 'displacement';
    if (by === 'force') ctl.target = sn(ctl.target, f * (thickness === 'scaled' ? f : 1));
    else ctl.target = sn(ctl.target, Math.max(1, f));
  }
  for (const gg of Array.isArray(c.gauges) ? c.gauges : []) {
    const go = obj(gg); if (!go) continue;
    go.from = sp(go.from, f); go.to = sp(go.to, f);
  }
  const crack = obj(c.crack);
  if (crack) {
    if (Array.isArray(crack.start)) crack.start = sl(crack.start, f);
    crack.growthStep = sn(crack.growthStep, f);
    crack.averagingRadius = sn(crack.averagingRadius, f);
  }
  const mesh = obj(c.mesh);
  if (mesh) for (const k of ['size', 'tipSize', 'refineRadius']) mesh[k] = sn(mesh[k], f);
  for (const p of Array.isArray(c.probes) ? c.probes : []) { const po = obj(p); if (po) po.at = sp(po.at, f); }
  // drop keys that were absent (sn/sp keep undefined as undefined)
  strip(c);
}

function strip(v: unknown): void {
  const o = obj(v);
  if (o) { for (const k of Object.keys(o)) { if (o[k] === undefined) delete o[k]; else strip(o[k]); } }
  else if (Array.isArray(v)) v.forEach(strip);
}

/** Height of the outline's bounding box (mm): the default characteristic size D of a series. */
export function outlineHeight(c: Raw): number {
  const g = obj(c.geometry);
  const pts = g && Array.isArray(g.outline) ? (g.outline as unknown[]).filter(isPt) : [];
  if (pts.length === 0) return NaN;
  let y0 = Infinity, y1 = -Infinity;
  for (const p of pts) { y0 = Math.min(y0, p[1]); y1 = Math.max(y1, p[1]); }
  return y1 - y0;
}
