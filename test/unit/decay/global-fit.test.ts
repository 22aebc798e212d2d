// Global analysis: several decays with shared lifetimes and their own amplitudes (e.g. emission
// wavelengths across a two-component spectrum), checked against the simulation truth.
import { describe, expect, it } from 'vitest';
import { createSeededRandom, fitDecay, gaussianIrf, globalFit, simulateDecay } from '../../../src/decay/index.js';
import { ConfigInvalid } from '../../../src/model/index.js';

describe('globalFit', () => {
  const channels = 512;
  const widthNs = 25 / channels;
  const irf = gaussianIrf(channels, widthNs, 2, 0.2);
  const random = createSeededRandom(31);
  const fractions = [0.2, 0.5, 0.8];
  const decays = fractions.map((fraction) =>
    simulateDecay(
      {
        channels,
        channelWidthNs: widthNs,
        tauNs: [0.9, 4.2],
        intensityFractions: [fraction, 1 - fraction],
        photons: 3e4,
        irf,
        backgroundPerChannel: 0.5,
      },
      random,
    ),
  );

  it('recovers shared lifetimes within 3 standard errors and per-decay fractions', () => {
    const result = globalFit(decays, { components: 2 });
    expect(result.converged).toBe(true);
    expect(result.linked).toEqual(['tau1Ns', 'tau2Ns']);
    const [short, long] = [...result.tauNs].sort((a, b) => a - b);
    const errors = result.tauNsStdErr;
    const shortIndex = result.tauNs.indexOf(short ?? Number.NaN);
    const longIndex = result.tauNs.indexOf(long ?? Number.NaN);
    expect(Math.abs((short ?? 0) - 0.9)).toBeLessThan(3 * (errors[shortIndex] ?? 0));
    expect(Math.abs((long ?? 0) - 4.2)).toBeLessThan(3 * (errors[longIndex] ?? 0));
    result.decays.forEach((decay, d) => {
      const fraction = decay.components[shortIndex]?.intensityFraction ?? 0;
      expect(Math.abs(fraction - (fractions[d] ?? 0))).toBeLessThan(0.05);
      expect(decay.components.map((c) => c.tauNs)).toEqual(result.tauNs);
    });
    expect(result.freeParameters.filter((name) => name.startsWith('tau'))).toHaveLength(2);
    expect(result.chi2Reduced).toBeGreaterThan(0.85);
    expect(result.chi2Reduced).toBeLessThan(1.15);
  });

  it('gives a shared lifetime a smaller standard error than a single-decay fit', () => {
    const joint = globalFit(decays, { components: 2 });
    const middle = decays[1];
    if (middle === undefined) throw new Error('three decays were simulated');
    const single = fitDecay(middle, { components: 2, profileIntervals: false });
    const jointLong = Math.max(...joint.tauNs);
    const jointError = joint.tauNsStdErr[joint.tauNs.indexOf(jointLong)] ?? Number.NaN;
    expect(jointError).toBeLessThan(single.components[1]?.tauNsStdErr ?? 0);
  });

  it('rejects components: auto', () => {
    expect(() => globalFit(decays, { components: 'auto' })).toThrow(ConfigInvalid);
  });
});
