// Sub-channel IRF shift by linear interpolation (definition in src/decay/irf-shift.ts).
import { describe, expect, it } from 'vitest';
import { shiftIrf } from '../../../src/decay/irf-shift.js';

describe('shiftIrf', () => {
  const irf = Float64Array.from([0, 0.2, 0.5, 0.3, 0, 0]);

  it('moves by whole channels exactly', () => {
    const out = new Float64Array(6);
    shiftIrf(irf, 0.2, 0.1, out, undefined);
    expect(Array.from(out)).toEqual([0, 0, 0, 0.2, 0.5, 0.3].map((v) => expect.closeTo(v, 12) as unknown as number));
  });

  it('interpolates linearly for a half channel, keeps the sum and gives the slope', () => {
    const out = new Float64Array(6);
    const slope = new Float64Array(6);
    shiftIrf(irf, 0.05, 0.1, out, slope);
    // (1 − f)·g[k] + f·g[k − 1] with f = 0.5, by hand.
    [0, 0.1, 0.35, 0.4, 0.15, 0].forEach((value, k) => expect(out[k]).toBeCloseTo(value, 12));
    expect(out.reduce((a, b) => a + b, 0)).toBeCloseTo(1, 12);
    // (g[k − 1] − g[k]) / Δ
    [0, -2, -3, 2, 3, 0].forEach((value, k) => expect(slope[k]).toBeCloseTo(value, 12));
  });

  it('shifts earlier for a negative shift', () => {
    const out = new Float64Array(6);
    shiftIrf(irf, -0.1, 0.1, out, undefined);
    [0.2, 0.5, 0.3, 0, 0, 0].forEach((value, k) => expect(out[k]).toBeCloseTo(value, 12));
  });
});
