import { describe, expect, it } from 'vitest';
import { Eta } from '../cli/progress.js';

describe('time left', () => {
  it('follows the recent time per unit of progress, not the average since the start', () => {
    // common practice: a slow start (meshing, first factorization) then steady steps of 0.1 s per 1 % of progress
    const eta = new Eta(5, 1);
    let left = NaN;
    eta.add(10, 0.0);
    for (let k = 1; k <= 40; k++) left = eta.add(10 + 0.1 * k, 0.01 * k);
    // at 40 %: 60 % left at 10 s per unit → 6 s (the whole-run average would say 21 s)
    expect(left).toBeCloseTo(6, 6);
    // steps become four times slower: the estimate follows within the window
    for (let k = 41; k <= 60; k++) left = eta.add(14 + 0.4 * (k - 40), 0.01 * k);
    expect(left).toBeCloseTo(0.4 * 40, 6);
  });

  it('says nothing before progress is measurable', () => {
    const eta = new Eta();
    expect(eta.add(0, 0)).toBeNaN();
    expect(eta.add(1, 0)).toBeNaN();
    expect(eta.add(2, 0.001)).toBeNaN();
  });
});
