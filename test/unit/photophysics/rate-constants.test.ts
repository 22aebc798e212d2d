// Rate constants from yield and lifetime (Birks 1976), yields from rate constants, and time scales.
import { describe, expect, it } from 'vitest';
import {
  rateConstantsFromYield,
  rateFromTimeScale,
  yieldsFromRateConstants,
} from '../../../src/photophysics/rate-constants.js';
import { timeScalePlausibility } from '../../../src/photophysics/time-scales.js';

describe('rateConstantsFromYield', () => {
  it('computes k_r = Φ/τ, k_nr = (1 − Φ)/τ, τ0 = τ/Φ (Birks, J. Res. NBS 80A, 389 (1976))', () => {
    // Fluorescein in 0.1 M NaOH: Φ 0.925 (Magde 2002, from memory), τ 4.0 ns (REFERENCES.md lifetime table, from memory).
    const rates = rateConstantsFromYield({ quantumYield: 0.925, tauNs: 4.0 });
    expect(rates.krPerS).toBeCloseTo(0.925 / 4.0e-9, 0); // 2.3125e8 s⁻¹ by hand
    expect(rates.knrPerS).toBeCloseTo(0.075 / 4.0e-9, 0); // 1.875e7 s⁻¹
    expect(rates.tau0Ns).toBeCloseTo(4.324324, 5); // 4.0/0.925
    expect(rates.totalDecayRatePerS).toBeCloseTo(2.5e8, 0);
  });

  it('propagates uncertainties to first order', () => {
    const rates = rateConstantsFromYield({
      quantumYield: 0.5,
      tauNs: 2,
      quantumYieldUncertainty: 0.02,
      tauUncertaintyNs: 0.04,
    });
    // u(k_r)/k_r = √((0.02/0.5)² + (0.04/2)²) = √(0.0016 + 0.0004) by hand.
    expect((rates.krStandardUncertaintyPerS as number) / rates.krPerS).toBeCloseTo(Math.sqrt(0.002), 12);
  });

  it('refuses Φ > 1 and non-positive lifetimes', () => {
    expect(() => rateConstantsFromYield({ quantumYield: 1.2, tauNs: 4 })).toThrow(/exceeds 1/);
    expect(() => rateConstantsFromYield({ quantumYield: 0.5, tauNs: 0 })).toThrow(/must be positive/);
  });
});

describe('yieldsFromRateConstants and time scales', () => {
  it('gives Φ_i = k_i/Σk and 1/Σk (textbook first-order kinetics; practice)', () => {
    const result = yieldsFromRateConstants([
      { name: 'fluorescence', ratePerS: 1e8 },
      { name: 'isc', ratePerS: 3e8 },
    ]);
    expect(result.yields.map((y) => y.quantumYield)).toEqual([0.25, 0.75]);
    expect(result.decayTimeNs).toBeCloseTo(2.5, 12);
  });

  it('takes k ≈ 1/t and flags a lifetime outside its process time scale (REFERENCES.md, practice)', () => {
    expect(rateFromTimeScale(1e-8)).toBeCloseTo(1e8, 0);
    expect(timeScalePlausibility('fluorescence', 4)).toEqual([]);
    expect(timeScalePlausibility('fluorescence', 5e5)).toHaveLength(1); // 0.5 ms is phosphorescence-like
    expect(timeScalePlausibility('phosphorescence', 10)).toHaveLength(1);
  });
});
