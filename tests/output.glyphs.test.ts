// Caption text from glyphs rendered once, against the same line rendered whole by libvips from SVG.
import { describe, expect, it } from 'vitest';
import sharp from 'sharp';
import { GlyphText } from '../src/output/glyphs.js';
import { Canvas } from '../src/output/raster.js';
import { svgDocument, text } from '../src/output/svg.js';

const W = 1000, H = 40, FS = 18, X = 26.4, Y = 28;
const LINE = 'Step 80: load 618.3 N, load-point displacement 0.2178 mm, CMOD 0.2000 mm, crack length 63.9 mm.';

/** Ink of a grey picture (3 bytes a pixel): its left and right ends, its top and bottom rows, and its total darkness. */
function ink(px: Uint8Array): { left: number; right: number; top: number; bottom: number; dark: number } {
  let left = W, right = -1, top = H, bottom = -1, dark = 0;
  for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) {
    const d = 255 - px[3 * (y * W + x)];
    if (d <= 0) continue;
    dark += d;
    if (d > 40) { left = Math.min(left, x); right = Math.max(right, x); top = Math.min(top, y); bottom = Math.max(bottom, y); }
  }
  return { left, right, top, bottom, dark };
}

/** The ink of a line rendered whole by libvips (a) and laid out from glyphs (b). */
async function bothWays(line: string): Promise<{ a: ReturnType<typeof ink>; b: ReturnType<typeof ink>; g: GlyphText }> {
  const whole = await sharp(Buffer.from(svgDocument(W, H, [text(X, Y, line, { 'font-size': FS, fill: '#000000' })])), { density: 72 })
    .flatten({ background: '#ffffff' }).removeAlpha().raw().toBuffer();
  const g = new GlyphText(FS), cv = new Canvas();
  await g.prepare([line]);
  cv.reset(W, H, [255, 255, 255]);
  g.draw(cv, X, Y, line, [0, 0, 0]);
  return { a: ink(Uint8Array.from(whole)), b: ink(cv.px), g };
}

describe('glyph text', () => {
  it('lays a caption line out within two pixels of libvips rendering it whole, with as much ink', async () => {
    const { a, b, g } = await bothWays(LINE);
    expect(a.right - a.left).toBeGreaterThan(700); // a real line of text, not an empty page
    expect(Math.abs(b.left - a.left)).toBeLessThanOrEqual(1);
    expect(Math.abs(b.right - a.right)).toBeLessThanOrEqual(2);
    expect(Math.abs(b.top - a.top)).toBeLessThanOrEqual(1);
    expect(Math.abs(b.bottom - a.bottom)).toBeLessThanOrEqual(1);
    expect(Math.abs(b.dark / a.dark - 1)).toBeLessThan(0.03);
    expect(g.width(LINE)).toBeCloseTo(a.right - X, -1);
  });

  it('keeps ink that reaches left of the pen (the tail of a j)', async () => {
    const line = 'just 0.5 mm';
    const { a, b } = await bothWays(line);
    expect(Math.abs(b.left - a.left)).toBeLessThanOrEqual(1);
    expect(Math.abs(b.dark / a.dark - 1)).toBeLessThan(0.03);
  });

  it('renders only characters not met before', async () => {
    const g = new GlyphText(FS);
    await g.prepare(['12.5 mm']);
    const w = g.width('12.5 mm');
    await g.prepare(['21.55 mm']); // nothing new: the same advances
    expect(g.width('12.5 mm')).toBe(w);
    expect(g.width('5')).toBeGreaterThan(0);
    expect(g.width(' ')).toBeGreaterThan(0); // a space keeps its advance
  });
});
