// Readings of the case's named gauges (test rigs): opening along from→to, sliding across it
// (positive when the `to` end moves to the left of from→to), from the displacement of the
// mesh vertices at the gauge points (the domain makes every gauge point a vertex).
import type { NamedGauge } from '../case/model.js';
import type { PolyMesh } from '../mesh/polymesh.js';

export const GAUGE_HEADER = 'step,gauge,opening_mm,sliding_mm';

export interface GaugeReading { gauge: string; opening_mm: number; sliding_mm: number }

/** Nearest vertex of the mesh to (x, y); the first one on a tie (a crack-face twin comes later). */
function nearestVertex(m: PolyMesh, x: number, y: number): number {
  let best = -1, bd = Infinity;
  for (let v = 0; v < m.xy.length >> 1; v++) {
    const d = (m.xy[2 * v] - x) ** 2 + (m.xy[2 * v + 1] - y) ** 2;
    if (d < bd) { bd = d; best = v; }
  }
  return best;
}

/** Reads gauges on a run's snapshots; the vertices are found again only when the mesh changes. */
export class GaugeReader {
  private mesh: PolyMesh | null = null;
  private ends: [number, number][] = [];
  constructor(readonly gauges: NamedGauge[]) {}

  read(m: PolyMesh, u: Float64Array): GaugeReading[] {
    if (m !== this.mesh) {
      this.mesh = m;
      this.ends = this.gauges.map((g) => [nearestVertex(m, g.from[0], g.from[1]), nearestVertex(m, g.to[0], g.to[1])]);
    }
    return this.gauges.map((g, i) => {
      const [a, b] = this.ends[i];
      const ex = g.to[0] - g.from[0], ey = g.to[1] - g.from[1], L = Math.hypot(ex, ey);
      const dx = u[2 * b] - u[2 * a], dy = u[2 * b + 1] - u[2 * a + 1];
      return { gauge: g.name, opening_mm: (dx * ex + dy * ey) / L, sliding_mm: (dy * ex - dx * ey) / L };
    });
  }
}
