// PNG frames drawn straight into pixels: the cells, mesh, outlines, cracks, cohesive segments,
// supports, loads and this state's part of the inset on our own canvas (raster.ts); the text and
// the parts every frame of a run shares (title, colour bar, keys, scale bar, inset axes and the
// whole curve) rendered from SVG once and laid over each frame; the caption, the only text that
// changes, from glyphs rendered once. With the run's palette (quantised by sharp from one frame
// drawn in RGB), frames and the animation's pages are drawn as palette indices and written as
// PNG rows and GIF pages without a look-up pass; sharp renders the text and quantises.

import sharp from 'sharp';
import { cellCount } from '../mesh/polymesh.js';
import { colorAt, damageMap } from './colormap.js';
import {
  arrowShape, CAPTION_COLOR, crackStyle, damageLevel, fieldLayout, fieldSvg, INK_COLOR, levelColor, LEVELS, loadArrows, MESH_ON_VALUES, MESH_PLAIN,
  meshLines, NO_VALUES, screenCracks, supportPlaces, supportShape, UNDEFORMED, valueScale, type FieldPicture,
} from './field.js';
import { insetGeometry, INSET_STYLE } from './inset.js';
import { constants as zlibConstants, deflateSync } from 'node:zlib';
import { Canvas, coloursOf, overlayOf, PaletteMix, pngOfIndices, rgb, type Overlay, type Rgb } from './raster.js';
import { GlyphText } from './glyphs.js';

const WHITE: Rgb = [255, 255, 255];
const INK = rgb(INK_COLOR), CAPTION = rgb(CAPTION_COLOR);
/** The layers every frame of a run shares, drawn from SVG once. */
const SHARED = new Set(['title', 'colorbar', 'inset', 'scalebar']);
/**
 * The damage key, an overlay of its own: only frames with cohesive segments have it, and it
 * touches no other shared layer, so the rest is rendered once a run rather than once with it and
 * once without.
 */
const DAMAGE_KEY = new Set(['damagebar']);
/** A page of an animation: indices into the run's palette, width × height of them. */
export interface AnimationPage { ix: Uint8Array; width: number; height: number }

/** Palette PNG: frames have few colours, and it is about a third of the size. */
export const FRAME_PNG = { palette: true, colours: 128, effort: 1, dither: 0, compressionLevel: 6 } as const;

/**
 * Deflate of the indexed rows: runs of one index only (measured on the demo's frames: 1.4 ms a
 * frame against 5.4 ms at level 6, for 79 KB against 67 KB).
 */
const FRAME_DEFLATE = { level: 6, strategy: zlibConstants.Z_RLE };

/** Draws the frames of a run one after another, keeping its buffers and the shared overlay. */
export class FrameRaster {
  private canvas = new Canvas();
  /** The animation's pages, drawn at their own size. */
  private pageCanvas = new Canvas();
  private shared = new Map<string, Overlay>();
  /** The caption's glyphs by font size (frames and pages differ). */
  private glyphs = new Map<number, GlyphText>();

  /**
   * The raw RGB pixels of a field picture (the layout of fieldSvg at widthPx); sharedKey: a name
   * for its shared layers, the same for pictures whose shared layers (the damage key apart) are
   * the same (default: their SVG).
   */
  async pixels(p: FieldPicture, sharedKey?: string): Promise<{ data: Uint8Array; width: number; height: number }> {
    const { width, height } = await this.draw(this.canvas, p, sharedKey, null);
    return { data: this.canvas.px, width, height };
  }

  /** Draw a field picture on the canvas: in RGB, or with mix as indices into its palette. */
  private async draw(cv: Canvas, p: FieldPicture, sharedKey: string | undefined, mix: PaletteMix | null): Promise<{ width: number; height: number }> {
    const L = fieldLayout(p), u = L.u;
    const W = Math.ceil(L.W), H = Math.ceil(L.H);
    cv.reset(W, H, WHITE, mix);

    // cells
    const { cellStart, cellVerts } = p.mesh, nc = cellCount(p.mesh);
    if (p.values) {
      const sc = valueScale(p), cols = Array.from({ length: LEVELS + 1 }, (_, k) => rgb(levelColor(sc.twoSlope, k)));
      for (let c = 0; c < nc; c++) cv.fillPolygon(L.sx, L.sy, cellVerts, cellStart[c], cellStart[c + 1], cols[sc.level(p.values[c])]);
    } else {
      const col = rgb(NO_VALUES);
      for (let c = 0; c < nc; c++) cv.fillPolygon(L.sx, L.sy, cellVerts, cellStart[c], cellStart[c + 1], col);
    }

    const lines = meshLines(p, L);
    for (const l of lines.undeformed) cv.dashed(l, 1 * u, 5 * u, 3.5 * u);
    cv.paint(rgb(UNDEFORMED));
    // at least half a pixel wide: thinner, a small page's (an animation's) mesh would fade away
    const meshW = Math.max(0.5, (p.values ? MESH_ON_VALUES.width : MESH_PLAIN.width) * u);
    for (const l of lines.inner) cv.polyline(l, meshW);
    if (p.values) cv.paint([0, 0, 0], MESH_ON_VALUES.opacity); else cv.paint(rgb(MESH_PLAIN.color));
    for (const l of lines.outline) cv.polyline(l, 1.3 * u);
    cv.paint(INK);

    for (const c of screenCracks(p, L)) {
      const st = crackStyle(c.kind);
      cv.polyline(c.pts, st.halo * u); cv.paint(WHITE, 0.85);
      cv.polyline(c.pts, st.width * u); cv.paint(rgb(st.color));
    }
    if (p.cohesive?.length) {
      const segs = p.cohesive.map((g) => { const [ax, ay] = L.move(g.x1, g.y1), [bx, by] = L.move(g.x2, g.y2); return [L.X(ax), L.Y(ay), L.X(bx), L.Y(by)]; });
      for (const s of segs) cv.segment(s[0], s[1], s[2], s[3], 6 * u);
      cv.paint(WHITE, 0.85);
      for (let k = 0; k < 16; k++) {
        let any = false;
        p.cohesive.forEach((g, i) => { if (damageLevel(g.damage) === k) { const s = segs[i]; cv.segment(s[0], s[1], s[2], s[3], 3.4 * u); any = true; } });
        if (any) cv.paint(rgb(colorAt(damageMap, (k + 0.5) / 16)));
      }
    }

    for (const q of supportPlaces(p, L)) {
      const g = supportShape(q.fix, u), a = (q.angle * Math.PI) / 180, ca = Math.cos(a), sa = Math.sin(a);
      const at = (pts: number[]): number[] => pts.map((v, i) => (i % 2 === 0 ? q.x + ca * v - sa * pts[i + 1] : q.y + sa * pts[i - 1] + ca * v));
      const tri = at(g.tri);
      cv.fillPoints(tri, WHITE);
      cv.polyline([...tri, tri[0], tri[1]], 1.4 * u); cv.paint(INK);
      for (const r of g.rollers) {
        const [cx, cy] = at([r.cx, r.cy]);
        cv.disc(cx, cy, r.r); cv.paint(WHITE);
        cv.ring(cx, cy, r.r, 1.2 * u); cv.paint(INK);
      }
      cv.polyline(at(g.ground), 1.2 * u);
      for (const h of g.hatch) cv.polyline(at(h), 1.2 * u);
      cv.paint(INK);
    }
    for (const arr of loadArrows(p, L)) {
      const g = arrowShape(arr, u);
      cv.polyline(g.halo, 6 * u); cv.paint(WHITE, 0.8);
      cv.polyline(g.shaft, 2.8 * u); cv.paint(INK);
      cv.fillPoints(g.head, INK);
      cv.polyline([...g.head, g.head[0], g.head[1]], 0.8 * u); cv.paint(INK);
    }

    // what every frame shares, from SVG once
    cv.overlay(await this.sharedOverlay(p, SHARED, sharedKey));
    if (p.cohesive?.length) cv.overlay(await this.sharedOverlay(p, DAMAGE_KEY, sharedKey === undefined ? undefined : `${sharedKey}|damage key`));

    // this state in the inset: the curve so far, dashed guides and a dot
    if (p.inset) {
      const [ix, iy, iw, ih] = L.insetBox;
      const G = insetGeometry(p.inset, ix, iy, iw, ih, u), S = INSET_STYLE;
      for (const l of G.lines(0, G.k + 1)) cv.polyline(l, S.curveWidth * u);
      cv.paint(rgb(S.line));
      if (G.now) {
        const { cx, cy } = G.now;
        cv.dashed([cx, G.bottom, cx, cy], S.markWidth * u, S.dash[0] * u, S.dash[1] * u);
        cv.dashed([G.left, cy, cx, cy], S.markWidth * u, S.dash[0] * u, S.dash[1] * u);
        cv.paint(rgb(S.now));
        cv.disc(cx, cy, S.dotR * u); cv.paint(rgb(S.now));
        cv.ring(cx, cy, S.dotR * u, S.dotRing * u); cv.paint(WHITE);
      }
    }

    // the caption: a strip of text below everything else, from glyphs rendered once
    const top = Math.floor(L.capY);
    if (L.captionLines.length && H > top) {
      const fs = 15 * u;
      let g = this.glyphs.get(fs);
      if (!g) { g = new GlyphText(fs); this.glyphs.set(fs, g); }
      await g.prepare(L.captionLines);
      cv.fillRows(top, WHITE);
      L.captionLines.forEach((line, i) => g.draw(cv, L.pad, L.capY + (i + 0.8) * 22 * u, line, CAPTION));
    }
    return { width: W, height: H };
  }

  /**
   * Some shared layers as an overlay, rendered from SVG the first time they are met
   * (under the caller's key when it has one: building the SVG only to look it up costs about 2 ms a frame).
   */
  private async sharedOverlay(p: FieldPicture, layers: Set<string>, key?: string): Promise<Overlay> {
    const k = key ?? fieldSvg(p, layers);
    let o = this.shared.get(k);
    if (!o) {
      o = overlayOf(await sharp(Buffer.from(fieldSvg(p, layers)), { density: 72, limitInputPixels: false }).ensureAlpha().raw().toBuffer());
      if (this.shared.size >= 4) this.shared.clear(); // a run's frames have one kind, and the damage key from the first cohesive segment on
      this.shared.set(k, o);
    }
    return o;
  }

  /**
   * One palette for all frames of a run: the colours the quantiser keeps for this picture (the
   * run's last frame, which has the most of them); at most 255 entries, so an animation keeps
   * one index for transparency; with the picture's size.
   */
  async palette(p: FieldPicture, sharedKey?: string): Promise<{ palette: Uint8Array; width: number; height: number }> {
    const { data, width, height } = await this.pixels(p, sharedKey);
    // stored, not deflated: it is only decoded again here (the same colours, a third less time)
    const q = await sharp(data, { raw: { width, height, channels: 3 } }).png({ ...FRAME_PNG, compressionLevel: 0 }).toBuffer();
    return { palette: coloursOf(await sharp(q).removeAlpha().raw().toBuffer(), 255), width, height };
  }

  private mix: PaletteMix | null = null;
  private rows = new Uint8Array(0);

  /** The blends within the run's palette, kept from frame to frame. */
  private mixOf(palette: Uint8Array): PaletteMix {
    if (this.mix?.palette !== palette) this.mix = new PaletteMix(palette);
    return this.mix;
  }

  /**
   * A field picture as PNG bytes: drawn as indices into the run's palette when given, else in RGB
   * through sharp's quantiser (sharedKey: see pixels).
   */
  async png(p: FieldPicture, palette?: Uint8Array, sharedKey?: string): Promise<Buffer> {
    if (!palette) {
      const { data, width, height } = await this.pixels(p, sharedKey);
      return sharp(data, { raw: { width, height, channels: 3 } }).png(FRAME_PNG).toBuffer();
    }
    const { width, height } = await this.draw(this.canvas, p, sharedKey, this.mixOf(palette));
    if (this.rows.length !== (width + 1) * height) this.rows = new Uint8Array((width + 1) * height);
    return pngOfIndices(this.canvas.ix, width, height, palette, (b) => deflateSync(b, FRAME_DEFLATE), this.rows);
  }

  /**
   * An animation's page: the picture (at the page's width) drawn as indices into the palette at
   * its own size, so no resize and no look-up of blended colours (sharedKey: see pixels).
   */
  /** The PNG frame drawn last, as an animation's page (for frames no wider than the animation). */
  framePage(): AnimationPage {
    const cv = this.canvas;
    if (!cv.mix) throw new Error('framePage: the last frame was not drawn in a palette');
    return { ix: cv.ix.slice(), width: cv.width, height: cv.height };
  }

  async page(p: FieldPicture, palette: Uint8Array, sharedKey?: string): Promise<AnimationPage> {
    const { width, height } = await this.draw(this.pageCanvas, p, sharedKey, this.mixOf(palette));
    return { ix: this.pageCanvas.ix.slice(), width, height };
  }
}
