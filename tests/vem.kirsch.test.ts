// Circular hole in a plate under uniaxial tension σ (Kirsch 1898): the hoop stress at the
// edge is σ(1 − 2 cos 2θ), so 3σ where the edge is parallel to the load. The exact field is
// imposed on the outer edge of a finite square patch; the hole is traction-free
// (tests/support/kirsch.ts, shared with the order-2 test and the benchmark).
import { describe, expect, it } from 'vitest';
import { plate, concentration1 } from './support/kirsch.js';

describe('Kirsch hole (Kirsch 1898)', () => {
  it('the hole-edge stress concentration approaches 3 as the mesh is refined (a/h = 17, 33, 67), within 5 % on the finest', () => {
    // a small patch (side 3a) is enough: the exact field is imposed on its edge
    const k = [0.06, 0.03, 0.015].map((h) => concentration1(plate(h)).k);
    expect(Math.abs(k[2] - 3)).toBeLessThan(0.15);
    expect(Math.abs(k[2] - 3)).toBeLessThan(Math.abs(k[0] - 3) + 1e-3);
  });
});
