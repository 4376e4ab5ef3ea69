import { describe, expect, it } from 'vitest';
import { deflateSync } from 'node:zlib';
import sharp from 'sharp';
import { Canvas, coloursOf, indexedPng, overlayOf, PaletteMix, paletteLut, pngOfIndices, rgb } from '../src/output/raster.js';

const at = (c: Canvas, x: number, y: number): number[] => Array.from(c.px.subarray(3 * (y * c.width + x), 3 * (y * c.width + x) + 3));

describe('raster canvas', () => {
  it('fills polygons that share an edge without a seam or an overlap (pixel centres inside, common practice for scanline fill)', () => {
    const c = new Canvas();
    c.reset(40, 40, [255, 255, 255]);
    // a square 5.3..33.7 cut along a diagonal into two triangles
    const x = Float64Array.from([5.3, 33.7, 33.7, 5.3]), y = Float64Array.from([5.3, 5.3, 33.7, 33.7]);
    c.fillPolygon(x, y, Int32Array.from([0, 1, 2]), 0, 3, [255, 0, 0]);
    c.fillPolygon(x, y, Int32Array.from([0, 2, 3]), 0, 3, [0, 0, 255]);
    let red = 0, blue = 0, white = 0;
    for (let i = 0; i < c.px.length; i += 3) {
      const p = [c.px[i], c.px[i + 1], c.px[i + 2]].join();
      if (p === '255,0,0') red++; else if (p === '0,0,255') blue++; else if (p === '255,255,255') white++;
    }
    // pixel centres 5.5 .. 33.5 lie inside: 29 × 29 pixels, every one painted once
    expect(red + blue).toBe(29 * 29);
    expect(white).toBe(40 * 40 - 29 * 29);
    expect(Math.abs(red - blue)).toBeLessThanOrEqual(29);
  });

  it('paints a stroke once where its pieces overlap, so a translucent line does not darken at joints', () => {
    const c = new Canvas();
    c.reset(30, 30, [255, 255, 255]);
    c.polyline([5, 15, 15, 15, 25, 15, 15, 15.01], 3);
    c.paint([0, 0, 0], 0.5);
    // opacity 0.5 → 128/255 of black over white: 255 · 127 / 255
    expect(at(c, 15, 14)).toEqual([127, 127, 127]);
    expect(at(c, 10, 14)).toEqual([127, 127, 127]);
    expect(at(c, 15, 5)).toEqual([255, 255, 255]);
  });

  it('dashes a line through segments of any length, carrying the pattern on', () => {
    const c = new Canvas();
    c.reset(120, 10, [255, 255, 255]);
    // many short pieces whose lengths do not add up evenly to the pattern
    const pts: number[] = [];
    for (let k = 0; k <= 300; k++) pts.push(5 + k * (100 / 300), 5);
    c.dashed(pts, 1, 5, 3.5);
    c.paint([0, 0, 0]);
    let runs = 0, inRun = false;
    for (let x = 0; x < 120; x++) {
      const dark = c.px[3 * (5 * 120 + x)] < 128;
      if (dark && !inRun) runs++;
      inRun = dark;
    }
    // 100 px of a 8.5 px period: 12 dashes (the last one cut short)
    expect(runs).toBe(12);
  });

  it('keeps the drawn pixels of an RGBA picture as an overlay and lays them over the page', () => {
    const data = new Uint8Array(4 * 4);
    data.set([0, 0, 0, 255], 4); data.set([255, 0, 0, 128], 12);
    const o = overlayOf(data);
    expect(Array.from(o.at)).toEqual([1, 3]);
    const c = new Canvas();
    c.reset(4, 1, rgb('#ffffff'));
    c.overlay(o);
    expect(at(c, 1, 0)).toEqual([0, 0, 0]);
    expect(at(c, 3, 0)).toEqual([255, 127, 127]);
    expect(at(c, 0, 0)).toEqual([255, 255, 255]);
  });

  it('writes an indexed PNG that a decoder reads back: palette colours exactly, others as their nearest entry', async () => {
    const c = new Canvas();
    c.reset(7, 3, [255, 255, 255]);
    c.px.set([200, 30, 30], 3); c.px.set([10, 10, 200], 6); c.px.set([250, 250, 252], 9);
    const palette = Uint8Array.from([255, 255, 255, 200, 30, 30, 10, 10, 200]);
    const png = indexedPng(c.px, 7, 3, palette, paletteLut(), (b) => deflateSync(b));
    const back = await sharp(png).removeAlpha().raw().toBuffer({ resolveWithObject: true });
    expect([back.info.width, back.info.height]).toEqual([7, 3]);
    expect(Array.from(back.data.subarray(3, 12))).toEqual([200, 30, 30, 10, 10, 200, 255, 255, 255]);
    expect(Array.from(coloursOf(back.data))).toEqual(Array.from(palette));
  });

  it('draws as palette indices: fills take their colour\'s entry, a stroke\'s blends the entry nearest to the blended colour', async () => {
    const palette = Uint8Array.from([255, 255, 255, 0, 0, 0, 128, 128, 128, 200, 30, 30, 228, 142, 142]);
    const c = new Canvas(), rgbc = new Canvas(), mix = new PaletteMix(palette);
    c.reset(30, 20, [255, 255, 255], mix); rgbc.reset(30, 20, [255, 255, 255]);
    const x = Float64Array.from([2, 14, 14, 2]), y = Float64Array.from([2, 2, 18, 18]), idx = Int32Array.from([0, 1, 2, 3]);
    for (const cv of [c, rgbc]) {
      cv.fillPolygon(x, y, idx, 0, 4, [200, 30, 30]);
      cv.polyline([20, 2, 20, 18], 3); cv.paint([0, 0, 0], 0.5); // half-transparent black over white: grey
      cv.polyline([8, 10, 8, 10], 2); cv.paint([255, 255, 255], 0.5); // half-transparent white over red: pink
    }
    expect(c.ix[5 * 30 + 5]).toBe(3); // the fill
    expect(c.ix[0]).toBe(0); // the page
    expect(c.ix[10 * 30 + 20]).toBe(2); // the grey stroke's middle
    expect(c.ix[10 * 30 + 8]).toBe(4); // the pink dot's middle
    // every pixel is the entry nearest to the colour the RGB canvas blends there (common practice:
    // the eye-weighted distance of toPalette), or one as near within the blends' steps of coverage
    const near = (r: number, g: number, b: number): number[] => {
      const d = Array.from({ length: palette.length / 3 }, (_, q) => 2 * (palette[3 * q] - r) ** 2 + 4 * (palette[3 * q + 1] - g) ** 2 + 3 * (palette[3 * q + 2] - b) ** 2);
      return d.map((v, q) => [v, q]).filter(([v]) => v <= Math.min(...d) * 1.3 + 300).map(([, q]) => q);
    };
    for (let i = 0; i < 600; i++) expect(near(rgbc.px[3 * i], rgbc.px[3 * i + 1], rgbc.px[3 * i + 2]), `pixel ${i}`).toContain(c.ix[i]);
    // the indices written as a PNG decode to the palette's colours
    const back = await sharp(pngOfIndices(c.ix, 30, 20, palette, (b) => deflateSync(b))).removeAlpha().raw().toBuffer();
    for (const i of [0, 5 * 30 + 5, 10 * 30 + 20, 10 * 30 + 8]) expect(Array.from(back.subarray(3 * i, 3 * i + 3))).toEqual(Array.from(palette.subarray(3 * c.ix[i], 3 * c.ix[i] + 3)));
  });

  it('lays an overlay over palette indices, its blends following the entry under each pixel from page to page', () => {
    const data = new Uint8Array(4 * 2);
    data.set([0, 0, 0, 128], 0); data.set([0, 0, 0, 255], 4);
    const o = overlayOf(data), palette = Uint8Array.from([255, 255, 255, 0, 0, 0, 127, 127, 127, 160, 0, 0, 80, 0, 0]);
    const c = new Canvas(), mix = new PaletteMix(palette);
    c.reset(2, 1, [255, 255, 255], mix);
    c.overlay(o);
    expect(Array.from(c.ix)).toEqual([2, 1]); // half black over white: grey; black
    c.reset(2, 1, [160, 0, 0], mix); // the page now red
    c.overlay(o);
    expect(Array.from(c.ix)).toEqual([4, 1]); // half black over red: dark red, not the grey met before
  });
});

