// Gradient quantum yield over dilution series (Williams, Winfield & Miller, Analyst 108, 1067 (1983)).
import { describe, expect, it } from 'vitest';
import { gradientQuantumYield } from '../../../src/photophysics/gradient-yield.js';

const absorbances = [0.02, 0.04, 0.06, 0.08, 0.1];

describe('gradientQuantumYield', () => {
  it('computes Φx = Φr·(Gx/Gr)·(nx²/nr²) with slopes through the origin, by hand', () => {
    const sampleIntegrals = [1.02e6, 1.98e6, 3.05e6, 3.96e6, 5.01e6];
    const referenceIntegrals = absorbances.map((a) => 4.0e7 * a);
    const result = gradientQuantumYield({
      sample: { absorbances, integrals: sampleIntegrals },
      reference: { absorbances, integrals: referenceIntegrals },
      referenceYield: 0.546,
      sampleRefractiveIndex: 1.3618,
      referenceRefractiveIndex: 1.339,
      uncertainties: { referenceYield: 0.02 },
    });
    // By hand: Σxy = 0.02·1.02e6 + 0.04·1.98e6 + 0.06·3.05e6 + 0.08·3.96e6 + 0.1·5.01e6 = 1.1004e6,
    // Σx² = 0.022, Gx = 1.1004e6/0.022 = 5.001818e7; Gr = 4.0e7;
    // Φ = 0.546 · (5.001818e7/4.0e7) · (1.3618²/1.339²) = 0.546 · 1.2504545 · 1.0343451 = 0.706197.
    expect(result.sampleFit.slope).toBeCloseTo(1.1004e6 / 0.022, 0);
    expect(result.quantumYield).toBeCloseTo(0.546 * (1.1004e6 / 0.022 / 4.0e7) * (1.3618 ** 2 / 1.339 ** 2), 10);
    expect(result.quantumYield).toBeCloseTo(0.706197, 5);
    expect(result.sampleFit.highestAbsorbance).toBe(0.1);
    expect(result.sampleFit.rSquared).toBeGreaterThan(0.999);
    expect(result.warnings).toEqual([]);
    // Slope standard error by hand: √(Σr²/(n−1)/Σx²).
    const g = 1.1004e6 / 0.022;
    const ss = sampleIntegrals.reduce((s, y, i) => s + (y - g * (absorbances[i] as number)) ** 2, 0);
    expect(result.sampleFit.slopeStandardError).toBeCloseTo(Math.sqrt(ss / 4 / 0.022), 6);
  });

  it('flags downward curvature (saturating series, e.g. inner filter) and a systematic residual pattern', () => {
    const sampleAbsorbances = [0.05, 0.1, 0.2, 0.3, 0.4, 0.5];
    // Emission ∝ absorptance 1 − 10^−A, not A: curves downward at high A.
    const result = gradientQuantumYield({
      sample: { absorbances: sampleAbsorbances, integrals: sampleAbsorbances.map((a) => 1e7 * (1 - 10 ** -a)) },
      reference: { absorbances, integrals: absorbances.map((a) => 4.0e6 * a) },
      referenceYield: 0.6,
      sampleRefractiveIndex: 1.333,
      referenceRefractiveIndex: 1.333,
    });
    const text = result.warnings.join(' | ');
    expect(text).toMatch(/curves downwards/);
    expect(text).toMatch(/reaches A = 0.5/);
    expect(result.sampleFit.relativeCurvature as number).toBeLessThan(-0.05);
    expect(result.sampleFit.curvaturePValue as number).toBeLessThan(0.01);
  });

  it('flags a systematic residual pattern by the exact runs test on a long, gently curved series', () => {
    // Twelve points of emission ∝ absorptance 1 − 10^(−A) up to A = 0.12 with a small alternating wobble:
    // residuals of the straight line run + … + − … − + … + (3 runs of 12, runs test p < 0.01).
    const longAbsorbances = Array.from({ length: 12 }, (_, i) => 0.01 * (i + 1));
    const integrals = longAbsorbances.map((a, i) => 1e7 * (1 - 10 ** -a) * (1 + 1e-5 * (i % 2 === 0 ? 1 : -1)));
    const result = gradientQuantumYield({
      sample: { absorbances: longAbsorbances, integrals },
      reference: { absorbances, integrals: absorbances.map((a) => 4.0e6 * a) },
      referenceYield: 0.6,
      sampleRefractiveIndex: 1.333,
      referenceRefractiveIndex: 1.333,
      options: { absorbanceWarnLimit: 0.2 },
    });
    expect(result.sampleFit.residualSignRuns).toBeLessThanOrEqual(3);
    expect(result.sampleFit.residualRunsPValue).toBeLessThan(0.01);
    expect(result.warnings.join(' | ')).toMatch(/sample residuals show a systematic pattern .*runs test p = /);
  });
});
