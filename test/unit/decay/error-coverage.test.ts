// Coverage of the lifetime standard errors and profile intervals on seeded simulations with known truth
// (issue 17 item 3). A ±1 SE interval must contain the true τ in 68.27 % of fits; with S seeds the
// binomial SE of that rate is √(0.6827·0.3173/S), and the test accepts 68.27 % ± 2 binomial SE
// (common practice for a Monte-Carlo coverage check). The data come from the reconvolution model with the
// true (noise-free) channel-integrated Gaussian IRF; the fit gets a Poisson-sampled IRF of the stated
// counts, so IRF noise is part of the error. SEEDS = 200 (DRIFTLIGHT_LONG_TESTS=1: 1000; ≈ 10 s and 35 s).
import { describe, expect, it } from 'vitest';
import { createDecay } from '../../../src/model/decay.js';
import { fitDecay } from '../../../src/decay/fit-decay.js';
import { createSeededRandom, samplePoisson } from '../../../src/decay/random.js';
import { expectedDecayCounts, gaussianIrf } from '../../../src/decay/simulate.js';

const LONG = process.env['DRIFTLIGHT_LONG_TESTS'] === '1';
const SEEDS = LONG ? 1000 : 200;
const COVERAGE = 0.6827;
// 2 binomial SE at 200 seeds (the issue's criterion); the 1000-seed run allows 3, because there the small
// finite-sample effects (mono 2 ns: τ̂ 0.09 SE high, z SD 1.03 over 1000 seeds) become resolvable.
const TOLERANCE = (LONG ? 3 : 2) * Math.sqrt((COVERAGE * (1 - COVERAGE)) / SEEDS);

interface CoverageCase {
  readonly name: string;
  readonly channels: number;
  readonly channelWidthNs: number;
  readonly tauNs: readonly number[];
  readonly intensityFractions?: readonly number[];
  readonly photons: number;
  readonly backgroundPerChannel: number;
  readonly irfCounts: number;
  readonly irfFwhmNs: number;
}

export const COVERAGE_CASES: readonly CoverageCase[] = [
  {
    name: 'mono 2 ns',
    channels: 256,
    channelWidthNs: 0.05,
    tauNs: [2],
    photons: 1e5,
    backgroundPerChannel: 2,
    irfCounts: 1e5,
    irfFwhmNs: 0.2,
  },
  {
    name: 'bi 0.5 + 3 ns',
    channels: 256,
    channelWidthNs: 0.08,
    tauNs: [0.5, 3],
    intensityFractions: [0.4, 0.6],
    photons: 2e5,
    backgroundPerChannel: 1,
    irfCounts: 1e5,
    irfFwhmNs: 0.2,
  },
  {
    name: 'low-IRF-count mono 1 ns (IRF 1e4 counts)',
    channels: 200,
    channelWidthNs: 0.05,
    tauNs: [1],
    photons: 2e5,
    backgroundPerChannel: 2,
    irfCounts: 1e4,
    irfFwhmNs: 0.3,
  },
  {
    name: 'background at its bound (true 0), mono 2 ns, 2e3 photons',
    channels: 256,
    channelWidthNs: 0.05,
    tauNs: [2],
    photons: 2e3,
    backgroundPerChannel: 0,
    irfCounts: 1e5,
    irfFwhmNs: 0.2,
  },
];

interface CoverageTally {
  covered: number[];
  fits: number;
  notAvailable: number;
  notAvailableWithoutReason: number;
}

function runCase(c: CoverageCase, seeds: number, profile: boolean): CoverageTally {
  const random = createSeededRandom(17_3);
  const trueIrf = gaussianIrf(c.channels, c.channelWidthNs, 1.0 + 0.3 * c.channelWidthNs, c.irfFwhmNs);
  const expected = expectedDecayCounts({
    channels: c.channels,
    channelWidthNs: c.channelWidthNs,
    tauNs: c.tauNs,
    photons: c.photons,
    irf: trueIrf,
    backgroundPerChannel: c.backgroundPerChannel,
    ...(c.intensityFractions === undefined ? {} : { intensityFractions: c.intensityFractions }),
  });
  const tally: CoverageTally = {
    covered: c.tauNs.map(() => 0),
    fits: 0,
    notAvailable: 0,
    notAvailableWithoutReason: 0,
  };
  for (let seed = 0; seed < seeds; seed++) {
    const irf = Float64Array.from(trueIrf, (g) => samplePoisson(g * c.irfCounts, random));
    const counts = Float64Array.from(expected, (mean) => samplePoisson(mean, random));
    const decay = createDecay({
      timeNs: Float64Array.from({ length: c.channels }, (_unused, k) => k * c.channelWidthNs),
      counts,
      channelWidthNs: c.channelWidthNs,
      irfCounts: irf,
      metadata: {},
    });
    const fit = fitDecay(decay, { components: c.tauNs.length as 1 | 2, profileIntervals: profile });
    tally.fits++;
    fit.components.forEach((component, index) => {
      const truth = c.tauNs[index] as number;
      const se = component.tauNsStdErr;
      if (se !== undefined && Math.abs(component.tauNs - truth) <= se)
        tally.covered[index] = (tally.covered[index] as number) + 1;
      if (profile) {
        const interval = component.tauNsInterval;
        const missing = interval === undefined || interval.lowNs === undefined || interval.highNs === undefined;
        if (missing) {
          tally.notAvailable++;
          const explained =
            interval !== undefined &&
            (interval.lowNs !== undefined || interval.lowReason !== undefined) &&
            (interval.highNs !== undefined || interval.highReason !== undefined);
          if (!explained) tally.notAvailableWithoutReason++;
        }
      }
    });
  }
  return tally;
}

describe(`±1 SE coverage of τ on ${SEEDS} seeded fits per case (68.27 % ± ${(100 * TOLERANCE).toFixed(1)} %)`, () => {
  it.each(COVERAGE_CASES.map((c) => [c.name, c] as const))(
    '%s',
    (_name, c) => {
      const started = performance.now();
      const tally = runCase(c, SEEDS, false);
      const rates = tally.covered.map((covered) => covered / tally.fits);
      console.info(
        `COVERAGE ${c.name}: ${rates.map((r) => `${(100 * r).toFixed(1)} %`).join(', ')} of ${tally.fits} (${((performance.now() - started) / 1000).toFixed(1)} s)`,
      );
      for (const rate of rates) expect(Math.abs(rate - COVERAGE)).toBeLessThanOrEqual(TOLERANCE);
    },
    300_000,
  );
});

describe('profile intervals are computed or say why not', () => {
  it.each(COVERAGE_CASES.slice(0, 3).map((c) => [c.name, c] as const))(
    '%s (40 seeds)',
    (_name, c) => {
      const tally = runCase(c, LONG ? 200 : 40, true);
      console.info(
        `PROFILE ${c.name}: n/a ${tally.notAvailable} of ${tally.fits * c.tauNs.length}, without a reason ${tally.notAvailableWithoutReason}`,
      );
      expect(tally.notAvailableWithoutReason).toBe(0);
    },
    300_000,
  );
});
