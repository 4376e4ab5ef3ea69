// A tiny SVG writer: escaped text, short numbers, layers as groups.

export type Attrs = Record<string, string | number | undefined | null | false>;

/** Escape text and attribute values for XML; characters XML 1.0 does not allow (controls, lone surrogates) become U+FFFD. */
export function esc(s: string): string {
  return s.replace(/[&<>"']|[\u0000-\u0008\u000b\u000c\u000e-\u001f\ufffe\uffff]|[\ud800-\udbff](?![\udc00-\udfff])|(?<![\ud800-\udbff])[\udc00-\udfff]/g,
    (c) => (c === '&' ? '&amp;' : c === '<' ? '&lt;' : c === '>' ? '&gt;' : c === '"' ? '&quot;' : c === "'" ? '&#39;' : '\ufffd'));
}

/** A coordinate with at most 3 decimals and no trailing zeros, to keep files small. */
export function n(x: number): string {
  if (!Number.isFinite(x)) return '0';
  const r = Math.round(x * 1000) / 1000;
  return r === 0 ? '0' : String(r);
}

/** Coordinate with one decimal: enough for path vertices at screen resolution. */
export function n1(x: number): string {
  const r = Math.round(x * 10) / 10;
  return r === 0 ? '0' : String(r);
}

function attrText(a: Attrs | undefined): string {
  if (!a) return '';
  let s = '';
  for (const k in a) {
    const v = a[k];
    if (v === undefined || v === null || v === false) continue;
    s += ` ${k}="${typeof v === 'number' ? n(v) : esc(v)}"`;
  }
  return s;
}

/** An element; children are already-built markup strings. */
export function el(tag: string, attrs?: Attrs, children?: string | string[]): string {
  const a = attrText(attrs);
  if (children === undefined || (Array.isArray(children) && children.length === 0)) return `<${tag}${a}/>`;
  return `<${tag}${a}>${Array.isArray(children) ? children.join('') : children}</${tag}>`;
}

/** A text element; the content is escaped here. */
export function text(x: number, y: number, content: string, attrs?: Attrs): string {
  return el('text', { x, y, ...attrs }, esc(content));
}

/** A layer: a group with an id (and optional class). */
export function layer(id: string, children: string[], attrs?: Attrs): string {
  return el('g', { id, ...attrs }, children.length ? children : '');
}

/** Polyline path data from flat screen coordinates. */
export function polyPath(pts: ArrayLike<number>, closed = false): string {
  let d = '';
  for (let i = 0; i + 1 < pts.length; i += 2) d += (i ? 'L' : 'M') + n1(pts[i]) + ' ' + n1(pts[i + 1]);
  return closed ? d + 'Z' : d;
}

export const FONT = 'DejaVu Sans, Helvetica, Arial, sans-serif';

/** The whole document: a white page of width × height px with our font. */
export function svgDocument(width: number, height: number, body: string[], opts: { title?: string; background?: string } = {}): string {
  const w = Math.ceil(width), h = Math.ceil(height);
  return [
    '<?xml version="1.0" encoding="UTF-8"?>\n',
    `<svg xmlns="http://www.w3.org/2000/svg" width="${w}" height="${h}" viewBox="0 0 ${w} ${h}" font-family="${esc(FONT)}">`,
    opts.title ? el('title', undefined, esc(opts.title)) : '',
    el('rect', { x: 0, y: 0, width: w, height: h, fill: opts.background ?? '#ffffff' }),
    ...body,
    '</svg>\n',
  ].join('');
}

/** An SVG document made fit to sit inside the page: no prolog or namespace, ids made unique, width from the page. */
export function inlineSvg(svg: string, idPrefix: string, label: string): string {
  let s = svg.replace(/<\?xml[^>]*\?>\s*/, '');
  s = s.replace(/<svg\b([^>]*)>/, (_m, attrs: string) => {
    const a = attrs.replace(/\sxmlns(:\w+)?="[^"]*"/g, '').replace(/\s(width|height)="[^"]*"/g, '');
    return `<svg${a} role="img" aria-label="${esc(label)}" style="width:100%;height:auto">`;
  });
  s = s.replace(/\sid="([^"]+)"/g, ` id="${idPrefix}$1"`).replace(/url\(#([^)]+)\)/g, `url(#${idPrefix}$1)`);
  return s;
}
