import { mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, describe, expect, it } from 'vitest';
import { polyMeshFrom } from '../src/mesh/polymesh.js';
import { fieldSvg } from '../src/output/field.js';
import { plotSvg } from '../src/output/plot.js';
import { framesToAnimation, pickFrames, pngColours, pngPalette, svgToPng, svgWidth } from '../src/output/png.js';
import { coloursOf, indexedPng, paletteLut } from '../src/output/raster.js';
import { deflateSync } from 'node:zlib';

const dir = mkdtempSync(join(tmpdir(), 'rupta-png-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const mesh = polyMeshFrom([[0, 0], [100, 0], [200, 0], [0, 60], [100, 60], [200, 60]], [[0, 1, 4, 3], [1, 2, 5, 4]]);

describe('svgToPng', () => {
  it('renders a field picture at the requested width', async () => {
    const svg = fieldSvg({ mesh, values: Float64Array.from([0.2, 0.9]), valueLabel: 'σ₁ / ft', title: 'Two cells', widthPx: 800 });
    expect(svgWidth(svg)).toBe(800);
    const p = join(dir, 'field.png');
    await svgToPng(svg, p, 640);
    const meta = await sharp(p).metadata();
    expect(meta.format).toBe('png');
    expect(meta.width).toBe(640);
    // a coloured cell, not a blank page: the lighter cell's centre is far from white
    const { data, info } = await sharp(p).raw().toBuffer({ resolveWithObject: true });
    let nonWhite = 0;
    for (let k = 0; k < data.length; k += info.channels) if (data[k] + data[k + 1] + data[k + 2] < 600) nonWhite++;
    expect(nonWhite / (info.width * info.height)).toBeGreaterThan(0.1);
  });
  it('renders a plot at its own width by default, and leaves no temp files', async () => {
    const svg = plotSvg({ series: [{ label: 'a', x: [0, 1, 2], y: [0, 2, 1] }], xLabel: 'x (mm)', yLabel: 'F (N)', widthPx: 500 });
    await svgToPng(svg, join(dir, 'plot.png'));
    expect((await sharp(join(dir, 'plot.png')).metadata()).width).toBe(500);
    expect(readdirSync(dir).filter((f) => f.endsWith('.tmp'))).toEqual([]);
  });
});

describe('framesToAnimation', () => {
  it('joins frames of different heights into a looping GIF and WebP with a held last frame', async () => {
    const frames: string[] = [];
    for (let k = 0; k < 4; k++) {
      const m = polyMeshFrom([[0, 0], [100, 0], [100, 50 + 10 * k], [0, 50 + 10 * k]], [[0, 1, 2, 3]]);
      const p = join(dir, `step-${k}.png`);
      await svgToPng(fieldSvg({ mesh: m, values: Float64Array.from([k]), range: [0, 3], widthPx: 300 }), p);
      frames.push(p);
    }
    const gif = join(dir, 'animation.gif');
    await framesToAnimation(frames, gif, { delayMs: 100, holdLastMs: 1000 });
    const g = await sharp(gif, { animated: true }).metadata();
    expect(g.format).toBe('gif');
    expect(g.pages).toBe(4);
    expect(g.width).toBe(300);
    expect(g.delay).toEqual([100, 100, 100, 1000]);
    expect(g.loop).toBe(0);

    const webp = join(dir, 'animation.webp');
    await framesToAnimation(frames, webp, { maxFrames: 3, format: 'webp' });
    const w = await sharp(webp, { animated: true }).metadata();
    expect(w.format).toBe('webp');
    expect(w.pages).toBe(3);
  });
  it('thins long runs evenly, keeping first and last', () => {
    expect(pickFrames(5, 10)).toEqual([0, 1, 2, 3, 4]);
    expect(pickFrames(101, 5)).toEqual([0, 25, 50, 75, 100]);
    expect(pickFrames(7, 1)).toEqual([6]);
  });
});

describe('pngPalette', () => {
  it('reads the colour table of an indexed PNG (PLTE chunk, PNG specification) and nothing from other PNGs', async () => {
    const palette = Uint8Array.from([255, 255, 255, 200, 30, 30, 10, 10, 200]);
    const px = Uint8Array.from([255, 255, 255, 200, 30, 30, 10, 10, 200, 12, 12, 190]);
    const png = indexedPng(px, 2, 2, palette, paletteLut(), (b) => deflateSync(b));
    expect(Array.from(pngPalette(png)!)).toEqual(Array.from(palette));
    const rgb = await sharp(Buffer.from(px), { raw: { width: 2, height: 2, channels: 3 } }).png().toBuffer();
    expect(pngPalette(rgb)).toBeNull();
    const withAlpha = await sharp(Buffer.from(px), { raw: { width: 2, height: 2, channels: 3 } }).ensureAlpha(0.5).png({ palette: true }).toBuffer();
    expect(pngPalette(withAlpha)).toBeNull(); // a tRNS chunk: colours alone would lose the transparency
    expect(pngPalette(Uint8Array.from([1, 2, 3]))).toBeNull();
  });
});

describe('pngColours', () => {
  it('gives the colours of an indexed PNG in the order its decoded pixels show them, filtered rows or not, and nothing from other PNGs', async () => {
    const svg = fieldSvg({ mesh, values: Float64Array.from([0.2, 0.9]), valueLabel: 'σ₁ / ft', title: 'Two cells', widthPx: 400 });
    const { data, info } = await sharp(Buffer.from(svg)).removeAlpha().raw().toBuffer({ resolveWithObject: true });
    for (const compressionLevel of [0, 9]) {
      // level 9 lets the encoder pick row filters, level 0 stores the rows as they are
      const q = await sharp(data, { raw: info }).png({ palette: true, colours: 128, effort: 1, dither: 0, compressionLevel }).toBuffer();
      const decoded = coloursOf(await sharp(q).removeAlpha().raw().toBuffer());
      expect(decoded.length).toBeGreaterThan(3 * 4);
      expect(Array.from(pngColours(q)!)).toEqual(Array.from(decoded));
      expect(Array.from(pngColours(q, 3)!)).toEqual(Array.from(coloursOf(await sharp(q).removeAlpha().raw().toBuffer(), 3)));
    }
    expect(pngColours(await sharp(data, { raw: info }).png().toBuffer())).toBeNull();
  });
});

describe('frame raster shared layers', () => {
  it('lays the damage key over frames with cohesive segments only, the same whether the other shared layers were met before or not', async () => {
    const { FrameRaster } = await import('../src/output/frameraster.js');
    const plain = { mesh, values: Float64Array.from([0.2, 0.9]), valueLabel: 'σ₁ / ft', title: 'Two cells', widthPx: 600 };
    const withKey = { ...plain, cohesive: [{ x1: 100, y1: 0, x2: 100, y2: 30, damage: 0.6 }] };
    const r = new FrameRaster();
    const a = Uint8Array.from((await r.pixels(plain, 'k')).data);
    const b = Uint8Array.from((await r.pixels(withKey, 'k')).data);
    const a2 = Uint8Array.from((await r.pixels(plain, 'k')).data);
    expect(a2).toEqual(a);
    // the damage key's words and colours change the foot of the page (below the plate, above the caption)
    const { fieldLayout } = await import('../src/output/field.js');
    const L = fieldLayout(withKey), W = Math.ceil(L.W);
    let differ = 0;
    for (let i = 3 * W * Math.ceil(L.footY); i < 3 * W * Math.floor(L.capY); i++) if (a[i] !== b[i]) differ++;
    expect(differ).toBeGreaterThan(100);
    // drawn fresh (its SVG as the key) the picture with the key is the same
    expect(Uint8Array.from((await new FrameRaster().pixels(withKey)).data)).toEqual(b);
  });
});
