import { describe, expect, it } from 'vitest';
import { rilemGF, workOfFracture } from '../src/lab/work.js';
import { InputError } from '../src/errors.js';

describe('work of fracture', () => {
  it('triangle: ½·base·height (hand integral)', () => {
    expect(workOfFracture([0, 0.2, 1], [0, 500, 0])).toBeCloseTo(0.5 * 1 * 500, 12);
  });

  it('trapezoid rise, plateau, fall: area by hand', () => {
    // 0→0.1 mm up to 800 N, plateau to 0.3 mm, down to 0 at 0.6 mm: 40 + 160 + 120 N·mm.
    const x = Float64Array.from([0, 0.1, 0.3, 0.6]);
    const y = Float64Array.from([0, 800, 800, 0]);
    expect(workOfFracture(x, y)).toBeCloseTo(320, 10);
  });

  it('a closed unloading loop adds only the area it encloses (trapezoid rule; common practice)', () => {
    // Up to (1, 100), back to (0.5, 0), up again to (1, 100): the loop 0.5·0.5·100 = 25 is not dissipated twice.
    const w = workOfFracture([0, 1, 0.5, 1, 2], [0, 100, 0, 100, 0]);
    expect(w).toBeCloseTo(50 + (-25) + 25 + 50, 12);
  });

  it('rejects arrays of different length', () => {
    expect(() => workOfFracture([0, 1], [0])).toThrow(InputError);
  });
});

describe('fracture energy from the work of fracture', () => {
  it('GF = (W0 + m g δ0)/A_lig (RILEM TC 50-FMC 1985)', () => {
    // Beam 100 × 100 mm, notch 50 mm: ligament 50·100 = 5000 mm²; W0 = 500 N·mm → 0.1 N/mm.
    expect(rilemGF(500, 5000)).toBeCloseTo(0.1, 14);
    expect(rilemGF(500, 5000, 50)).toBeCloseTo(0.11, 14);
  });

  it('rejects a ligament area that is not positive', () => {
    expect(() => rilemGF(1, 0)).toThrow(/ligament area must be positive in mm² \(found 0\)/);
  });
});
