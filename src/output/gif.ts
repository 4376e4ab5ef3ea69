// A looping GIF of frames that share one palette, written as the GIF89a specification describes:
// one global colour table, LZW-coded image data in sub-blocks, a graphic control extension per
// frame (delay, and one transparent index for the pixels that stay as the frame before left them,
// inside the box of the ones that change), and the application extension that makes it loop.

// the LZW table, (prefix code, next index) → code, as an open-addressing hash of 8192 slots (at
// most 4096 entries, so at most half full) of stamp, key and code side by side: 96 KB that stay
// in cache, stamped so a clear (or the next frame) needs no wipe
const SLOTS = 8192;
const TABLE = new Int32Array(3 * SLOTS);
let gen = 0;
let OUT = new Uint8Array(0);

/** LZW codes of a frame's indices (the GIF variant: clear and end codes, widths up to 12 bits). */
export function lzw(ix: Uint8Array, minSize: number): Uint8Array {
  const clear = 1 << minSize, end = clear + 1;
  // at most one code of at most 12 bits per index, and the clears between: 2 bytes an index is
  // room enough (a buffer kept from call to call: the pages of an animation are of one size)
  if (OUT.length < 2 * ix.length + 16) OUT = new Uint8Array(2 * ix.length + 16);
  const out = OUT;
  // the bit writer's state in plain locals, written out inline at each code (a closure over
  // them cost more than the coding itself)
  let o = 0, acc = 0, bits = 0, size = minSize + 1, next = end + 1;
  const table = TABLE;
  if (gen >= 0x7fffffff) { table.fill(0); gen = 0; }
  gen++;
  acc = clear; bits = size;
  if (ix.length > 0) {
    let prefix = ix[0];
    for (let i = 1; i < ix.length; i++) {
      const k = ix[i], key = (prefix << 8) | k;
      // Fibonacci hashing of the 20-bit key to 13 bits, then the next slots in turn
      let h = (Math.imul(key, 0x9e3779b1) >>> 19) * 3, found = -1;
      while (table[h] === gen) {
        if (table[h + 1] === key) { found = table[h + 2]; break; }
        h = h + 3 === 3 * SLOTS ? 0 : h + 3;
      }
      if (found >= 0) { prefix = found; continue; }
      acc |= prefix << bits; bits += size;
      while (bits >= 8) { out[o++] = acc & 255; acc >>>= 8; bits -= 8; }
      if (next < 4096) {
        table[h] = gen; table[h + 1] = key; table[h + 2] = next++;
        // the reader's table is one entry behind; it widens its codes once it holds 2^size entries
        if (next > 1 << size && size < 12) size++;
      } else {
        acc |= clear << bits; bits += size;
        while (bits >= 8) { out[o++] = acc & 255; acc >>>= 8; bits -= 8; }
        gen++; size = minSize + 1; next = end + 1;
      }
      prefix = k;
    }
    acc |= prefix << bits; bits += size;
    while (bits >= 8) { out[o++] = acc & 255; acc >>>= 8; bits -= 8; }
  }
  acc |= end << bits; bits += size;
  while (bits >= 8) { out[o++] = acc & 255; acc >>>= 8; bits -= 8; }
  if (bits > 0) out[o++] = acc & 255;
  return out.slice(0, o);
}

/** The box [x0, y0, x1, y1] of the pixels that differ between two frames (one pixel when none does). */
function changeBox(f: Uint8Array, prev: Uint8Array, width: number, height: number): [number, number, number, number] {
  let x0 = width, y0 = height, x1 = -1, y1 = -1;
  for (let y = 0, r = 0; y < height; y++, r += width) {
    // the first and last change of the row, each searched from its own end (rows alike compared at once)
    if (Buffer.compare(f.subarray(r, r + width), prev.subarray(r, r + width)) === 0) continue;
    let a = 0;
    while (a < width && f[r + a] === prev[r + a]) a++;
    if (a === width) continue;
    let b = width - 1;
    while (f[r + b] === prev[r + b]) b--;
    if (a < x0) x0 = a; if (b > x1) x1 = b;
    if (y0 > y) y0 = y; y1 = y;
  }
  return x1 < 0 ? [0, 0, 0, 0] : [x0, y0, x1, y1];
}

let BOX = new Uint8Array(0);

/**
 * The w × h box at (x0, y0) of a frame's indices; with the frame before, its unchanged pixels as
 * T (plain locals: this loop runs over every page's box). In a buffer kept from call to call,
 * valid until the next.
 */
function boxOf(f: Uint8Array, prev: Uint8Array | null, width: number, x0: number, y0: number, w: number, h: number, T: number): Uint8Array {
  if (BOX.length < w * h) BOX = new Uint8Array(w * h);
  const sub = BOX.subarray(0, w * h);
  for (let y = 0, o = 0; y < h; y++) {
    const i0 = (y + y0) * width + x0;
    if (prev === null) { sub.set(f.subarray(i0, i0 + w), o); o += w; continue; }
    for (let i = i0, e = i0 + w; i < e; i++, o++) { const v = f[i]; sub[o] = v === prev[i] ? T : v; }
  }
  return sub;
}

/** Frames of indices into one palette (r, g, b, …; at most 255 colours, one index is kept for transparency) as GIF bytes. */
export function gifOf(frames: Uint8Array[], width: number, height: number, palette: Uint8Array, delaysMs: number[]): Buffer {
  const n = palette.length / 3;
  if (!(n >= 1 && n <= 255)) throw new Error(`gifOf: a palette of ${n} colours`);
  let tableBits = 1;
  while (1 << tableBits < n + 1) tableBits++;
  const T = n; // the transparent index: the first one past the colours
  const parts: Buffer[] = [];
  const head = Buffer.alloc(13);
  head.write('GIF89a', 0, 'latin1');
  head.writeUInt16LE(width, 6); head.writeUInt16LE(height, 8);
  head[10] = 0x80 | ((tableBits - 1) << 4) | (tableBits - 1);
  parts.push(head);
  const table = Buffer.alloc(3 * (1 << tableBits));
  table.set(palette);
  parts.push(table);
  parts.push(Buffer.from([0x21, 0xff, 0x0b, ...Buffer.from('NETSCAPE2.0', 'latin1'), 0x03, 0x01, 0x00, 0x00, 0x00]));
  const minSize = Math.max(2, tableBits);
  let prev: Uint8Array | null = null;
  frames.forEach((f, k) => {
    // the box of the pixels that change; inside it, unchanged ones become transparent
    const [x0, y0, x1, y1] = prev ? changeBox(f, prev, width, height) : [0, 0, width - 1, height - 1];
    const w = x1 - x0 + 1, h = y1 - y0 + 1, sub = boxOf(f, prev, width, x0, y0, w, h, T);
    const cs = Math.round((delaysMs[k] ?? 100) / 10);
    // graphic control: leave the frame in place, transparency on after the first
    parts.push(Buffer.from([0x21, 0xf9, 0x04, (1 << 2) | (prev ? 1 : 0), cs & 255, cs >> 8, T, 0x00]));
    const d = Buffer.alloc(10);
    d[0] = 0x2c; d.writeUInt16LE(x0, 1); d.writeUInt16LE(y0, 3); d.writeUInt16LE(w, 5); d.writeUInt16LE(h, 7); d[9] = 0;
    parts.push(d, Buffer.from([minSize]));
    // the codes in sub-blocks of at most 255 bytes, each after its length, and an empty one to end
    const data = lzw(sub, minSize), blocks = Buffer.alloc(data.length + Math.ceil(data.length / 255) + 1);
    let b = 0;
    for (let o = 0; o < data.length; o += 255) {
      const len = Math.min(255, data.length - o);
      blocks[b++] = len; blocks.set(data.subarray(o, o + len), b); b += len;
    }
    blocks[b] = 0;
    parts.push(blocks);
    prev = f;
  });
  parts.push(Buffer.from([0x3b]));
  return Buffer.concat(parts);
}
