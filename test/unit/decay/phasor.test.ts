// Phasor coordinates as a fit-free cross-check: for a single exponential the IRF-calibrated phasor is
// g + is = 1/(1 + iωτ), so τφ = τm = τ; for two exponentials τφ < τm (textbook frequency-domain
// relations, Lakowicz, Principles of Fluorescence Spectroscopy, ch. 5; phasor form Digman et al. 2008).
import { describe, expect, it } from 'vitest';
import {
  createSeededRandom,
  expectedDecayCounts,
  gaussianIrf,
  phasorOf,
  simulateDecay,
} from '../../../src/decay/index.js';
import { ConfigInvalid, createDecay } from '../../../src/model/index.js';

describe('phasorOf', () => {
  const channels = 1024;
  const periodNs = 50;
  const widthNs = periodNs / channels;
  const irf = gaussianIrf(channels, widthNs, 3, 0.3);

  it('puts a noise-free single exponential on the universal circle with τφ = τm = τ', () => {
    const counts = expectedDecayCounts({
      channels,
      channelWidthNs: widthNs,
      tauNs: [3.2],
      photons: 1e6,
      irf,
      periodNs,
    });
    const decay = createDecay({
      timeNs: counts.map((_c, k) => k * widthNs),
      counts,
      irfCounts: irf,
      metadata: { repetitionRateHz: 1e9 / periodNs },
    });
    const phasor = phasorOf(decay);
    const omega = (2 * Math.PI) / periodNs;
    // 1/(1 + iωτ): g = 1/(1 + ω²τ²), s = ωτ/(1 + ω²τ²)
    expect(phasor.g).toBeCloseTo(1 / (1 + (omega * 3.2) ** 2), 4);
    expect(phasor.s).toBeCloseTo((omega * 3.2) / (1 + (omega * 3.2) ** 2), 4);
    expect(phasor.tauPhaseNs).toBeCloseTo(3.2, 2);
    expect(phasor.tauModulationNs).toBeCloseTo(3.2, 2);
    expect(phasor.calibrated).toBe(true);
    expect(phasor.frequencyHz).toBeCloseTo(2e7, 3);
  });

  it('gives τφ < τm for a bi-exponential and agrees with the mono case at the second harmonic', () => {
    const decay = simulateDecay(
      { channels, channelWidthNs: widthNs, tauNs: [0.8, 5], photons: 2e5, irf, periodNs },
      createSeededRandom(5),
      1e9 / periodNs,
    );
    const first = phasorOf(decay);
    expect(first.tauPhaseNs).toBeLessThan(first.tauModulationNs);
    const mono = simulateDecay(
      { channels, channelWidthNs: widthNs, tauNs: [2], photons: 2e5, irf, periodNs },
      createSeededRandom(6),
      1e9 / periodNs,
    );
    const second = phasorOf(mono, { harmonic: 2 });
    expect(second.harmonic).toBe(2);
    expect(Math.abs(second.tauPhaseNs - 2)).toBeLessThan(0.05);
    expect(Math.abs(second.tauModulationNs - 2)).toBeLessThan(0.05);
  });

  it('is uncalibrated without an IRF', () => {
    const counts = expectedDecayCounts({ channels, channelWidthNs: widthNs, tauNs: [3], photons: 1e5, irf });
    const phasor = phasorOf(createDecay({ timeNs: counts.map((_c, k) => k * widthNs), counts }));
    expect(phasor.calibrated).toBe(false);
    expect(phasor.modulation).toBeLessThan(1);
    expect(() =>
      phasorOf(createDecay({ timeNs: counts.map((_c, k) => k * widthNs), counts }), { harmonic: 0 }),
    ).toThrow(ConfigInvalid);
  });
});
