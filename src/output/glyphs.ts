// Lines of text drawn from glyphs rendered once: each character a line needs is rendered by
// libvips from SVG (our font, at four quarter-pixel offsets), and its advance measured from a run
// of copies of it; a line is then laid out character by character (no kerning) and its glyphs
// blended onto the canvas. Frames change only their caption's numbers, so after the first frame
// no text is rendered again.

import sharp from 'sharp';
import type { Canvas, Rgb } from './raster.js';
import { svgDocument, text } from './svg.js';

/** Copies of a character in the run its advance is measured from. */
const RUN = 8;
/** Sub-pixel offsets a glyph is rendered at (quarters of a pixel). */
const PHASES = 4;

interface Glyph { advance: number; w: number; h: number; left: number; top: number; cover: Uint8Array[] }

export class GlyphText {
  private glyphs = new Map<string, Glyph>();

  /** Text of fontPx px (height of the em) in our font. */
  constructor(readonly fontPx: number) {}

  /** Render the characters of these lines not met before (one libvips call for all of them). */
  async prepare(lines: string[]): Promise<void> {
    const fresh = [...new Set([...lines.join('')])].filter((ch) => !this.glyphs.has(ch) && ch !== '\n');
    if (fresh.length === 0) return;
    // pad: room left of the pen for ink that reaches back past it (the tail of a j)
    const fs = this.fontPx, band = Math.ceil(2 * fs), box = Math.ceil(2 * fs), x0 = Math.ceil(fs), pad = Math.ceil(0.3 * fs);
    // each band: the glyph at the four offsets, then a run of (glyph, H) pairs; the first band holds a run of H alone
    const runX = x0 + PHASES * box + box, W = Math.ceil(runX + (RUN + 2) * 2 * fs), H = band * (fresh.length + 1);
    const base = (b: number): number => b * band + Math.round(1.3 * fs);
    const body: string[] = [text(runX, base(0), 'H'.repeat(RUN), { 'font-size': fs }), text(x0 + pad, base(0), 'H', { 'font-size': fs })];
    fresh.forEach((ch, j) => {
      const b = j + 1;
      for (let k = 0; k < PHASES; k++) body.push(text(x0 + k * box + pad + k / PHASES, base(b), ch, { 'font-size': fs, 'xml:space': 'preserve' }));
      body.push(text(runX, base(b), (ch + 'H').repeat(RUN), { 'font-size': fs, 'xml:space': 'preserve' }));
    });
    const px = await sharp(Buffer.from(svgDocument(W, H, body, { background: 'none' })), { density: 72 }).ensureAlpha().extractChannel(3).raw().toBuffer();
    // the right end of the ink in a band between two columns, to a fraction of a pixel
    const inkRight = (b: number, c0: number, c1: number): number => {
      for (let c = c1 - 1; c >= c0; c--) {
        let a = 0;
        for (let r = b * band; r < (b + 1) * band; r++) a = Math.max(a, px[r * W + c]);
        if (a > 0) return c + a / 255;
      }
      return c0;
    };
    const runEnd = (b: number): number => inkRight(b, runX, W);
    const hOne = inkRight(0, x0, x0 + box) - x0 - pad;
    const hAdvance = (runEnd(0) - runX - hOne) / (RUN - 1);
    fresh.forEach((ch, j) => {
      const b = j + 1;
      // the last H of RUN pairs starts RUN glyphs and RUN - 1 H past the run's start
      const advance = (runEnd(b) - runX - hOne - (RUN - 1) * hAdvance) / RUN;
      // each offset's glyph, cut to the box of its ink
      let l = box, t = band, r = -1, btm = -1;
      for (let k = 0; k < PHASES; k++) for (let y = 0; y < band; y++) for (let x = 0; x < box; x++) {
        if (px[(b * band + y) * W + x0 + k * box + x] > 0) { if (x < l) l = x; if (x > r) r = x; if (y < t) t = y; if (y > btm) btm = y; }
      }
      const w = r >= l ? r - l + 1 : 0, h = btm >= t ? btm - t + 1 : 0;
      const cover = Array.from({ length: PHASES }, (_, k) => {
        const g = new Uint8Array(w * h);
        for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) g[y * w + x] = px[(b * band + t + y) * W + x0 + k * box + l + x];
        return g;
      });
      this.glyphs.set(ch, { advance, w, h, left: l - pad, top: t - (base(b) - b * band), cover });
    });
  }

  /** Width of a line (px), as draw lays it out. */
  width(line: string): number {
    let x = 0;
    for (const ch of line) x += this.glyphs.get(ch)?.advance ?? 0;
    return x;
  }

  /** Draw a prepared line in colour c, starting at x with its baseline at row y (rounded). */
  draw(cv: Canvas, x: number, y: number, line: string, c: Rgb): void {
    const W = cv.width, Hc = cv.height, by = Math.round(y);
    let pen = x;
    for (const ch of line) {
      const g = this.glyphs.get(ch);
      if (!g) continue;
      // the offset nearest to the pen's fraction of a pixel
      let ix = Math.floor(pen), k = Math.round((pen - ix) * PHASES);
      if (k === PHASES) { ix++; k = 0; }
      const cover = g.cover[k], gx = ix + g.left, gy = by + g.top;
      for (let yy = 0; yy < g.h; yy++) {
        const row = gy + yy;
        if (row < 0 || row >= Hc) continue;
        for (let xx = 0; xx < g.w; xx++) {
          const col = gx + xx, a = cover[yy * g.w + xx];
          if (a === 0 || col < 0 || col >= W) continue;
          cv.mixAt(row * W + col, c, a);
        }
      }
      pen += g.advance;
    }
  }
}
