// Stern–Volmer analysis on invented series with known constants (IUPAC Gold Book; Lakowicz ch. 8).
import { describe, expect, it } from 'vitest';
import { sternVolmer } from '../../../src/photophysics/stern-volmer.js';
import { diffusionLimitPerMPerS } from '../../../src/photophysics/viscosities.js';

const concentrationsM = [0, 0.01, 0.02, 0.03, 0.04, 0.05];
const tau0Ns = 4.0;

describe('sternVolmer', () => {
  it('recovers K_SV by least squares through intercept 1 (by hand) and k_q = K/τ0 for dynamic quenching', () => {
    const wobble = [0, 0.004, -0.003, 0.002, -0.004, 0.003];
    const ratios = concentrationsM.map((q, i) => 1 + 20 * q + (wobble[i] as number));
    const result = sternVolmer({
      concentrationsM,
      intensityRatios: ratios,
      lifetimesNs: concentrationsM.map((q) => tau0Ns / (1 + 20 * q)),
      solvent: 'water',
    });
    // By hand: K = Σ q·(F0/F − 1) / Σ q² over the invented points.
    const sxy = concentrationsM.reduce((s, q, i) => s + q * ((ratios[i] as number) - 1), 0);
    const sxx = concentrationsM.reduce((s, q) => s + q * q, 0);
    expect(result.ksvPerM).toBeCloseTo(sxy / sxx, 12);
    expect(result.kdPerM).toBeCloseTo(20, 10);
    expect(result.mechanism).toBe('dynamic');
    expect(result.kqPerMPerS).toBeCloseTo(20 / 4e-9, -3); // 5e9 M⁻¹s⁻¹
    expect(result.exceedsDiffusionLimit).toBe(false);
    expect(result.ksvStandardErrorPerM).toBeGreaterThan(0);
  });

  it('weights by 1/u² when F0/F uncertainties are given: K = Σw q (y − 1)/Σw q² (weighted LS through intercept 1)', () => {
    const ratios = [1, 1.21, 1.39, 1.62, 1.78, 2.03];
    const u = [0.01, 0.01, 0.02, 0.02, 0.04, 0.04];
    const result = sternVolmer({ concentrationsM, intensityRatios: ratios, intensityRatioUncertainties: u });
    const w = u.map((x) => 1 / (x * x));
    const sxy = concentrationsM.reduce((s, q, i) => s + (w[i] as number) * q * ((ratios[i] as number) - 1), 0);
    const sxx = concentrationsM.reduce((s, q, i) => s + (w[i] as number) * q * q, 0);
    expect(result.ksvPerM).toBeCloseTo(sxy / sxx, 12);
    expect(result.ksvPerM).not.toBeCloseTo(sternVolmer({ concentrationsM, intensityRatios: ratios }).ksvPerM, 3);
  });

  it('calls quenching static when lifetimes do not change', () => {
    const result = sternVolmer({
      concentrationsM,
      intensityRatios: concentrationsM.map((q) => 1 + 20 * q),
      lifetimesNs: concentrationsM.map(() => tau0Ns),
    });
    expect(result.mechanism).toBe('static');
    expect(result.ksPerM).toBeCloseTo(20, 10);
  });

  it('separates K_D and K_S with the combined model (1 + K_D[Q])(1 + K_S[Q])', () => {
    const result = sternVolmer({
      concentrationsM,
      intensityRatios: concentrationsM.map((q) => (1 + 10 * q) * (1 + 30 * q)),
      lifetimesNs: concentrationsM.map((q) => tau0Ns / (1 + 10 * q)),
    });
    expect(result.mechanism).toBe('combined');
    expect(result.kdPerM).toBeCloseTo(10, 10);
    expect(result.ksPerM).toBeCloseTo(30, 10);
  });

  it('sees upward curvature without lifetimes and names both constants', () => {
    const result = sternVolmer({
      concentrationsM,
      intensityRatios: concentrationsM.map((q) => (1 + 10 * q) * (1 + 30 * q)),
      tau0Ns,
    });
    expect(result.mechanism).toBe('combined');
    // Roots of t² − 40t + 300 = 0 are 30 and 10 (by hand).
    expect(result.warnings.join(' ')).toMatch(/constants 30\.00 and 10\.00/);
  });

  it('flags k_q above the diffusion limit 8RT/3η (water 0.890 mPa·s at 25 °C, CRC, from memory)', () => {
    const result = sternVolmer({
      concentrationsM,
      intensities: concentrationsM.map((q) => 1000 / (1 + 80 * q)),
      tau0Ns,
      solvent: 'water',
    });
    expect(result.kqPerMPerS).toBeCloseTo(2e10, -6);
    expect(result.exceedsDiffusionLimit).toBe(true);
    expect(result.mechanism).toBe('undetermined');
  });

  it('gives k_diff ≈ 7.4e9 M⁻¹s⁻¹ in water at 25 °C (REFERENCES.md; Lakowicz, from memory)', () => {
    expect(diffusionLimitPerMPerS(298.15, 0.89e-3) / 7.4e9).toBeCloseTo(1, 1);
  });
});
