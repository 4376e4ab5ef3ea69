// npm run bench -- --order: accuracy against cost for element orders 1 and 2 on the cantilever
// (Timoshenko & Goodier; relative energy and L² errors) and the Kirsch hole (error of the
// stress concentration against 3). Unknowns are the free dofs of the global system (order 2
// after condensing the cell means); times are medians of the solve alone (assembly,
// factorization, solve, recovery; the mesh is shared by both orders and not timed). Then crack
// growth on the coarse test beams at both orders, run alternately on the same mesh: CPU-time
// medians of whole runs and their ratio.
import { beamMesh, order1 as beam1, order2 as beam2 } from '../tests/support/cantilever.js';
import { concentration1, concentration2, plate } from '../tests/support/kirsch.js';
import { coarseBeam } from '../tests/support/beam.js';
import { Analysis } from '../src/fracture/analysis.js';
import { meshCase } from '../src/run.js';

const median = (a: number[]) => { const s = [...a].sort((x, y) => x - y); return s[s.length >> 1]; };
const pct = (v: number) => `${(100 * v).toPrecision(3)} %`;

function timed<T extends { solve_s: number }>(f: () => T, repeat: number): T {
  const runs: T[] = [];
  for (let r = 0; r < repeat; r++) runs.push(f());
  return { ...runs[0], solve_s: median(runs.map((r) => r.solve_s)) };
}

export function benchOrder(repeat: number): void {
  console.log(`accuracy against cost, orders 1 and 2 (medians of ${repeat} solves)`);
  console.log('cantilever, Voronoi meshes: order  size  unknowns  energy error  L² error  solve s');
  for (const size of [0.25, 0.125, 0.0625, 0.03125]) {
    const m = beamMesh(size, 7);
    for (const [k, f] of [[1, beam1], [2, beam2]] as const) {
      if (k === 2 && size < 0.0625) continue; // order 2 is past round-off-free rates there and costs the most
      const r = timed(() => f(m), repeat);
      console.log(`  ${k}  ${String(size).padEnd(7)} ${String(r.unknowns).padStart(7)}  ${pct(r.energy).padStart(9)}  ${pct(r.l2).padStart(9)}  ${r.solve_s.toFixed(3)}`);
    }
  }
  console.log('Kirsch hole, a/h = 1/size: order  size  unknowns  K_t  |K_t − 3|/3  solve s');
  for (const size of [0.12, 0.06, 0.03, 0.015]) {
    const m = plate(size);
    for (const [k, f] of [[1, concentration1], [2, concentration2]] as const) {
      if (k === 2 && size < 0.03) continue;
      const r = timed(() => f(m), repeat);
      console.log(`  ${k}  ${String(size).padEnd(7)} ${String(r.unknowns).padStart(7)}  ${r.k.toFixed(4)}  ${pct(Math.abs(r.k - 3) / 3).padStart(9)}  ${r.solve_s.toFixed(3)}`);
    }
  }
}

const cpu = () => { const u = process.cpuUsage(); return (u.user + u.system) / 1e6; };

/**
 * The notched beam of the growth tests (tests/support/beam.ts) at orders 1 and 2 on the same
 * mesh, alternately: CPU seconds of the whole run (mesh included), medians of `repeat`, the ratio
 * of the medians, and what each run gave (steps, growth events, largest dofs, peak, the worst
 * energy balance |W − U − D| / W over its steps).
 */
export async function benchGrowthOrders(repeat: number): Promise<void> {
  console.log(`crack growth at orders 1 and 2 on one mesh (CPU seconds, medians of ${repeat}, run alternately)`);
  const beams = [
    ['coarse beam, 20 mm cells, 6 mm tips', { tip: 6, size: 20, target: 0.2, increments: 40 }],
    ['coarse beam, 12 mm cells, 3 mm tips', {}],
  ] as const;
  for (const [name, opts] of beams) {
    const t: number[][] = [[], []], said: string[] = ['', ''];
    for (let r = 0; r < repeat; r++) {
      for (const k of [1, 2] as const) {
        const c = coarseBeam(opts);
        c.mesh.order = k;
        const t0 = cpu();
        const a = new Analysis(c, meshCase(c).mesh);
        const res = await a.run(() => {});
        t[k - 1].push(cpu() - t0);
        let worst = 0;
        for (const row of res.rows.slice(1)) worst = Math.max(worst, Math.abs(row.external_work_Nmm - row.elastic_energy_Nmm - row.dissipated_Nmm) / row.external_work_Nmm);
        said[k - 1] = `${res.rows.length - 1} steps, ${a.growthLog.length} growth events, ≤ ${res.dofs.max} dofs, peak ${res.peak.load_N.toFixed(1)} N, balance ≤ ${pct(worst)}, ${res.status}`;
      }
    }
    const m1 = median(t[0]), m2 = median(t[1]);
    console.log(`${name}: order 1 ${m1.toFixed(2)} s, order 2 ${m2.toFixed(2)} s, ratio ×${(m2 / m1).toFixed(2)}`);
    console.log(`  order 1: ${said[0]}\n  order 2: ${said[1]}`);
  }
}
