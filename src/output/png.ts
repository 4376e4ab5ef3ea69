// Raster output through sharp: SVG to PNG, and PNG frames to an animation.

import { readFileSync } from 'node:fs';
import { inflateSync } from 'node:zlib';
import sharp, { type Sharp } from 'sharp';
import { writeFileAtomic } from './files.js';
import { coloursOf, commonestColours, paletteLut, toPalette } from './raster.js';
import { gifOf } from './gif.js';

/** The width in px that an SVG document declares (its width attribute, else its viewBox). */
export function svgWidth(svg: string): number {
  const head = svg.slice(0, 2000);
  const m = /<svg\b[^>]*?\swidth="([\d.]+)(px)?"/.exec(head);
  if (m) return Number(m[1]);
  const v = /<svg\b[^>]*?\sviewBox="[\d.\-]+[ ,]+[\d.\-]+[ ,]+([\d.]+)/.exec(head);
  return v ? Number(v[1]) : 1000;
}

/**
 * Render SVG text to PNG bytes of the given width (default: the SVG's own width).
 * palette: an indexed-colour PNG, about a third of the size for pictures of few colours such as frames.
 */
export async function svgToPngBuffer(svg: string, widthPx?: number, opts: { palette?: boolean } = {}): Promise<Buffer> {
  const w0 = svgWidth(svg);
  const width = Math.max(1, Math.round(widthPx ?? w0));
  // rasterise at the density that gives the requested width, so lines and text stay sharp
  const density = Math.min(2400, Math.max(1, (72 * width) / w0));
  return sharp(Buffer.from(svg), { density, limitInputPixels: false })
    .resize({ width, kernel: 'lanczos3' })
    .flatten({ background: '#ffffff' })
    .png(opts.palette ? { palette: true, colours: 128, effort: 1, dither: 0, compressionLevel: 6 } : { compressionLevel: 9, adaptiveFiltering: true })
    .toBuffer();
}

/** Render SVG text to a PNG file, written atomically (see svgToPngBuffer). */
export async function svgToPng(svg: string, path: string, widthPx?: number, opts: { palette?: boolean } = {}): Promise<void> {
  writeFileAtomic(path, await svgToPngBuffer(svg, widthPx, opts));
}

/** Evenly spaced frame indices, always keeping the first and the last. */
export function pickFrames(count: number, maxFrames: number): number[] {
  if (count <= maxFrames) return Array.from({ length: count }, (_, i) => i);
  if (maxFrames <= 1) return [count - 1];
  const out: number[] = [];
  for (let k = 0; k < maxFrames; k++) out.push(Math.round((k * (count - 1)) / (maxFrames - 1)));
  return [...new Set(out)];
}

/** Delays of an animation's pages (ms): each delayMs, the last held holdLastMs (at least delayMs). */
export function animationDelays(count: number, delayMs = 120, holdLastMs = 1500): number[] {
  const delay = Math.round(delayMs), hold = Math.round(holdLastMs);
  return Array.from({ length: count }, (_, k) => (k === count - 1 ? Math.max(delay, hold) : delay));
}

/** Join PNG frames (all brought to the first frame's size, at most maxWidth wide) into a looping GIF or WebP animation. */
export async function framesToAnimation(
  pngPaths: string[],
  path: string,
  opts: { delayMs?: number; holdLastMs?: number; maxFrames?: number; maxWidth?: number; format?: 'gif' | 'webp' } = {},
): Promise<void> {
  if (pngPaths.length === 0) throw new Error('framesToAnimation: no frames');
  const pick = pickFrames(pngPaths.length, Math.max(1, opts.maxFrames ?? 120));
  const format = opts.format ?? (path.toLowerCase().endsWith('.webp') ? 'webp' : 'gif');
  const first = await sharp(readFileSync(pngPaths[pick[0]])).metadata();
  // a bounded page keeps the animation small however large the frames are
  const w0 = first.width ?? 1, h0 = first.height ?? 1;
  const width = Math.min(w0, Math.max(1, Math.round(opts.maxWidth ?? w0))), height = Math.max(1, Math.round((h0 * width) / w0));
  // frames from a growing crack can differ in height; pad them onto one white page size, and stack
  // the raw pages into one tall image (no PNG encode and decode of every page in between)
  const pages = await Promise.all(pick.map((i) =>
    sharp(readFileSync(pngPaths[i]))
      .resize({ width, height, fit: 'contain', position: 'top', background: '#ffffff' })
      .flatten({ background: '#ffffff' })
      .removeAlpha()
      .raw()
      .toBuffer()));
  const page = width * height * 3;
  const delays = animationDelays(pick.length, opts.delayMs, opts.holdLastMs);
  if (format === 'gif') {
    // frames that share a palette of at most 255 colours (rupta's own) go into a GIF with that
    // palette: no quantiser, and the pixels a frame leaves as they were stay transparent
    const last = readFileSync(pngPaths[pick[pick.length - 1]]);
    const palette = pngPalette(last) ?? coloursOf(await sharp(last).flatten({ background: '#ffffff' }).removeAlpha().raw().toBuffer());
    if (palette.length / 3 <= 255) {
      const lut = paletteLut();
      writeFileAtomic(path, gifOf(pages.map((b) => toPalette(b.subarray(0, page), palette, lut)), width, height, palette, delays));
      return;
    }
  }
  // the raw pages stacked into one tall image
  const stack = Buffer.alloc(page * pages.length);
  pages.forEach((b, k) => b.copy(stack, k * page, 0, page));
  const joined = sharp(stack, { raw: { width, height: height * pages.length, channels: 3, pageHeight: height } });
  const buf = format === 'webp'
    ? await joined.webp({ loop: 0, delay: delays, quality: 90, effort: 4 }).toBuffer()
    // small colour errors between frames let unchanged parts stay transparent: a quarter smaller;
    // no dithering: the frames are flat colours, and it saves a fifth of the time
    : await joined.gif({ loop: 0, delay: delays, effort: 3, interFrameMaxError: 8, dither: 0 }).toBuffer();
  writeFileAtomic(path, buf);
}

/**
 * The colour table (r, g, b, …) of an indexed PNG without transparency, as the PNG specification
 * lays out its chunks (PLTE; no tRNS); null for any other PNG.
 */
export function pngPalette(png: Uint8Array): Uint8Array | null {
  const b = Buffer.from(png.buffer, png.byteOffset, png.byteLength);
  if (b.length < 33 || b.readUInt32BE(0) !== 0x89504e47 || b[25] !== 3) return null; // colour type 3: indexed
  let plte: Uint8Array | null = null;
  for (let o = 8; o + 8 <= b.length;) {
    const n = b.readUInt32BE(o), type = b.toString('latin1', o + 4, o + 8);
    if (o + 12 + n > b.length) return null;
    if (type === 'PLTE') plte = Uint8Array.from(b.subarray(o + 8, o + 8 + n));
    else if (type === 'tRNS') return null;
    else if (type === 'IDAT' || type === 'IEND') break;
    o += 12 + n;
  }
  return plte;
}

/**
 * The colours of an indexed PNG (8 bits, not interlaced, no transparency) in the order its pixels
 * first show them, as coloursOf gives for the decoded picture (at most max: the rarest left out),
 * counted on the indices themselves; null for any other PNG.
 */
export function pngColours(png: Uint8Array, max = Infinity): Uint8Array | null {
  const b = Buffer.from(png.buffer, png.byteOffset, png.byteLength), plte = pngPalette(png);
  if (!plte || b[24] !== 8 || b[28] !== 0) return null; // bit depth 8, no interlace
  const width = b.readUInt32BE(16), height = b.readUInt32BE(20), idat: Buffer[] = [];
  for (let o = 8; o + 12 <= b.length;) {
    const n = b.readUInt32BE(o), type = b.toString('latin1', o + 4, o + 8);
    if (type === 'IDAT') idat.push(b.subarray(o + 8, o + 8 + n));
    else if (type === 'IEND') break;
    o += 12 + n;
  }
  const rows = inflateSync(Buffer.concat(idat)), m = width + 1, np = plte.length / 3;
  if (rows.length < m * height) return null;
  // undo the rows' filters (PNG specification, one byte a pixel), counting each index in pixel order
  const count = new Float64Array(256), order: number[] = [];
  for (let r = 0; r < height; r++) {
    const f = rows[r * m], o = r * m + 1, up = o - m;
    for (let c = 0; c < width; c++) {
      const left = c > 0 ? rows[o + c - 1] : 0, above = r > 0 ? rows[up + c] : 0, corner = r > 0 && c > 0 ? rows[up + c - 1] : 0;
      let v = rows[o + c];
      if (f === 1) v += left;
      else if (f === 2) v += above;
      else if (f === 3) v += (left + above) >> 1;
      else if (f === 4) {
        const p = left + above - corner, pa = Math.abs(p - left), pb = Math.abs(p - above), pc = Math.abs(p - corner);
        v += pa <= pb && pa <= pc ? left : pb <= pc ? above : corner;
      }
      v &= 255;
      rows[o + c] = v;
      if (v >= np) return null;
      if (count[v]++ === 0) order.push(v);
    }
  }
  // entries of one colour count as one, first shown where the first of them is
  const key = (q: number): number => (plte[3 * q] << 16) | (plte[3 * q + 1] << 8) | plte[3 * q + 2];
  const byKey = new Map<number, number>();
  for (const q of order) byKey.set(key(q), (byKey.get(key(q)) ?? 0) + count[q]);
  return commonestColours(byKey, max);
}

/** A PNG data URI whose text never contains "http", so a page can be checked for outside addresses by a plain search. */
export async function pngDataUri(img: Sharp): Promise<string> {
  const flat = img.flatten({ background: '#ffffff' });
  let b64 = '';
  for (let level = 9; level >= 0; level--) {
    // palette PNG: these pictures have few colours, so it is much smaller at no visible cost
    b64 = (await flat.clone().png({ palette: true, colours: 128, dither: 0, compressionLevel: level, effort: 1 }).toBuffer()).toString('base64');
    if (!b64.includes('http')) break;
  }
  return `data:image/png;base64,${b64}`;
}
