// A slanted slit under remote tension: the first growth direction follows the maximum
// tangential stress criterion (Erdogan & Sih 1963), θc = 2 arctan[(K_I − √(K_I² + 8K_II²))/(4K_II)]
// with K_I = σ√(πa) sin²β, K_II = σ√(πa) sin β cos β; further out the crack turns
// perpendicular to the load (REFERENCES.md, Erdogan & Sih 1963).
import { describe, expect, it } from 'vitest';
import { Analysis } from '../src/fracture/analysis.js';
import { meshCase } from '../src/run.js';
import { SLIT_HALF, SLIT_W, slitPlate } from './support/slit.js';

const W = SLIT_W, HALF = SLIT_HALF;

function slitCase(betaDeg: number) {
  // slit direction at β from the load axis (y)
  return slitPlate(betaDeg, {
    control: '{by: displacement, target: 0.0125, increments: 13, stopAtLoadFraction: 0.3}',
    crack: '{start: notch-tips, growthStep: 2, averagingRadius: 3}',
    mesh: '{size: 10, tipSize: 0.75, refineRadius: 8, seed: 2}',
  });
}

const mts = (betaDeg: number) => {
  const b = betaDeg * Math.PI / 180, KI = Math.sin(b) ** 2, KII = Math.sin(b) * Math.cos(b);
  return 2 * Math.atan((KI - Math.sqrt(KI * KI + 8 * KII * KII)) / (4 * KII));
};

describe('slanted slit under remote tension (Erdogan & Sih 1963)', () => {
  for (const beta of [45, 60]) {
    it(`β = ${beta}°: first growth within 10° of the maximum tangential stress kink, then perpendicular to the load`, async () => {
      const c = slitCase(beta);
      const a = new Analysis(c, meshCase(c).mesh);
      const res = await a.run(() => {});
      expect(res.status, res.reason).not.toBe('stopped');
      const b = beta * Math.PI / 180;
      // the upper tip runs along (sin β, cos β); the kink turns it clockwise toward the horizontal
      const slitAngle = Math.atan2(Math.cos(b), Math.sin(b));
      const firsts = a.growthLog.filter((g) => g.first);
      expect(firsts.length).toBe(2);
      for (const g of firsts) {
        // measure relative to the direction the tip was running along
        const along = g.y > W / 2 ? slitAngle : slitAngle + Math.PI;
        let kink = Math.atan2(g.dy, g.dx) - along;
        kink = Math.atan2(Math.sin(kink), Math.cos(kink));
        expect(Math.abs(kink * 180 / Math.PI - mts(beta) * 180 / Math.PI)).toBeLessThan(10);
      }
      // farther out (the last growth of each tip) the direction is within 15° of horizontal
      for (const tip of [0, 1]) {
        const last = a.growthLog.filter((g) => g.tip === tip).at(-1)!;
        const dist = Math.hypot(last.x - W / 2, last.y - W / 2);
        expect(dist).toBeGreaterThan(2 * HALF);
        expect(Math.abs(last.dy)).toBeLessThan(Math.sin(15 * Math.PI / 180));
      }
    });
  }
});
