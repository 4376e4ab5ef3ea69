// Our GIF writer read back by another decoder (sharp's): every page's pixels exactly the palette colours written.
import { describe, expect, it } from 'vitest';
import sharp from 'sharp';
import { gifOf } from '../src/output/gif.js';

describe('GIF of frames that share a palette', () => {
  it('decodes to the very pixels written, page by page, with their delays and a loop (GIF89a: LZW codes up to 12 bits, clear codes, transparency for unchanged pixels)', async () => {
    const n = 200, pal = new Uint8Array(3 * n);
    for (let i = 0; i < n; i++) { pal[3 * i] = i; pal[3 * i + 1] = (i * 7) & 255; pal[3 * i + 2] = (i * 13) & 255; }
    const W = 300, H = 200;
    let s = 1;
    const rnd = (): number => (s = (s * 1103515245 + 12345) & 0x7fffffff) / 0x7fffffff;
    const frames: Uint8Array[] = [];
    // noisy pages (the code table fills and clears many times); the third repeats part of the second
    for (let k = 0; k < 3; k++) {
      const f = new Uint8Array(W * H);
      for (let i = 0; i < f.length; i++) f[i] = rnd() < 0.5 ? Math.floor(rnd() * n) : ((i / 37) | 0) % n;
      if (k === 2) f.set(frames[1]!.subarray(0, 20000));
      frames.push(f);
    }
    frames.push(Uint8Array.from(frames[2]!)); // a page with no change at all
    const g = gifOf(frames, W, H, pal, [100, 100, 500, 1500]);
    const meta = await sharp(g).metadata();
    expect(meta.pages).toBe(4);
    expect(meta.delay).toEqual([100, 100, 500, 1500]);
    expect(meta.loop).toBe(0);
    const back = await sharp(g, { pages: -1 }).removeAlpha().raw().toBuffer();
    let bad = 0;
    frames.forEach((f, k) => {
      for (let i = 0; i < W * H; i++) {
        const j = f[i]!, o = 3 * (k * W * H + i);
        if (back[o] !== pal[3 * j] || back[o + 1] !== pal[3 * j + 1] || back[o + 2] !== pal[3 * j + 2]) bad++;
      }
    });
    expect(bad).toBe(0);
  });
});
