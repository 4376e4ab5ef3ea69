// Validation and meshing of large named-point, hole and outline counts: each case at a tenth
// and at full size, so the ratio shows how the time grows (10 for linear, 100 for quadratic).
import { caseFromData } from '../src/case/index.js';
import { InputError } from '../src/errors.js';
import { meshCase } from '../src/run.js';

const now = () => performance.now() / 1000;

type Raw = Record<string, unknown>;

function base(w: number, h: number): Raw {
  return {
    format: 1, title: 'bench validation', units: 'mm-N-MPa', thickness: 10,
    geometry: { outline: [[0, 0], [w, 0], [w, h], [0, h]] },
    material: { E: 30000, nu: 0.2, ft: 3, GF: 0.1 },
    supports: [{ along: [[0, 0], [w, 0]], fix: 'y' }, { at: [0, 0], fix: 'x' }],
    loads: [{ along: [[0, h], [w, h]], direction: [0, 1] }],
    control: { by: 'displacement', target: 0.05 },
    mesh: { size: w / 40, tipSize: w / 40, refineRadius: w / 40, lloyd: 2, seed: 1 },
  };
}

/** n circular holes on a square grid in a plate sized so that each has a cell of 10 mm. */
export function holesCase(n: number): Raw {
  const k = Math.ceil(Math.sqrt(n)), w = 10 * k + 20;
  const c = base(w, w);
  const holes = [];
  for (let i = 0; i < n; i++) holes.push({ circle: { center: [15 + 10 * (i % k), 15 + 10 * Math.floor(i / k)], radius: 2 } });
  (c.geometry as Raw).holes = holes;
  c.mesh = { size: 5, tipSize: 5, refineRadius: 5, lloyd: 2, seed: 1 };
  return c;
}

/** A plate whose top edge is a shallow wave of n points. */
export function outlineCase(n: number): Raw {
  const w = 1000, c = base(w, 500);
  const top: number[][] = [];
  for (let i = 0; i < n; i++) { const x = w - (w * i) / (n - 1); top.push([x, 500 + 5 * Math.sin(x / 20)]); }
  (c.geometry as Raw).outline = [[0, 0], [w, 0], ...top];
  c.loads = [{ at: [w, 500 + 5 * Math.sin(w / 20)], direction: [0, 1] }];
  return c;
}

/** n probes on a grid inside a plate. */
export function probesCase(n: number): Raw {
  const w = 1000, c = base(w, w), k = Math.ceil(Math.sqrt(n));
  const probes = [];
  for (let i = 0; i < n; i++) probes.push({ name: `p${i}`, at: [5 + (990 * (i % k)) / k, 5 + (990 * Math.floor(i / k)) / k] });
  c.probes = probes;
  return c;
}

function time(raw: Raw, mesh: boolean): { check: number; mesh: number; note: string } {
  const t0 = now();
  let c;
  try { c = caseFromData(structuredClone(raw), 'bench'); } catch (e) {
    if (e instanceof InputError) return { check: now() - t0, mesh: NaN, note: `refused: ${e.message}` };
    throw e;
  }
  const check = now() - t0;
  if (!mesh) return { check, mesh: NaN, note: '' };
  const t1 = now();
  const m = meshCase(c);
  return { check, mesh: now() - t1, note: `${m.mesh.cellStart.length - 1} polygons` };
}

export function validationBench(): void {
  console.log('validation and meshing (seconds; a tenth and the full count, ratio 10 is linear):');
  for (const [what, make, n] of [['holes', holesCase, 2000], ['outline points', outlineCase, 50_000], ['probes', probesCase, 30_000]] as const) {
    const small = time(make(n / 10), true), full = time(make(n), true);
    const f = (x: number) => (Number.isFinite(x) ? x.toFixed(2) : '—');
    console.log(`  ${String(n).padStart(6)} ${what.padEnd(15)} check ${f(small.check)} → ${f(full.check)} s  mesh ${f(small.mesh)} → ${f(full.mesh)} s  ${full.note}`);
  }
}
