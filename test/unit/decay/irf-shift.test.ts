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

  it('equals the channel-by-channel definition for shifts inside, at and beyond the histogram, and stops at endChannel', () => {
    const widthNs = 0.1;
    const reference = (shiftNs: number): { shifted: Float64Array; slope: Float64Array } => {
      const channels = shiftNs / widthNs;
      const whole = Math.floor(channels);
      const fraction = channels - whole;
      const value = (j: number): number => (j >= 0 && j < irf.length ? (irf[j] as number) : 0);
      return {
        shifted: irf.map((_unused, k) => (1 - fraction) * value(k - whole) + fraction * value(k - whole - 1)),
        slope: irf.map((_unused, k) => (value(k - whole - 1) - value(k - whole)) * (1 / widthNs)),
      };
    };
    for (const shiftNs of [0, 0.037, -0.037, 0.1, -0.26, 0.55, 0.61, -0.7, 3]) {
      const out = new Float64Array(6);
      const slope = new Float64Array(6);
      shiftIrf(irf, shiftNs, widthNs, out, slope);
      const expected = reference(shiftNs);
      expect(Array.from(out)).toEqual(Array.from(expected.shifted));
      expect(Array.from(slope)).toEqual(Array.from(expected.slope));
      const partial = new Float64Array(6).fill(-1);
      shiftIrf(irf, shiftNs, widthNs, partial, undefined, 4);
      expect(Array.from(partial)).toEqual([...Array.from(expected.shifted).slice(0, 4), -1, -1]);
    }
  });

  it('gives NaN, not stale values, for a non-finite shift', () => {
    const out = new Float64Array(6);
    shiftIrf(irf, Number.NaN, 0.1, out, undefined);
    expect(out.every((value) => Number.isNaN(value))).toBe(true);
  });
});
