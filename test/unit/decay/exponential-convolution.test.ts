// The exact recursion for an exponential convolved with a histogram IRF, checked against brute-force
// numerical quadrature of the defining double integral, finite differences and an explicit pulse sum.
import { describe, expect, it } from 'vitest';
import { convolveExponentialWithIrf, type ConvolutionBuffers } from '../../../src/decay/exponential-convolution.js';
import { shiftIrf } from '../../../src/decay/irf-shift.js';

function buffers(length: number): ConvolutionBuffers {
  return {
    response: new Float64Array(length),
    responsePerTauNs: new Float64Array(length),
    responsePerShiftNs: new Float64Array(length),
  };
}

/**
 * (1/Δ)∫_channel k dt ∫ ds irf(s)·exp(−(t − s)/τ)·[t > s] by the midpoint rule on a fine grid (O(n²·m²)),
 * with the IRF a density g[j]/Δ on channel j: the definition the recursion must reproduce.
 */
function bruteForce(irf: Float64Array, tauNs: number, widthNs: number, channel: number, subdivisions: number): number {
  const h = widthNs / subdivisions;
  let total = 0;
  for (let a = 0; a < subdivisions; a++) {
    const t = channel * widthNs + (a + 0.5) * h;
    for (let j = 0; j <= channel; j++) {
      const density = (irf[j] as number) / widthNs;
      if (density === 0) continue;
      for (let b = 0; b < subdivisions; b++) {
        const s = j * widthNs + (b + 0.5) * h;
        if (s < t) total += density * Math.exp(-(t - s) / tauNs) * h * h;
        else if (s === t) total += 0.5 * density * h * h;
      }
    }
  }
  return total / widthNs;
}

const irf = Float64Array.from([0, 0.1, 0.4, 0.3, 0.2, 0, 0, 0, 0, 0, 0, 0]);

describe('convolveExponentialWithIrf', () => {
  it.each([[0.05], [0.3], [2.5]])(
    'matches brute-force quadrature of the double integral (τ = %s ns, Δ = 0.1 ns)',
    (tauNs) => {
      const out = buffers(irf.length);
      convolveExponentialWithIrf(irf, undefined, tauNs, 0.1, undefined, 0, irf.length, false, out);
      for (let k = 0; k < irf.length; k++) {
        // Midpoint rule error is O(h²); 400 subdivisions per channel keep it below 1e-4 relative.
        const expected = bruteForce(irf, tauNs, 0.1, k, 400);
        expect(Math.abs((out.response[k] as number) - expected)).toBeLessThan(2e-4 * Math.max(expected, 1e-3));
      }
    },
  );

  it('has the τ derivative of a central finite difference', () => {
    const out = buffers(irf.length);
    const plus = buffers(irf.length);
    const minus = buffers(irf.length);
    const tauNs = 0.4;
    const step = 1e-6;
    convolveExponentialWithIrf(irf, undefined, tauNs, 0.1, 30, 2, irf.length, true, out);
    convolveExponentialWithIrf(irf, undefined, tauNs + step, 0.1, 30, 2, irf.length, false, plus);
    convolveExponentialWithIrf(irf, undefined, tauNs - step, 0.1, 30, 2, irf.length, false, minus);
    for (let k = 0; k < irf.length - 2; k++) {
      const numeric = ((plus.response[k] as number) - (minus.response[k] as number)) / (2 * step);
      expect(out.responsePerTauNs[k]).toBeCloseTo(numeric, 6);
    }
  });

  it('has the shift derivative of a finite difference away from channel boundaries', () => {
    const shifted = new Float64Array(irf.length);
    const slope = new Float64Array(irf.length);
    const out = buffers(irf.length);
    shiftIrf(irf, 0.023, 0.1, shifted, slope);
    convolveExponentialWithIrf(shifted, slope, 0.5, 0.1, undefined, 0, irf.length, true, out);
    const step = 1e-6;
    const value = (shiftNs: number): Float64Array => {
      const moved = new Float64Array(irf.length);
      const result = buffers(irf.length);
      shiftIrf(irf, shiftNs, 0.1, moved, undefined);
      convolveExponentialWithIrf(moved, undefined, 0.5, 0.1, undefined, 0, irf.length, false, result);
      return result.response;
    };
    const plus = value(0.023 + step);
    const minus = value(0.023 - step);
    for (let k = 0; k < irf.length; k++) {
      expect(out.responsePerShiftNs[k]).toBeCloseTo(((plus[k] as number) - (minus[k] as number)) / (2 * step), 6);
    }
  });

  it('adds earlier pulses as the geometric series of an explicit sum over 200 previous periods', () => {
    const tauNs = 0.9;
    const widthNs = 0.1;
    const periodNs = 1.5;
    const out = buffers(irf.length);
    convolveExponentialWithIrf(irf, undefined, tauNs, widthNs, periodNs, 0, irf.length, false, out);
    const single = buffers(irf.length);
    convolveExponentialWithIrf(irf, undefined, tauNs, widthNs, undefined, 0, irf.length, false, single);
    // Explicit: a pulse p periods earlier contributes, in channel k, the single-pulse response at k + p·T/Δ;
    // T/Δ = 15 channels, so extend the IRF histogram and read the response later (closed form for m ≥ 1 applies).
    const extended = new Float64Array(irf.length + 200 * 15);
    extended.set(irf);
    const long = buffers(extended.length);
    convolveExponentialWithIrf(extended, undefined, tauNs, widthNs, undefined, 0, extended.length, false, long);
    for (let k = 0; k < irf.length; k++) {
      let explicit = single.response[k] as number;
      for (let p = 1; p <= 200; p++) explicit += long.response[k + p * 15] as number;
      expect(out.response[k]).toBeCloseTo(explicit, 12);
    }
  });

  it('integrates to τ/Δ per unit amplitude over a long window (∫exp(−t/τ)dt = τ)', () => {
    const long = new Float64Array(4000);
    long[10] = 1;
    const out = buffers(long.length);
    convolveExponentialWithIrf(long, undefined, 2, 0.01, undefined, 0, long.length, false, out);
    const sum = out.response.reduce((total, value) => total + value, 0);
    expect(sum).toBeCloseTo(2 / 0.01, 6);
  });
});
