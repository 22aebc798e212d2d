// Second-order IRF treatment (irf-second-order.ts): Catmull–Rom sub-channel shift and the Δ²/12 correction.
import { describe, expect, it } from 'vitest';
import { shiftIrfSecondOrder } from '../../../src/decay/irf-second-order.js';
import { gaussianIrf } from '../../../src/decay/simulate.js';

const widthNs = 0.05;
const irf = gaussianIrf(80, widthNs, 1.0, 0.3);

function shifted(shiftNs: number): { values: Float64Array; slope: Float64Array } {
  const values = new Float64Array(irf.length);
  const slope = new Float64Array(irf.length);
  shiftIrfSecondOrder(irf, shiftNs, widthNs, values, slope);
  return { values, slope };
}

describe('shiftIrfSecondOrder', () => {
  it('at a whole-channel shift gives the moved IRF minus 1/12 of its second difference (by hand)', () => {
    const { values } = shifted(2 * widthNs);
    for (const k of [18, 20, 22, 25]) {
      const g = (i: number): number => irf[i - 2] as number;
      expect(values[k]).toBeCloseTo(g(k) - (g(k + 1) - 2 * g(k) + g(k - 1)) / 12, 15);
    }
  });

  it('keeps the IRF sum (Catmull–Rom weights and second differences sum to 1 and 0)', () => {
    for (const shiftNs of [0, 0.013, 0.0371, -0.02]) {
      const sum = shifted(shiftNs).values.reduce((s, v) => s + v, 0);
      expect(sum).toBeCloseTo(1, 6);
    }
  });

  it('is continuous in value and slope across a whole channel, and its slope is the shift derivative', () => {
    const below = shifted(widthNs - 1e-9);
    const above = shifted(widthNs + 1e-9);
    for (let k = 10; k < 40; k++) {
      expect(Math.abs((below.values[k] as number) - (above.values[k] as number))).toBeLessThan(1e-8); // |slope| ≤ ~3 per ns over 2e-9 ns
      expect(Math.abs((below.slope[k] as number) - (above.slope[k] as number))).toBeLessThan(
        1e-5 * Math.max(...above.slope.map(Math.abs)),
      );
    }
    // Central difference of the values against the analytic slope at a sub-channel shift.
    const h = 1e-6;
    const plus = shifted(0.0213 + h).values;
    const minus = shifted(0.0213 - h).values;
    const at = shifted(0.0213).slope;
    for (let k = 12; k < 35; k++) {
      expect(((plus[k] as number) - (minus[k] as number)) / (2 * h)).toBeCloseTo(at[k] as number, 4);
    }
  });
});
