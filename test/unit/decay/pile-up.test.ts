// Coates pile-up correction against the first-photon detection model it inverts (Coates, J. Phys. E 1,
// 878 (1968)): with Poisson photons per cycle, means μ_i per channel, N cycles, the recorded counts are
// n_i = N·exp(−Σ_{j<i} μ_j)·(1 − exp(−μ_i)) and the correction must return N·μ_i exactly.
import { describe, expect, it } from 'vitest';
import { coatesCorrection } from '../../../src/decay/pile-up.js';
import { AnalysisFailed } from '../../../src/model/errors.js';

describe('coatesCorrection', () => {
  it('inverts first-photon detection exactly', () => {
    const cycles = 1e6;
    const perCycle = Array.from({ length: 50 }, (_unused, i) => 0.004 * Math.exp(-i / 12));
    let survived = 1;
    const recorded = perCycle.map((mu) => {
      const value = cycles * survived * (1 - Math.exp(-mu));
      survived *= Math.exp(-mu);
      return value;
    });
    const corrected = coatesCorrection(recorded, cycles);
    perCycle.forEach((mu, i) => expect((corrected[i] as number) / (cycles * mu)).toBeCloseTo(1, 9));
    // The recorded histogram is depleted at late channels (pile-up) and the correction restores it.
    expect((recorded[49] as number) / (cycles * (perCycle[49] as number))).toBeLessThan(0.96);
  });

  it('throws OUT_OF_RANGE when more photons than cycles were counted', () => {
    expect(() => coatesCorrection([5, 6], 10)).toThrow(AnalysisFailed);
  });
});
