import { describe, expect, it } from 'vitest';
import { polyMeshFrom, type PolyMesh } from '../src/mesh/polymesh.js';
import { fieldSvg, meshSvg } from '../src/output/field.js';
import { plotSvg } from '../src/output/plot.js';
import { el, esc, layer, n, svgDocument } from '../src/output/svg.js';

interface XmlElement { name: string; attrs: Record<string, string>; text: string }

const ENTITY = /&(amp|lt|gt|quot|apos|#\d+|#x[0-9a-fA-F]+);/y;

/** A strict little well-formedness check: nesting, quoting, entities, one root. Returns the elements in order. */
function parseXml(s: string): XmlElement[] {
  const out: XmlElement[] = [];
  const stack: XmlElement[] = [];
  let i = 0, roots = 0;
  const fail = (msg: string): never => { throw new Error(`${msg} at ${i}: ${JSON.stringify(s.slice(Math.max(0, i - 40), i + 40))}`); };
  const checkEntities = (t: string): void => {
    for (let k = t.indexOf('&'); k >= 0; k = t.indexOf('&', k + 1)) {
      ENTITY.lastIndex = k;
      if (!ENTITY.test(t)) fail('bad entity');
    }
  };
  if (s.startsWith('<?xml')) { i = s.indexOf('?>') + 2; if (i < 2) fail('open prolog'); }
  while (i < s.length) {
    const lt = s.indexOf('<', i);
    const chunk = lt < 0 ? s.slice(i) : s.slice(i, lt);
    if (stack.length === 0 && chunk.trim()) fail('text outside the root');
    checkEntities(chunk);
    if (stack.length) stack[stack.length - 1].text += chunk;
    if (lt < 0) break;
    i = lt;
    if (s.startsWith('<!--', i)) { const e = s.indexOf('-->', i); if (e < 0) fail('open comment'); i = e + 3; continue; }
    if (s.startsWith('</', i)) {
      const m = /^<\/([A-Za-z_][\w:.-]*)\s*>/.exec(s.slice(i, i + 200));
      if (!m) fail('bad end tag');
      const top = stack.pop();
      if (!top || top.name !== m![1]) fail(`end tag ${m![1]} does not close ${top?.name}`);
      i += m![0].length;
      continue;
    }
    const nm = /^<([A-Za-z_][\w:.-]*)/.exec(s.slice(i, i + 200));
    if (!nm) fail('bad start tag');
    const node: XmlElement = { name: nm![1], attrs: {}, text: '' };
    i += nm![0].length;
    const attr = /\s+([A-Za-z_:][\w:.-]*)\s*=\s*(?:"([^"<]*)"|'([^'<]*)')/y;
    for (;;) {
      attr.lastIndex = i;
      const a = attr.exec(s);
      if (!a) break;
      if (a[1] in node.attrs) fail(`duplicate attribute ${a[1]}`);
      const v = a[2] ?? a[3];
      checkEntities(v);
      node.attrs[a[1]] = v;
      i = attr.lastIndex;
    }
    const end = /^\s*(\/?)>/.exec(s.slice(i, i + 20));
    if (!end) fail('unterminated start tag');
    i += end![0].length;
    if (stack.length === 0) roots++;
    out.push(node);
    if (!end![1]) stack.push(node);
  }
  if (stack.length) fail(`unclosed ${stack[stack.length - 1].name}`);
  if (roots !== 1) fail(`${roots} root elements`);
  return out;
}

const ids = (els: XmlElement[]): string[] => els.map((e) => e.attrs.id).filter((x): x is string => !!x);
const texts = (els: XmlElement[]): string => els.filter((e) => e.name === 'text').map((e) => e.text).join('|');

/** A notched plate of nx × ny quads (mm), the notch cells left out. */
function plate(nx: number, ny: number, w: number, h: number): PolyMesh {
  const pts: number[][] = [];
  for (let j = 0; j <= ny; j++) for (let i = 0; i <= nx; i++) pts.push([(i * w) / nx, (j * h) / ny]);
  const cells: number[][] = [];
  for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++) {
    if (i === nx >> 1 && j < ny >> 2) continue;
    const a = j * (nx + 1) + i;
    cells.push([a, a + 1, a + nx + 2, a + nx + 1]);
  }
  return polyMeshFrom(pts, cells);
}

describe('the checker itself', () => {
  it('rejects broken markup', () => {
    expect(() => parseXml('<a><b></a></b>')).toThrow();
    expect(() => parseXml('<a x="1" x="2"/>')).toThrow();
    expect(() => parseXml('<a>1 & 2</a>')).toThrow();
    expect(() => parseXml('<a/><b/>')).toThrow();
    expect(() => parseXml('<a x=1/>')).toThrow();
    expect(parseXml('<a x="&amp;"><b/>t&lt;</a>').length).toBe(2);
  });
});

describe('svg builder', () => {
  it('escapes text and attributes and keeps numbers short', () => {
    const doc = svgDocument(100, 50, [layer('x', [el('text', { 'data-q': 'a"b<c' }, esc('σ < 1 & "q"'))])], { title: 'T & <U>' });
    const els = parseXml(doc);
    expect(els.find((e) => e.name === 'text')!.text).toBe('σ &lt; 1 &amp; &quot;q&quot;');
    expect(n(1.23456)).toBe('1.235');
    expect(n(-0.0001)).toBe('0');
    expect(n(NaN)).toBe('0');
  });
});

describe('fieldSvg', () => {
  const mesh = plate(40, 10, 400, 100);
  const nc = mesh.cellStart.length - 1, nv = mesh.xy.length / 2;
  const values = new Float64Array(nc).map((_, c) => Math.sin(c / 7) * 1.4 - 0.3);
  const displacement = new Float64Array(2 * nv).map((_, k) => (k % 2 ? -0.01 * Math.sin((Math.PI * mesh.xy[k - 1]) / 400) : 0));
  const full = {
    mesh, values, valueLabel: 'σ₁ / ft', diverging: true, displacement,
    cracks: [{ points: [[200, 0], [200, 25]] as [number, number][], kind: 'notch' as const }, { points: [[200, 25], [202, 40], [201, 55]] as [number, number][], kind: 'crack' as const }],
    cohesive: [{ x1: 200, y1: 25, x2: 202, y2: 40, damage: 0.8 }, { x1: 202, y1: 40, x2: 201, y2: 55, damage: 0.1 }],
    supports: [{ x: 10, y: 0, fix: 'xy' as const }, { x: 390, y: 0, fix: 'y' as const }, { x: 0, y: 50, fix: 'x' as const }],
    loads: [{ x: 200, y: 100, dx: 0, dy: -1 }],
    title: 'Beam <A> & B', caption: ['Step 3 of 10.'], widthPx: 900,
  };

  it('is well formed, with every layer and the labels', () => {
    const svg = fieldSvg(full);
    const els = parseXml(svg);
    for (const id of ['cells', 'mesh', 'cracks', 'cohesive', 'supports', 'loads', 'colorbar', 'scalebar', 'caption', 'undeformed', 'outline']) expect(ids(els)).toContain(id);
    const t = texts(els);
    expect(t).toContain('σ₁ / ft');
    expect(t).toContain('Beam &lt;A&gt; &amp; B');
    expect(t).toContain('Step 3 of 10.');
    expect(t).toMatch(/magnified ×\d/);
    expect(t).toMatch(/\d mm/);
    expect(els.find((e) => e.name === 'svg')!.attrs.width).toBe('900');
    expect(els.filter((e) => e.attrs.class === 'support fix-xy').length).toBe(1);
    expect(els.filter((e) => e.attrs.class === 'load').length).toBe(1);
    expect(els.filter((e) => e.attrs.class === 'crack').length).toBe(1);
    expect(els.filter((e) => e.attrs.class === 'notch').length).toBe(1);
  });

  it('uses one path per colour level, never more than 64 (+1 for missing values)', () => {
    const els = parseXml(fieldSvg({ mesh, values }));
    const levels = els.filter((e) => /^level-\d+$/.test(e.attrs.class ?? ''));
    expect(levels.length).toBeGreaterThan(10);
    expect(levels.length).toBeLessThanOrEqual(65);
  });

  it('states the magnification it was given', () => {
    expect(texts(parseXml(fieldSvg({ mesh, displacement, magnification: 250 })))).toContain('×250');
  });

  it('draws only the mesh when there are no values', () => {
    const els = parseXml(meshSvg(mesh, { title: 'Mesh' }));
    const meshLayer = els.find((e) => e.attrs.id === 'mesh');
    expect(meshLayer).toBeDefined();
    expect(els.some((e) => e.name === 'path' && e.attrs.stroke === '#5b6470')).toBe(true);
    expect(texts(els)).toContain(`${nc} polygons`);
    expect(els.filter((e) => e.attrs.id === 'colorbar')).toHaveLength(1);
    expect(els.filter((e) => e.name === 'rect' && e.attrs.fill && e.attrs.height === '14').length).toBe(0);
  });

  it('refuses values of the wrong length', () => {
    expect(() => fieldSvg({ mesh, values: new Float64Array(3) })).toThrow(/values/);
  });

  it('stays fast on a large mesh', () => {
    const big = plate(400, 50, 800, 100); // 20 000 cells
    const v = new Float64Array(big.cellStart.length - 1).map((_, c) => Math.cos(c / 50));
    const t0 = performance.now();
    const svg = fieldSvg({ mesh: big, values: v, diverging: true });
    const ms = performance.now() - t0;
    expect(svg.length).toBeLessThan(3_000_000);
    expect(ms).toBeLessThan(3000); // generous on a shared two-core machine
  });
});

describe('plotSvg', () => {
  const x = Array.from({ length: 50 }, (_, i) => i * 0.01);
  const y = x.map((w) => (w < 0.1 ? 35000 * w : 3500 * Math.exp(-(w - 0.1) / 0.1)));
  it('is well formed with axes, series, legend and marks', () => {
    const svg = plotSvg({
      series: [{ label: 'model', x, y }, { label: 'lab <B2>', x, y: y.map((v) => v * 0.9), style: 'points' }, { label: 'fine', x, y, style: 'dashed' }],
      xLabel: 'CMOD (mm)', yLabel: 'Load (N)', title: 'Curve', marks: [{ x: 0.1, y: 3500, label: 'peak 3.5 kN' }],
    });
    const els = parseXml(svg);
    for (const id of ['axes', 'series', 'legend', 'marks']) expect(ids(els)).toContain(id);
    const t = texts(els);
    for (const s of ['CMOD (mm)', 'Load (N)', 'Curve', 'model', 'lab &lt;B2&gt;', 'peak 3.5 kN', '3000']) expect(t).toContain(s);
    expect(els.filter((e) => e.attrs.class === 'series')).toHaveLength(3);
  });
  it('leaves the legend out for one series and handles negative values and gaps', () => {
    const svg = plotSvg({ series: [{ label: 'one', x: [-2, -1, 0, 1], y: [-0.003, NaN, 0.0037, -0.001] }], xLabel: 'x (mm)', yLabel: 'ε' });
    const els = parseXml(svg);
    const legend = els.find((e) => e.attrs.id === 'legend')!;
    expect(legend).toBeDefined();
    expect(svg).toMatch(/<g id="legend"><\/g>/);
    const t = texts(els);
    expect(t).toContain('−2');
    expect(t).toContain('−0.002');
    expect(els.some((e) => e.attrs.class === 'zero')).toBe(true);
    const path = els.find((e) => e.attrs.class === 'series')!;
    expect(path.attrs.d.split('M').length - 1).toBe(2); // the NaN breaks the line
  });
  it('copes with empty and constant data', () => {
    expect(() => parseXml(plotSvg({ series: [{ label: 'e', x: [], y: [] }], xLabel: 'a', yLabel: 'b' }))).not.toThrow();
    expect(() => parseXml(plotSvg({ series: [{ label: 'c', x: [1, 1], y: [2, 2] }], xLabel: 'a', yLabel: 'b' }))).not.toThrow();
  });
});
