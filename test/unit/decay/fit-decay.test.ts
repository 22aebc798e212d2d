// fitDecay on simulated Poisson decays of published lifetime standards (truth from REFERENCES.md, all
// "from memory" there), tail fits without an IRF, options, warnings and model selection.
import { describe, expect, it } from 'vitest';
import { createSeededRandom, fitDecay, gaussianIrf, samplePoisson, simulateDecay } from '../../../src/decay/index.js';
import { AnalysisFailed, ConfigInvalid, createDecay } from '../../../src/model/index.js';

describe('lifetime standards recovered within 3 standard errors', () => {
  it.each([
    // name, τ ns (REFERENCES.md, from memory), channels, window ns, IRF FWHM ns (laser diode ~200 ps; ~30 ps for the ps case), photons
    ['fluorescein, 0.1 M NaOH (≈ 4.1 ns, from memory)', 4.1, 1024, 50, 0.2, 1e5],
    ['rhodamine B, water (1.74 ns, from memory)', 1.74, 1024, 25, 0.2, 5e4],
    ['erythrosin B, water (≈ 89 ps, from memory)', 0.089, 1024, 2.5, 0.03, 5e4],
  ] as const)('%s', (_name, tauNs, channels, windowNs, fwhmNs, photons) => {
    const widthNs = windowNs / channels;
    const random = createSeededRandom(20261201);
    const irf = gaussianIrf(channels, widthNs, 0.1 * windowNs, fwhmNs);
    const decay = simulateDecay(
      {
        channels,
        channelWidthNs: widthNs,
        tauNs: [tauNs],
        photons,
        irf,
        backgroundPerChannel: 0.5,
        shiftNs: 0.3 * widthNs,
      },
      random,
    );
    const fit = fitDecay(decay);
    expect(fit.converged).toBe(true);
    expect(fit.model).toBe('reconvolution');
    const component = fit.components[0];
    expect(component?.tauNsStdErr).toBeGreaterThan(0);
    if (component?.tauNsStdErr === undefined) return;
    expect(Math.abs(component.tauNs - tauNs)).toBeLessThan(3 * component.tauNsStdErr);
    // The 68 % profile interval brackets the estimate and is about ±1 standard error wide (large counts).
    const interval = component.tauNsInterval;
    expect(interval?.lowNs).toBeLessThan(component.tauNs);
    expect(interval?.highNs).toBeGreaterThan(component.tauNs);
    const halfWidth = ((interval?.highNs ?? 0) - (interval?.lowNs ?? 0)) / 2;
    expect(halfWidth / component.tauNsStdErr).toBeGreaterThan(0.8);
    expect(halfWidth / component.tauNsStdErr).toBeLessThan(1.25);
    expect(fit.chi2Reduced).toBeGreaterThan(0.85);
    expect(fit.chi2Reduced).toBeLessThan(1.15);
    expect(fit.weightedResiduals.length).toBe(fit.rangeChannels[1] - fit.rangeChannels[0]);
    expect(JSON.parse(JSON.stringify(fit))).toEqual(fit);
  });
});

/** A ms phosphorescence-like histogram without IRF: channel integrals of A·exp(−t/τ) + b (∫ = Aτ(e^(−t₁/τ) − e^(−t₂/τ))). */
function phosphorescence(tauNs: number, seed: number): ReturnType<typeof createDecay> {
  const random = createSeededRandom(seed);
  const widthNs = 0.05e6;
  const channels = 400;
  const amplitudePerNs = 5000 / widthNs;
  const counts = Array.from({ length: channels }, (_unused, k) => {
    const t1 = k * widthNs;
    const mean = amplitudePerNs * tauNs * (Math.exp(-t1 / tauNs) - Math.exp(-(t1 + widthNs) / tauNs)) + 3;
    return samplePoisson(mean, random);
  });
  return createDecay({ timeNs: counts.map((_c, k) => k * widthNs), counts, channelWidthNs: widthNs });
}

describe('tail fit without an IRF', () => {
  it('recovers a 2.5 ms phosphorescence lifetime within 3 standard errors', () => {
    const fit = fitDecay(phosphorescence(2.5e6, 5));
    expect(fit.model).toBe('tail');
    expect(fit.converged).toBe(true);
    const component = fit.components[0];
    expect(Math.abs((component?.tauNs ?? 0) - 2.5e6)).toBeLessThan(3 * (component?.tauNsStdErr ?? 0));
    expect(fit.backgroundPerChannel).toBeGreaterThan(2);
    expect(fit.backgroundPerChannel).toBeLessThan(4);
    expect(fit.freeParameters).not.toContain('shiftNs');
  });
});

function biExponential(seed: number, photons = 2e5): ReturnType<typeof simulateDecay> {
  const channels = 1024;
  const widthNs = 50 / channels;
  return simulateDecay(
    {
      channels,
      channelWidthNs: widthNs,
      tauNs: [0.6, 3.5],
      intensityFractions: [0.35, 0.65],
      photons,
      irf: gaussianIrf(channels, widthNs, 3, 0.2),
      backgroundPerChannel: 1,
    },
    createSeededRandom(seed),
  );
}

describe('two components and model selection', () => {
  it('recovers both lifetimes and fractions of a bi-exponential decay', () => {
    const fit = fitDecay(biExponential(9), { components: 2, profileIntervals: false });
    expect(fit.converged).toBe(true);
    const [short, long] = fit.components;
    expect(Math.abs((short?.tauNs ?? 0) - 0.6)).toBeLessThan(3 * (short?.tauNsStdErr ?? 0));
    expect(Math.abs((long?.tauNs ?? 0) - 3.5)).toBeLessThan(3 * (long?.tauNsStdErr ?? 0));
    expect(short?.intensityFraction).toBeCloseTo(0.35, 1);
    expect((short?.amplitudeFraction ?? 0) + (long?.amplitudeFraction ?? 0)).toBeCloseTo(1, 12);
    // τ_int = Σaτ²/Σaτ and τ_amp = Σaτ/Σa by definition.
    const a1 = short?.amplitude ?? 0;
    const a2 = long?.amplitude ?? 0;
    const t1 = short?.tauNs ?? 0;
    const t2 = long?.tauNs ?? 0;
    expect(fit.tauMeanIntensityNs).toBeCloseTo((a1 * t1 * t1 + a2 * t2 * t2) / (a1 * t1 + a2 * t2), 10);
    expect(fit.tauMeanAmplitudeNs).toBeCloseTo((a1 * t1 + a2 * t2) / (a1 + a2), 10);
  });

  it("components: 'auto' picks 2 for a bi-exponential decay and 1 for a mono-exponential one, with reasons", () => {
    const bi = fitDecay(biExponential(10), { components: 'auto', profileIntervals: false });
    expect(bi.selection?.chosenComponents).toBe(2);
    expect(bi.components).toHaveLength(2);
    expect(bi.selection?.candidates).toHaveLength(3);
    expect(bi.selection?.reason).toMatch(/2 components chosen/);
    const channels = 512;
    const mono = simulateDecay(
      {
        channels,
        channelWidthNs: 25 / channels,
        tauNs: [2],
        photons: 5e4,
        irf: gaussianIrf(channels, 25 / channels, 2, 0.2),
        backgroundPerChannel: 0.5,
      },
      createSeededRandom(12),
    );
    const single = fitDecay(mono, { components: 'auto' });
    expect(single.selection?.chosenComponents).toBe(1);
    // Profile intervals are computed for the chosen model only.
    expect(single.components[0]?.tauNsInterval?.lowNs).toBeLessThan(2.1);
    expect(single.selection?.reason).toMatch(/1 component chosen/);
    // A mono-exponential fit of the bi-exponential data shows residual structure (runs test, Durbin–Watson).
    const wrong = fitDecay(biExponential(10), { components: 1, profileIntervals: false });
    expect(wrong.runsTest.z).toBeLessThan(-3);
    expect(wrong.warnings.some((w) => w.startsWith('residual structure'))).toBe(true);
  });
});

describe('periodic excitation', () => {
  it('models earlier pulses when τ is comparable to the period and recovers τ', () => {
    const channels = 1024;
    const periodNs = 25;
    const widthNs = periodNs / channels;
    const irf = gaussianIrf(channels, widthNs, 2, 0.15);
    const decay = simulateDecay(
      { channels, channelWidthNs: widthNs, tauNs: [9], photons: 2e5, irf, periodNs },
      createSeededRandom(4),
      1e9 / periodNs,
    );
    const fit = fitDecay(decay, { profileIntervals: false });
    const component = fit.components[0];
    expect(fit.converged).toBe(true);
    expect(Math.abs((component?.tauNs ?? 0) - 9)).toBeLessThan(3 * (component?.tauNsStdErr ?? 0));
    // Ignoring the earlier pulses (no repetition rate) fits far worse: the wrapped tail is not a constant.
    const naive = fitDecay(createDecay({ timeNs: decay.timeNs, counts: decay.counts, irfCounts: irf }), {
      profileIntervals: false,
    });
    expect(naive.deviance - fit.deviance).toBeGreaterThan(50);
  });
});

describe('options, errors and warnings', () => {
  const channels = 512;
  const widthNs = 25 / channels;
  const irf = gaussianIrf(channels, widthNs, 2, 0.2);
  const decay = simulateDecay(
    { channels, channelWidthNs: widthNs, tauNs: [3], photons: 3e4, irf, backgroundPerChannel: 1 },
    createSeededRandom(21),
  );

  it('holds fixed parameters and reports them', () => {
    const fit = fitDecay(decay, { fixed: { tau1Ns: 3.2 }, profileIntervals: false });
    expect(fit.components[0]?.tauNs).toBe(3.2);
    expect(fit.components[0]?.tauFixed).toBe(true);
    expect(fit.components[0]?.tauNsStdErr).toBeUndefined();
    expect(fit.freeParameters).not.toContain('tau1Ns');
  });

  it('respects bounds and warns when a lifetime ends on one', () => {
    const fit = fitDecay(decay, { bounds: { tau1Ns: [3.5, 10] }, profileIntervals: false });
    expect(fit.components[0]?.tauNs).toBe(3.5);
    expect(fit.warnings.some((w) => w.includes('tau1Ns is at its bound'))).toBe(true);
  });

  it('rejects invalid options with ConfigInvalid naming the option', () => {
    expect(() => fitDecay(decay, { estimator: 'chi' as never })).toThrow(ConfigInvalid);
    expect(() => fitDecay(decay, { rangeNs: [5, 1] })).toThrow(/rangeNs/);
    expect(() => fitDecay(decay, { fixed: { tau2Ns: 1 } })).toThrow(ConfigInvalid);
  });

  it('throws OUT_OF_RANGE for a range with too few channels', () => {
    try {
      fitDecay(decay, { rangeNs: [2, 2.1] });
      expect.unreachable();
    } catch (error) {
      expect(error).toBeInstanceOf(AnalysisFailed);
      expect((error as AnalysisFailed).code).toBe('OUT_OF_RANGE');
    }
  });

  it('uses every estimator and reports which', () => {
    for (const estimator of ['ml', 'lsq-neyman', 'lsq-pearson'] as const) {
      const fit = fitDecay(decay, { estimator, profileIntervals: false });
      expect(fit.estimator).toBe(estimator);
      expect(fit.converged).toBe(true);
      expect(Math.abs((fit.components[0]?.tauNs ?? 0) - 3)).toBeLessThan(4 * (fit.components[0]?.tauNsStdErr ?? 0));
    }
  });

  it('warns about low peak counts and lifetimes below a tenth of the IRF FWHM', () => {
    const faint = simulateDecay(
      { channels, channelWidthNs: widthNs, tauNs: [3], photons: 800, irf },
      createSeededRandom(2),
    );
    expect(fitDecay(faint, { profileIntervals: false }).warnings.some((w) => w.startsWith('peak counts are low'))).toBe(
      true,
    );
    // τ = 40 ps against a 0.5 ns IRF on 24 ps channels: resolvable in principle, but below FWHM/10.
    const fineChannels = 1024;
    const fineWidthNs = 25 / fineChannels;
    const broad = gaussianIrf(fineChannels, fineWidthNs, 3, 0.5);
    const fast = simulateDecay(
      { channels: fineChannels, channelWidthNs: fineWidthNs, tauNs: [0.04], photons: 1e5, irf: broad },
      createSeededRandom(3),
    );
    const fastFit = fitDecay(fast, { profileIntervals: false });
    expect(fastFit.converged).toBe(true);
    expect(fastFit.warnings.some((w) => w.includes('below a tenth of the IRF FWHM'))).toBe(true);
  });

  it('warns when the count rate exceeds 5 % of the repetition rate and applies Coates only when possible', () => {
    const busy = createDecay({
      timeNs: decay.timeNs,
      counts: decay.counts,
      irfCounts: irf,
      metadata: { repetitionRateHz: 1e6, countRatePerS: 1e5 },
    });
    const withoutCycles = fitDecay(busy, { pileUpCorrection: true, profileIntervals: false });
    expect(withoutCycles.warnings.some((w) => w.includes('exceeds 5 %'))).toBe(true);
    expect(withoutCycles.warnings.some((w) => w.includes('collection time or repetition rate is unknown'))).toBe(true);
    expect(withoutCycles.pileUpCorrected).toBe(false);
    const withCycles = fitDecay(
      createDecay({
        timeNs: decay.timeNs,
        counts: decay.counts,
        irfCounts: irf,
        metadata: { repetitionRateHz: 1e6, collectionTimeS: 1 },
      }),
      { pileUpCorrection: true, profileIntervals: false },
    );
    expect(withCycles.pileUpCorrected).toBe(true);
  });

  it('fits a scatter term when asked', () => {
    const mean = Float64Array.from(decay.counts);
    const random = createSeededRandom(8);
    const irfSum = irf.reduce((a, b) => a + b, 0);
    const scattered = mean.map((value, k) => value + samplePoisson((5000 * (irf[k] as number)) / irfSum, random));
    const fit = fitDecay(createDecay({ timeNs: decay.timeNs, counts: scattered, irfCounts: irf }), {
      scatter: true,
      profileIntervals: false,
    });
    expect(fit.scatterFraction).toBeGreaterThan(0.1);
    expect(fit.scatterFraction).toBeLessThan(0.2);
    expect(Math.abs((fit.components[0]?.tauNs ?? 0) - 3)).toBeLessThan(3 * (fit.components[0]?.tauNsStdErr ?? 0));
  });
});
