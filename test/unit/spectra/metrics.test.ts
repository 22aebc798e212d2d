// Spectrum metrics on Gaussian bands with known peak, width, area and centroid; the noise estimate on known noise.
import { describe, expect, it } from 'vitest';
import { integrateIntensity, integralWithUncertainty, spectrumMetrics } from '../../../src/spectra/metrics.js';
import { stokesShift } from '../../../src/spectra/stokes-shift.js';
import { axisNm, gaussianBand, makeSpectrum } from './synthetic.js';

describe('spectrumMetrics', () => {
  it('finds peak, FWHM = 2√(2 ln 2)·σ, area and centroid of a Gaussian (closed form)', () => {
    const axis = axisNm(400, 600, 2);
    const metrics = spectrumMetrics(makeSpectrum('emission', axis, gaussianBand(axis, 1000, 497.3, 15)));
    expect(metrics.peakWavelengthNm).toBeCloseTo(497.3, 1); // parabola vertex between samples
    expect(metrics.fwhmNm as number).toBeCloseTo(2 * Math.sqrt(2 * Math.LN2) * 15, 0); // 35.32 nm
    expect(metrics.integratedIntensity).toBeCloseTo(1000, 3);
    expect(metrics.centroidNm).toBeCloseTo(497.3, 6);
  });

  it('integrates on a non-uniform axis over a window with interpolated edges (trapezoid rule)', () => {
    // y = x on [0, 10] with uneven points: the trapezoid rule is exact for a line; ∫_2.5^7.5 x dx = 25.
    const spectrum = makeSpectrum('emission', [0, 1, 3, 4, 8, 10], [0, 1, 3, 4, 8, 10]);
    expect(integrateIntensity(spectrum, [2.5, 7.5])).toBeCloseTo(25, 12);
    expect(integrateIntensity(spectrum)).toBeCloseTo(50, 12);
  });

  it('estimates white-noise σ from second differences within 10 % (800 points) and propagates it to the integral', () => {
    const axis = axisNm(400, 799.5, 0.5);
    const spectrum = makeSpectrum('emission', axis, gaussianBand(axis, 50000, 550, 30), { noiseSigma: 5, seed: 42 });
    const metrics = spectrumMetrics(spectrum);
    expect(Math.abs((metrics.noiseSigma as number) / 5 - 1)).toBeLessThan(0.1);
    const { standardUncertainty } = integralWithUncertainty(spectrum);
    // Trapezoid weights h (ends h/2): u = σ·h·√(n − 1.5) by hand.
    expect(
      (standardUncertainty as number) / ((metrics.noiseSigma as number) * 0.5 * Math.sqrt(axis.length - 1.5)),
    ).toBeCloseTo(1, 10);
  });

  it('computes the Stokes shift in cm⁻¹ from the two maxima (IUPAC Gold Book definition)', () => {
    const axis = axisNm(300, 700, 1);
    const absorbance = makeSpectrum('absorbance', axis, gaussianBand(axis, 1, 490, 12));
    const emission = makeSpectrum('emission', axis, gaussianBand(axis, 1, 515, 15));
    // 1e7/490 − 1e7/515 = 20408.16 − 19417.48 = 990.7 cm⁻¹ by hand.
    expect(stokesShift(absorbance, emission).stokesShiftPerCm).toBeCloseTo(990.7, 0);
  });
});
