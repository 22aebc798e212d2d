// Water Raman test on a simulated water scan at 350 nm excitation.
import { describe, expect, it } from 'vitest';
import { ramanPeakNm, ramanTest } from '../../../src/spectra/raman.js';
import { axisNm, gaussianBand, makeSpectrum } from './synthetic.js';

describe('ramanTest', () => {
  it('expects the water band at 397 ± 1 nm for 350 nm excitation (Bartlett et al., Appl. Opt. 37, 3324 (1998))', () => {
    expect(Math.abs(ramanPeakNm(350) - 397)).toBeLessThan(1); // 1e7/(1e7/350 − 3400) = 397.3 nm
  });

  it('measures peak position error and SNR (ex 350, background at 450 nm: ASTM E579 practice)', () => {
    const axis = axisNm(365, 480, 0.5);
    const background = 400; // counts
    const truePeakNm = 397.8; // an instrument 0.5 nm off
    const counts = gaussianBand(axis, 40000, truePeakNm, 4).map((v) => v + background);
    const scan = makeSpectrum('emission', axis, counts, { noiseSigma: 20, seed: 3, metadata: { excitationNm: 350 } });
    const result = ramanTest(scan);
    expect(result.expectedPeakNm).toBeCloseTo(397.2758, 3); // 1e7/(1e7/350 − 3400) by hand
    expect(result.backgroundNm).toBeCloseTo(450, 9);
    expect(Math.abs(result.peakErrorNm - (truePeakNm - result.expectedPeakNm))).toBeLessThan(0.1);
    expect(result.positionWithinTolerance).toBe(true);
    // Peak height 40000/(4√(2π)) = 3989 counts; (P − B)/√B = 3989/20 ≈ 199.5 with B = 400.
    expect(result.signalToNoisePoisson as number).toBeGreaterThan(185);
    expect(result.signalToNoisePoisson as number).toBeLessThan(215);
    // rms form: (P − B)/σ with σ = 20 → ≈ 200, noise estimated from ~40 points (MAD, ±30 %).
    expect(Math.abs((result.signalToNoiseRms as number) / 200 - 1)).toBeLessThan(0.3);
  });
});
