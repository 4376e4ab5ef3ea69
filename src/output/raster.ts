// A small RGB canvas for frames: polygons filled by scanlines (pixel centres inside, so cells that
// share edges tile without seams or overlap), strokes as the union of capsules around their
// segments (round caps and joins, edge coverage from the distance to the segment), painted once per
// stroke with its colour and opacity so overlapping pieces do not darken. Integer blending, so the
// same drawing gives the same bytes. With a palette, the canvas holds one palette index a pixel
// instead of RGB: fills write the index of their colour, and a blend takes the entry nearest to
// the blended colour, found once for each (entry under it, colour, opacity) and kept, so a frame
// needs no look-up pass and its PNG rows are the canvas itself.

import * as zlib from 'node:zlib';

export type Rgb = readonly [number, number, number];

/** #rrggbb → [r, g, b]. */
export function rgb(hex: string): Rgb {
  const v = parseInt(hex.slice(1, 7), 16);
  return [(v >> 16) & 255, (v >> 8) & 255, v & 255];
}

export class Canvas {
  width = 0;
  height = 0;
  /** Three bytes a pixel, rows top to bottom (RGB mode). */
  px = new Uint8Array(0);
  /** One palette index a pixel, rows top to bottom (index mode). */
  ix = new Uint8Array(0);
  /** The palette of index mode, null in RGB mode. */
  mix: PaletteMix | null = null;
  /** Coverage of the stroke being built, 0..1 a pixel; zero but at the pixels listed in touched. */
  private cov = new Float32Array(0);
  /** The pixels the stroke being built covers, nt of them: paint visits these alone. */
  private touched = new Int32Array(0);
  private nt = 0;
  // the clipped box of the piece being added: columns [c0, c1), rows [r0, r1)
  private c0 = 0; private r0 = 0; private c1 = 0; private r1 = 0;
  // scanline crossings, reused
  private xs = new Float64Array(64);

  /**
   * A page of w × h px in one colour (buffers are kept when the size repeats); with mix, in index
   * mode: palette indices drawn by the mix's blends.
   */
  reset(w: number, h: number, bg: Rgb, mix: PaletteMix | null = null): void {
    if (w !== this.width || h !== this.height) {
      this.width = w; this.height = h;
      this.px = new Uint8Array(0); this.ix = new Uint8Array(0);
      this.cov = new Float32Array(w * h);
      this.touched = new Int32Array(w * h);
    }
    this.mix = mix;
    if (mix) {
      if (this.ix.length !== w * h) this.ix = new Uint8Array(w * h);
      this.ix.fill(mix.ixOf(bg));
    } else {
      if (this.px.length !== 3 * w * h) this.px = new Uint8Array(3 * w * h);
      fillRgb(this.px, 0, w * h, bg);
    }
    for (let j = 0; j < this.nt; j++) this.cov[this.touched[j]] = 0; // a stroke left unpainted
    this.nt = 0;
  }

  /** Pixels c0..c1 (inclusive, row-major indices) in colour c. */
  private span(i0: number, i1: number, c: Rgb, ci: number): void {
    if (this.mix) this.ix.fill(ci, i0, i1 + 1);
    else for (let k = 3 * i0, e = 3 * i1; k <= e; k += 3) { this.px[k] = c[0]; this.px[k + 1] = c[1]; this.px[k + 2] = c[2]; }
  }

  /** Every row from r on in colour c. */
  fillRows(r: number, c: Rgb): void {
    const i0 = Math.max(0, r) * this.width, n = this.width * this.height;
    if (i0 >= n) return;
    if (this.mix) this.ix.fill(this.mix.ixOf(c), i0);
    else fillRgb(this.px, i0, n, c);
  }

  private mixC: Rgb | null = null;
  private mixT: Int16Array = new Int16Array(0);

  /** Lay colour c at coverage a (0..255) over pixel i. */
  mixAt(i: number, c: Rgb, a: number): void {
    const m = this.mix;
    if (m) {
      if (c !== this.mixC) { this.mixT = m.table(c); this.mixC = c; }
      this.ix[i] = m.mix(this.mixT, this.ix[i], c, a);
      return;
    }
    const p = this.px, k = 3 * i, b = 255 - a;
    p[k] = (p[k] * b + c[0] * a + 127) / 255 | 0;
    p[k + 1] = (p[k + 1] * b + c[1] * a + 127) / 255 | 0;
    p[k + 2] = (p[k + 2] * b + c[2] * a + 127) / 255 | 0;
  }

  /** Fill a polygon (flat x, y screen points; even–odd rule) without anti-aliasing. */
  fillPolygon(x: ArrayLike<number>, y: ArrayLike<number>, idx: ArrayLike<number>, from: number, to: number, c: Rgb): void {
    const n = to - from;
    if (n < 3) return;
    let ymin = Infinity, ymax = -Infinity;
    for (let q = from; q < to; q++) { const v = y[idx[q]]; if (v < ymin) ymin = v; if (v > ymax) ymax = v; }
    const r0 = Math.max(0, Math.ceil(ymin - 0.5)), r1 = Math.min(this.height - 1, Math.floor(ymax - 0.5));
    if (this.xs.length < n) this.xs = new Float64Array(2 * n);
    const xs = this.xs, W = this.width, ci = this.mix ? this.mix.ixOf(c) : 0;
    for (let r = r0; r <= r1; r++) {
      const yc = r + 0.5;
      let m = 0;
      for (let q = from; q < to; q++) {
        const a = idx[q], b = idx[q + 1 < to ? q + 1 : from];
        const ya = y[a], yb = y[b];
        // half-open in y: a vertex on the scanline counts once
        if ((ya <= yc) !== (yb <= yc)) xs[m++] = x[a] + ((yc - ya) / (yb - ya)) * (x[b] - x[a]);
      }
      for (let i = 1; i < m; i++) { const v = xs[i]; let j = i - 1; while (j >= 0 && xs[j] > v) { xs[j + 1] = xs[j]; j--; } xs[j + 1] = v; }
      for (let i = 0; i + 1 < m; i += 2) {
        const c0 = Math.max(0, Math.ceil(xs[i] - 0.5)), c1 = Math.min(W - 1, Math.ceil(xs[i + 1] - 0.5) - 1);
        if (c1 >= c0) this.span(r * W + c0, r * W + c1, c, ci);
      }
    }
  }

  /** Fill a polygon given as flat [x0, y0, x1, y1, …] points. */
  fillPoints(pts: ArrayLike<number>, c: Rgb): void {
    const n = pts.length >> 1, x = new Float64Array(n), y = new Float64Array(n), idx = new Int32Array(n);
    for (let i = 0; i < n; i++) { x[i] = pts[2 * i]; y[i] = pts[2 * i + 1]; idx[i] = i; }
    this.fillPolygon(x, y, idx, 0, n, c);
  }

  private clip(x0: number, y0: number, x1: number, y1: number): void {
    this.c0 = Math.max(0, Math.floor(x0)); this.r0 = Math.max(0, Math.floor(y0));
    this.c1 = Math.min(this.width, Math.ceil(x1) + 1); this.r1 = Math.min(this.height, Math.ceil(y1) + 1);
  }

  /** Add a segment of width w (px) with round ends to the stroke being built. */
  segment(xa: number, ya: number, xb: number, yb: number, w: number): void {
    const h = w / 2 + 0.5, h2 = h * h, top = Math.min(1, w), in2 = h > top ? (h - top) * (h - top) : -1; // within √in2: fully covered
    // only pixels whose centres lie less than h beyond the segment's box can be covered
    const c0 = Math.max(0, Math.floor(Math.min(xa, xb) - h - 0.5) + 1), c1 = Math.min(this.width, Math.ceil(Math.max(xa, xb) + h - 0.5));
    const r0 = Math.max(0, Math.floor(Math.min(ya, yb) - h - 0.5) + 1), r1 = Math.min(this.height, Math.ceil(Math.max(ya, yb) + h - 0.5));
    const dx = xb - xa, dy = yb - ya, L2 = dx * dx + dy * dy, cov = this.cov, W = this.width, touched = this.touched;
    const inv = L2 > 0 ? 1 / L2 : 0;
    let nt = this.nt;
    // on each row, only the columns within h of the segment's line (a pixel farther away is not
    // covered): a slanted thin stroke then visits a band instead of its whole box
    const ady = Math.abs(dy), band = ady > 1e-9 * Math.sqrt(L2) ? (h * Math.sqrt(L2)) / ady + 1e-6 : Infinity;
    for (let r = r0; r < r1; r++) {
      const py = r + 0.5 - ya;
      let cA = c0, cB = c1;
      if (band !== Infinity) {
        // the column whose centre lies on the line; a column k away lies k·|dy|/L from it, so
        // only those less than band away can be covered
        const mid = xa + (py * dx) / dy - 0.5;
        cA = Math.max(c0, Math.ceil(mid - band)); cB = Math.min(c1, Math.floor(mid + band) + 1);
      }
      // the pixel centre's offset from the start and its projection on the segment, stepped along the row
      let px = cA + 0.5 - xa, dot = px * dx + py * dy;
      for (let c = cA; c < cB; c++, px += 1, dot += dx) {
        let t = dot * inv;
        t = t < 0 ? 0 : t > 1 ? 1 : t;
        const ex = px - t * dx, ey = py - t * dy, d2 = ex * ex + ey * ey;
        if (d2 >= h2) continue; // not covered: no root to take
        const v = d2 <= in2 ? top : Math.min(top, h - Math.sqrt(d2)), i = r * W + c, was = cov[i];
        if (v > was) { if (was === 0) touched[nt++] = i; cov[i] = v; }
      }
    }
    this.nt = nt;
  }

  /** Add a polyline (flat points; closed loops repeat their first point). */
  polyline(pts: ArrayLike<number>, w: number): void {
    for (let i = 0; i + 3 < pts.length; i += 2) this.segment(pts[i], pts[i + 1], pts[i + 2], pts[i + 3], w);
    if (pts.length === 2) this.segment(pts[0], pts[1], pts[0], pts[1], w);
  }

  /** Add a dashed polyline: on px drawn, off px left out, the pattern running on along the line. */
  dashed(pts: ArrayLike<number>, w: number, on: number, off: number): void {
    if (!(on > 0) || !(off >= 0)) return;
    let drawing = true, left = on; // the dash or gap under way, and what remains of it
    for (let i = 0; i + 3 < pts.length; i += 2) {
      const xa = pts[i], ya = pts[i + 1], dx = pts[i + 2] - xa, dy = pts[i + 3] - ya, L = Math.hypot(dx, dy);
      if (!(L > 0)) continue;
      let s = 0;
      while (s < L) {
        if (!(left > 0)) { drawing = !drawing || !(off > 0); left = drawing ? on : off; }
        const e = Math.min(L, s + left);
        if (drawing) this.segment(xa + (dx * s) / L, ya + (dy * s) / L, xa + (dx * e) / L, ya + (dy * e) / L, w);
        // the dash or gap ends inside this segment: switch, however little was left (no stall on round-off)
        if (e >= L) { left -= L - s; break; }
        s = e; left = 0;
      }
    }
  }

  /** Add a disc of radius r. */
  disc(cx: number, cy: number, r: number): void {
    this.clip(cx - r - 1, cy - r - 1, cx + r + 1, cy + r + 1);
    for (let y = this.r0; y < this.r1; y++) for (let x = this.c0; x < this.c1; x++) this.cover(y * this.width + x, Math.min(1, r + 0.5 - Math.hypot(x + 0.5 - cx, y + 0.5 - cy)));
  }

  /** Add a circle's outline of width w at radius r. */
  ring(cx: number, cy: number, r: number, w: number): void {
    const h = w / 2 + 0.5, top = Math.min(1, w);
    this.clip(cx - r - h, cy - r - h, cx + r + h, cy + r + h);
    for (let y = this.r0; y < this.r1; y++) for (let x = this.c0; x < this.c1; x++) this.cover(y * this.width + x, Math.min(top, h - Math.abs(Math.hypot(x + 0.5 - cx, y + 0.5 - cy) - r)));
  }

  /** Raise pixel i's coverage to v. */
  private cover(i: number, v: number): void {
    const was = this.cov[i];
    if (v > was) { if (was === 0) this.touched[this.nt++] = i; this.cov[i] = v; }
  }

  /** Paint the stroke built so far in colour c at the given opacity, and start a new one. */
  paint(c: Rgb, opacity = 1): void {
    const cov = this.cov, p = this.px, m = this.mix, touched = this.touched, nt = this.nt;
    this.nt = 0;
    if (m) {
      // the coverage straight to its level (see PaletteMix.mix), the table looked up here
      const ix = this.ix, t = m.table(c), f = MIX_LEVELS * opacity;
      for (let j = 0; j < nt; j++) {
        const i = touched[j], v = cov[i];
        cov[i] = 0;
        const l = (f * (v > 1 ? 1 : v) + 0.5) | 0;
        if (l === 0) continue;
        const d = ix[i], e = t[(d << 6) | l];
        ix[i] = e >= 0 ? e : m.mixLevel(t, d, c, l);
      }
      return;
    }
    for (let j = 0; j < nt; j++) {
      const i = touched[j], v = cov[i];
      cov[i] = 0;
      const a = Math.round(255 * opacity * (v > 1 ? 1 : v)), b = 255 - a, k = 3 * i;
      p[k] = (p[k] * b + c[0] * a + 127) / 255 | 0;
      p[k + 1] = (p[k + 1] * b + c[1] * a + 127) / 255 | 0;
      p[k + 2] = (p[k + 2] * b + c[2] * a + 127) / 255 | 0;
    }
  }

  /** Lay a sparse RGBA overlay (pixel indices and their four bytes, not premultiplied) over the page. */
  overlay(o: Overlay): void {
    const p = this.px, { at, rgba } = o, m = this.mix;
    if (m) {
      // each overlay pixel keeps the entry it last lay on and the blend it gave: frames differ little under their text
      let memo = o.memo;
      if (!memo || memo.mix !== m) memo = o.memo = { mix: m, under: new Int16Array(at.length).fill(-1), res: new Uint8Array(at.length) };
      const ix = this.ix, under = memo.under, res = memo.res, P = m.palette;
      for (let j = 0; j < at.length; j++) {
        const i = at[j], d = ix[i];
        if (under[j] === d) { ix[i] = res[j]; continue; }
        const a = rgba[4 * j + 3], b = 255 - a, q = 3 * d;
        const v = m.nearest(
          (P[q] * b + rgba[4 * j] * a + 127) / 255 | 0, (P[q + 1] * b + rgba[4 * j + 1] * a + 127) / 255 | 0, (P[q + 2] * b + rgba[4 * j + 2] * a + 127) / 255 | 0);
        under[j] = d; res[j] = v; ix[i] = v;
      }
      return;
    }
    for (let j = 0; j < at.length; j++) {
      const k = 3 * at[j], a = rgba[4 * j + 3], b = 255 - a;
      p[k] = (p[k] * b + rgba[4 * j] * a + 127) / 255 | 0;
      p[k + 1] = (p[k + 1] * b + rgba[4 * j + 1] * a + 127) / 255 | 0;
      p[k + 2] = (p[k + 2] * b + rgba[4 * j + 2] * a + 127) / 255 | 0;
    }
  }
}

/** The drawn pixels of an RGBA picture: their indices and colours (memo: index mode's blends, see Canvas.overlay). */
export interface Overlay { at: Int32Array; rgba: Uint8Array; memo?: { mix: PaletteMix; under: Int16Array; res: Uint8Array } }

/** Pixels i0..i1 (exclusive) of an RGB buffer in colour c, by doubling copies. */
function fillRgb(p: Uint8Array, i0: number, i1: number, c: Rgb): void {
  if (i1 <= i0) return;
  const k0 = 3 * i0, e = 3 * i1;
  p[k0] = c[0]; p[k0 + 1] = c[1]; p[k0 + 2] = c[2];
  for (let filled = 3; filled < e - k0; filled *= 2) p.copyWithin(k0 + filled, k0, k0 + Math.min(filled, e - k0 - filled));
}

/** Steps of coverage in the palette's blends (at most 63: see PaletteMix.table). */
const MIX_LEVELS = 32;

/**
 * Blends within a fixed palette (at most 256 entries): the entry nearest to a colour, and to an
 * entry overlaid by a colour at some coverage, each searched once and kept.
 */
export class PaletteMix {
  private near = new Map<number, number>();
  private tables = new Map<number, Int16Array>();
  constructor(readonly palette: Uint8Array) {
    const n = palette.length / 3;
    if (n < 1 || n > 256 || n % 1 !== 0) throw new Error(`PaletteMix: a palette of ${n} colours`);
  }

  /** The entry nearest to (r, g, b), weighted as toPalette's search (the first of equals). */
  nearest(r: number, g: number, b: number): number {
    const key = r | (g << 8) | (b << 16);
    let j = this.near.get(key);
    if (j === undefined) { j = nearestEntry(this.palette, r, g, b); this.near.set(key, j); }
    return j;
  }

  ixOf(c: Rgb): number { return this.nearest(c[0], c[1], c[2]); }

  /** The blends of colour c over every entry: [entry << 6 | coverage level] → entry, -1 until met. */
  table(c: Rgb): Int16Array {
    const key = c[0] | (c[1] << 8) | (c[2] << 16);
    let t = this.tables.get(key);
    if (!t) { t = new Int16Array(256 << 6).fill(-1); this.tables.set(key, t); }
    return t;
  }

  /**
   * Entry d overlaid by colour c at coverage a (0..255), through c's table t. The coverage is
   * taken in MIX_LEVELS steps: finer steps than the palette's colours can tell apart, and each
   * blend is searched once a run rather than once for each of 256 coverages.
   */
  mix(t: Int16Array, d: number, c: Rgb, a: number): number {
    return this.mixLevel(t, d, c, (a * MIX_LEVELS + 127) / 255 | 0);
  }

  /** Entry d overlaid by colour c at coverage level l (0..MIX_LEVELS), through c's table t. */
  mixLevel(t: Int16Array, d: number, c: Rgb, l: number): number {
    const k = (d << 6) | l;
    let v = t[k];
    if (v < 0) {
      const P = this.palette, q = 3 * d, w = Math.round((255 * l) / MIX_LEVELS), b = 255 - w;
      v = t[k] = this.nearest((P[q] * b + c[0] * w + 127) / 255 | 0, (P[q + 1] * b + c[1] * w + 127) / 255 | 0, (P[q + 2] * b + c[2] * w + 127) / 255 | 0);
    }
    return v;
  }
}

/** The palette entry nearest to (r, g, b). */
function nearestEntry(palette: Uint8Array, r: number, g: number, b: number): number {
  let best = 0, bd = Infinity;
  for (let q = 0, n = palette.length / 3; q < n; q++) {
    const dr = palette[3 * q] - r, dg = palette[3 * q + 1] - g, db = palette[3 * q + 2] - b;
    // weights of the eye's sensitivity (common practice for colour distance in RGB)
    const d = 2 * dr * dr + 4 * dg * dg + 3 * db * db;
    if (d < bd) { bd = d; best = q; }
  }
  return best;
}

/** The pixels of an RGBA buffer that are not fully transparent. */
export function overlayOf(data: Uint8Array): Overlay {
  let n = 0;
  for (let i = 3; i < data.length; i += 4) if (data[i] > 0) n++;
  const at = new Int32Array(n), rgba = new Uint8Array(4 * n);
  for (let i = 0, j = 0; 4 * i < data.length; i++) {
    if (data[4 * i + 3] === 0) continue;
    at[j] = i;
    rgba.set(data.subarray(4 * i, 4 * i + 4), 4 * j);
    j++;
  }
  return { at, rgba };
}

// CRC-32 of PNG chunks (ISO 3309, the PNG specification's)
const CRC_TABLE = (() => {
  const t = new Int32Array(256);
  for (let n = 0; n < 256; n++) { let c = n; for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1; t[n] = c; }
  return t;
})();
function crc32js(b: Uint8Array): number {
  let c = -1;
  for (let i = 0; i < b.length; i++) c = CRC_TABLE[(c ^ b[i]) & 255] ^ (c >>> 8);
  return (c ^ -1) >>> 0;
}
// zlib's own (the same CRC) where this Node has it, from 20.15 on: a frame's IDAT in a tenth of the time
const crc32: (b: Uint8Array) => number = (zlib as { crc32?: (b: Uint8Array) => number }).crc32 ?? crc32js;
function chunk(type: string, data: Uint8Array): Buffer {
  const out = Buffer.alloc(12 + data.length);
  out.writeUInt32BE(data.length, 0);
  out.write(type, 4, 'latin1');
  out.set(data, 8);
  out.writeUInt32BE(crc32(out.subarray(4, 8 + data.length)), 8 + data.length);
  return out;
}

/**
 * Palette entry of every colour met so far (2^24 indices, and 2^21 bytes of bits saying which are
 * known); a colour not in the palette takes the entry nearest to its 5-bit-per-channel cell's
 * centre (2^15 of them, -1 until searched), so a resized picture's many blends cost few searches.
 */
export interface PaletteLut { index: Uint8Array; known: Uint8Array; cell: Int16Array; exact: Map<number, number> | null }
export const paletteLut = (): PaletteLut => ({ index: new Uint8Array(1 << 24), known: new Uint8Array(1 << 21), cell: new Int16Array(1 << 15).fill(-1), exact: null });

/** RGB pixels as indices of their nearest palette entries (at most 256), into out when given. */
export function toPalette(px: Uint8Array, palette: Uint8Array, lut: PaletteLut, out: Uint8Array = new Uint8Array(px.length / 3)): Uint8Array {
  const n = palette.length / 3;
  if (n < 1 || n > 256 || n % 1 !== 0) throw new Error(`toPalette: a palette of ${n} colours`);
  // a colour's key: r | g << 8 | b << 16, the three bytes read at once (little-endian)
  if (!lut.exact) {
    lut.exact = new Map();
    for (let q = n - 1; q >= 0; q--) lut.exact.set(palette[3 * q] | (palette[3 * q + 1] << 8) | (palette[3 * q + 2] << 16), q);
  }
  const exact = lut.exact, index = lut.index, known = lut.known;
  const nearest = (r: number, g: number, b: number): number => nearestEntry(palette, r, g, b);
  // a colour not met before: its palette entry, or the entry nearest to its cell's centre
  const learn = (key: number): number => {
    let j = exact.get(key);
    if (j === undefined) {
      const r = key & 255, g = (key >> 8) & 255, b = key >> 16;
      const c = ((r >> 3) << 10) | ((g >> 3) << 5) | (b >> 3);
      if (lut.cell[c] < 0) lut.cell[c] = nearest((r & 0xf8) + 4, (g & 0xf8) + 4, (b & 0xf8) + 4);
      j = lut.cell[c];
    }
    index[key] = j;
    known[key >> 3] |= 1 << (key & 7);
    return j;
  };
  const m = px.length / 3;
  if (m === 0) return out;
  const dv = new DataView(px.buffer, px.byteOffset, px.byteLength);
  let last = -1, lastIx = 0;
  for (let i = 0, k = 0; i < m; i++, k += 3) {
    // four bytes read at once, but not past the end
    const key = i + 1 < m ? dv.getUint32(k, true) & 0xffffff : px[k] | (px[k + 1] << 8) | (px[k + 2] << 16);
    // most pixels repeat their left neighbour (flat cells, white page)
    if (key === last) { out[i] = lastIx; continue; }
    out[i] = lastIx = (known[key >> 3] & (1 << (key & 7))) === 0 ? learn(key) : index[key];
    last = key;
  }
  return out;
}

/** Pixels mapped to a fixed palette and written as an indexed PNG: rows unfiltered, as the PNG specification recommends for palette images, then deflated. */
export function indexedPng(px: Uint8Array, width: number, height: number, palette: Uint8Array, lut: PaletteLut, deflate: (b: Uint8Array) => Uint8Array, scratch?: Uint8Array): Buffer {
  const rows = scratch && scratch.length === (width + 1) * height ? scratch : new Uint8Array((width + 1) * height);
  const bytes = Buffer.from(px.buffer, px.byteOffset, px.byteLength), n = 3 * width, m = width + 1;
  for (let r = 0; r < height; r++) {
    rows[r * m] = 0; // filter: none
    // a row like the one above it (about a quarter of a frame's: margins, flat parts) takes its indices
    if (r > 0 && bytes.compare(bytes, (r - 1) * n, r * n, r * n, (r + 1) * n) === 0) rows.copyWithin(r * m + 1, (r - 1) * m + 1, r * m);
    else toPalette(px.subarray(r * n, (r + 1) * n), palette, lut, rows.subarray(r * m + 1, (r + 1) * m));
  }
  return pngOfRows(rows, width, height, palette, deflate);
}

/** Palette indices (width × height, rows top to bottom) as an indexed PNG, rows unfiltered. */
export function pngOfIndices(ix: Uint8Array, width: number, height: number, palette: Uint8Array, deflate: (b: Uint8Array) => Uint8Array, scratch?: Uint8Array): Buffer {
  const m = width + 1, rows = scratch && scratch.length === m * height ? scratch : new Uint8Array(m * height);
  for (let r = 0; r < height; r++) { rows[r * m] = 0; rows.set(ix.subarray(r * width, (r + 1) * width), r * m + 1); }
  return pngOfRows(rows, width, height, palette, deflate);
}

/** The PNG of filtered rows (a filter byte, then the row's indices) of an indexed picture. */
function pngOfRows(rows: Uint8Array, width: number, height: number, palette: Uint8Array, deflate: (b: Uint8Array) => Uint8Array): Buffer {
  const head = Buffer.alloc(13);
  head.writeUInt32BE(width, 0); head.writeUInt32BE(height, 4);
  head[8] = 8; head[9] = 3; // 8 bits, indexed colour
  return Buffer.concat([Buffer.from([137, 80, 78, 71, 13, 10, 26, 10]), chunk('IHDR', head), chunk('PLTE', palette), chunk('IDAT', deflate(rows)), chunk('IEND', new Uint8Array(0))]);
}

/** The distinct colours of RGB pixels in the order they first appear; beyond max of them, the rarest are left out. */
export function coloursOf(px: Uint8Array, max = Infinity): Uint8Array {
  const count = new Map<number, number>();
  for (let k = 0; k < px.length; k += 3) {
    const key = (px[k] << 16) | (px[k + 1] << 8) | px[k + 2];
    count.set(key, (count.get(key) ?? 0) + 1);
  }
  return commonestColours(count, max);
}

/** Packed RGB keys (0xRRGGBB) with their pixel counts, in first-seen order, as RGB triples; beyond max, the rarest left out. */
export function commonestColours(count: ReadonlyMap<number, number>, max: number): Uint8Array {
  let keys = [...count.keys()];
  if (keys.length > max) {
    const keep = new Set([...keys].sort((a, b) => count.get(b)! - count.get(a)! || a - b).slice(0, max));
    keys = keys.filter((k) => keep.has(k));
  }
  const out = new Uint8Array(3 * keys.length);
  keys.forEach((k, i) => { out[3 * i] = k >> 16; out[3 * i + 1] = (k >> 8) & 255; out[3 * i + 2] = k & 255; });
  return out;
}
