// Issue 17.1: light from earlier pulses. Truth is simulated independently of the periodic formula: the
// single-pulse reconvolution model (checked against quadrature in exponential-convolution.test.ts) is
// evaluated over 60 periods and folded onto one period (Σ over earlier pulses by brute force), plus a
// constant background, then Poisson-sampled with seeded generators. Bias is judged against the standard
// error of the mean over the seeds (sd/√n). Seeds: DRIFTLIGHT_LONG_SEEDS (default 50; each case < 2 s).
// Coverage: a ±1 SE interval (or the 68.27 % profile interval) must hold the truth in 68.27 % ± 2 binomial
// SE of COVERAGE_SEEDS fits (common practice for a Monte-Carlo coverage check; as in error-coverage.test.ts);
// COVERAGE_SEEDS = 200 (DRIFTLIGHT_LONG_TESTS=1: 1000, allowing 3 binomial SE as error-coverage.test.ts does).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { DECREMENT_TOLERANCE } from '../../../src/decay/levenberg-marquardt.js';
import {
  createSeededRandom,
  expectedDecayCounts,
  fitDecay,
  gaussianIrf,
  samplePoisson,
  type DecayFitResult,
  type FitDecayOptions,
} from '../../../src/decay/index.js';
import { createDecay } from '../../../src/model/index.js';

const SEEDS = Number(process.env.DRIFTLIGHT_LONG_SEEDS ?? 50);
const LONG = process.env['DRIFTLIGHT_LONG_TESTS'] === '1';
const COVERAGE_SEEDS = LONG ? 1000 : 200;
const COVERAGE = 0.6827;
const COVERAGE_TOLERANCE = (LONG ? 3 : 2) * Math.sqrt((COVERAGE * (1 - COVERAGE)) / COVERAGE_SEEDS);
const RATE_HZ = 80e6;
const PERIOD_NS = 1e9 / RATE_HZ;

/** Expected counts of a periodically excited decay, folded from 60 single pulses; window = one period (12.5 ns). */
function foldedDecay(
  tauNs: number,
  photonsPerPeriod: number,
  backgroundPerChannel: number,
  channels: number,
  periods: number,
): { irf: Float64Array; expected: Float64Array; widthNs: number } {
  const widthNs = (PERIOD_NS * 1) / channels;
  const irf = gaussianIrf(channels, widthNs, 1.5, 0.2);
  const longIrf = new Float64Array(channels * periods);
  longIrf.set(irf);
  const long = expectedDecayCounts({
    channels: channels * periods,
    channelWidthNs: widthNs,
    tauNs: [tauNs],
    photons: photonsPerPeriod,
    irf: longIrf,
  });
  const expected = new Float64Array(channels).fill(backgroundPerChannel);
  for (let k = 0; k < long.length; k++)
    expected[k % channels] = (expected[k % channels] as number) + (long[k] as number);
  return { irf, expected, widthNs };
}

interface PeriodicFit {
  tauNs: number;
  backgroundPerChannel: number;
}
interface PeriodicReference {
  tauNs: number;
  channelWidthNs: number;
  repetitionRateHz: number;
  irf: number[];
  seeds: { counts: number[]; bounded: PeriodicFit; free: PeriodicFit }[];
  exact: PeriodicFit & { seedIndex: number; shiftNs: number; tauPrecisionNs: number };
}

interface Series {
  meanNs: number;
  sdNs: number;
  fits: DecayFitResult[];
}

function fitSeries(
  source: { irf: Float64Array; expected: Float64Array; widthNs: number },
  metadata: { repetitionRateHz?: number },
  options: FitDecayOptions,
  firstSeed: number,
  seeds = SEEDS,
): Series {
  const fits: DecayFitResult[] = [];
  for (let seed = firstSeed; seed < firstSeed + seeds; seed++) {
    const random = createSeededRandom(seed);
    const counts = Float64Array.from(source.expected, (mean) => samplePoisson(mean, random));
    const decay = createDecay({
      timeNs: Float64Array.from({ length: counts.length }, (_unused, k) => k * source.widthNs),
      counts,
      channelWidthNs: source.widthNs,
      irfCounts: source.irf,
      metadata,
    });
    fits.push(fitDecay(decay, { profileIntervals: false, ...options }));
  }
  const taus = fits.map((fit) => fit.components[0]?.tauNs ?? Number.NaN);
  const meanNs = taus.reduce((a, b) => a + b, 0) / taus.length;
  const sdNs = Math.sqrt(taus.reduce((a, b) => a + (b - meanNs) ** 2, 0) / (taus.length - 1));
  return { meanNs, sdNs, fits };
}

const mean = (values: readonly number[]): number => values.reduce((a, b) => a + b, 0) / values.length;
const sd = (values: readonly number[]): number =>
  Math.sqrt(values.reduce((a, b) => a + (b - mean(values)) ** 2, 0) / (values.length - 1));
/** |mean − truth| in standard errors of the mean (sd/√n). */
const biasInSe = (values: readonly number[], truth: number): number =>
  (mean(values) - truth) / (sd(values) / Math.sqrt(values.length));
const tauOf = (fit: DecayFitResult): number => fit.components[0]?.tauNs ?? Number.NaN;
const tauErrorOf = (fit: DecayFitResult): number => fit.components[0]?.tauNsStdErr ?? Number.NaN;
/** The engine's former default, b ≥ 0 (an explicit bound, so the background may not go below 0). */
const BACKGROUND_AT_LEAST_ZERO: FitDecayOptions = { bounds: { backgroundPerChannel: [0, 1e12] } };

const warnsEarlierPulses = (fit: DecayFitResult): boolean =>
  fit.warnings.some((w) => w.startsWith('light from earlier pulses') && w.includes('--repetition-rate-mhz'));

describe('light from earlier pulses (80 MHz, window = one 12.5 ns period, 500 channels of 25 ps, IRF 200 ps)', () => {
  const dye4 = foldedDecay(4, 1e5, 2, 500, 60);
  const dye20 = foldedDecay(20, 1e5, 2, 500, 60);

  it('4 ns with the rate known: the periodic model is unbiased within 2 SE of the mean, no warning', () => {
    const known = fitSeries(dye4, { repetitionRateHz: RATE_HZ }, {}, 1);
    expect(Math.abs(known.meanNs - 4)).toBeLessThan((2 * known.sdNs) / Math.sqrt(SEEDS));
    expect(known.fits.every((fit) => fit.acceptable && !warnsEarlierPulses(fit))).toBe(true);
    // The same rate given as an option (CLI/config) instead of the file's metadata gives the same fit.
    const option = fitSeries(dye4, {}, { repetitionRateHz: RATE_HZ }, 1);
    expect(option.meanNs).toBeCloseTo(known.meanNs, 10);
  });

  it('4 ns with the rate unknown: biased low, and every fit says why, names the option and is not acceptable', () => {
    const unknown = fitSeries(dye4, {}, {}, 1);
    expect(unknown.meanNs).toBeLessThan(4 - (2 * unknown.sdNs) / Math.sqrt(SEEDS));
    expect(unknown.fits.every(warnsEarlierPulses)).toBe(true);
    expect(
      unknown.fits.every(
        (fit) => !fit.acceptable && fit.unacceptableReasons.some((r) => /repetition rate is unknown/.test(r)),
      ),
    ).toBe(true);
  });

  it('20 ns with the rate known and the background known (fixed at its true 2 counts/channel): unbiased within 2 SE of the mean', () => {
    const known = fitSeries(dye20, { repetitionRateHz: RATE_HZ }, { fixed: { backgroundPerChannel: 2 } }, 1);
    expect(Math.abs(known.meanNs - 20)).toBeLessThan((2 * known.sdNs) / Math.sqrt(SEEDS));
    expect(known.fits.every((fit) => !fit.warnings.some((w) => w.includes('0.4 × the pulse period')))).toBe(true);
  });

  it('20 ns with the rate known and a free background: b may go below 0, 1/τ is unbiased, the τ–background degeneracy is flagged', () => {
    const free = fitSeries(dye20, { repetitionRateHz: RATE_HZ }, {}, 1);
    // The "unbiased within 2 SE of the mean on 50 seeds", for the decay rate 1/τ (the ML estimate is the
    // same in either parameter; 1/τ is the one the data determine nearly linearly). For τ itself see below.
    expect(
      Math.abs(
        biasInSe(
          free.fits.map((fit) => 1 / tauOf(fit)),
          1 / 20,
        ),
      ),
    ).toBeLessThan(2);
    for (const fit of free.fits) {
      expect(fit.converged).toBe(true);
      expect(fit.fittedCounts.every((m) => m > 0)).toBe(true);
      // Warned with the remedy; not acceptable (QC does not judge it) because τ trades off against b and is poor.
      expect(fit.warnings.some((w) => w.includes('0.4 × the pulse period') && w.includes('--fix background'))).toBe(
        true,
      );
      expect(fit.acceptable).toBe(false);
      expect(
        fit.unacceptableReasons.some((r) =>
          /trades off against the background \(correlation -[01]\.\d{3}, above 0\.95\)/.test(r),
        ),
      ).toBe(true);
      // A negative background is reported as fitted, never clipped, and explained in a warning.
      const negative = fit.warnings.some((w) => w.startsWith('the fitted background is negative'));
      expect(negative).toBe(fit.backgroundPerChannel < 0);
    }
    // Without the bound b ≥ 0 no fit ends on 0 (the censoring is gone); about half go below 0 (true b = 2, SE ≈ 70).
    const below = free.fits.filter((fit) => fit.backgroundPerChannel < 0).length;
    expect(free.fits.every((fit) => fit.backgroundPerChannel !== 0)).toBe(true);
    expect(below).toBeGreaterThan(SEEDS / 4);
    expect(below).toBeLessThan((3 * SEEDS) / 4);
  });

  it('20 ns with the background held ≥ 0 (the former default, now an explicit bound): the bound censors τ low', () => {
    const bounded = fitSeries(dye20, { repetitionRateHz: RATE_HZ }, BACKGROUND_AT_LEAST_ZERO, 1);
    expect(bounded.meanNs).toBeLessThan(20 - (2 * bounded.sdNs) / Math.sqrt(SEEDS));
    expect(bounded.fits.filter((fit) => fit.backgroundPerChannel === 0).length).toBeGreaterThan(SEEDS / 4);
  });

  it(`coverage on ${COVERAGE_SEEDS} seeds: 4 ns ±1 SE not optimistic; 20 ns profile interval and 1/τ ± SE hold 68 %, τ ± SE over-covers (proof below)`, () => {
    // 4 ns (τ < 0.4·T): not in the degenerate regime, so the background keeps its bound b ≥ 0 (component-fit.ts,
    // relaxBackground); the ±1 SE interval is then widened for fits with b on 0 and covers a little more than
    // 68 % (measured 75.0 % on 200 seeds, 74.1 % on 1000): conservative, never optimistic.
    const dye4Fits = fitSeries(dye4, { repetitionRateHz: RATE_HZ }, {}, 1, COVERAGE_SEEDS).fits;
    const inside4 = dye4Fits.filter((fit) => Math.abs(tauOf(fit) - 4) <= tauErrorOf(fit)).length / COVERAGE_SEEDS;
    expect(inside4).toBeGreaterThan(COVERAGE - COVERAGE_TOLERANCE);
    expect(inside4).toBeLessThan(0.8);
    expect(dye4Fits.every((fit) => fit.backgroundPerChannel >= 0)).toBe(true);

    const fits = fitSeries(dye20, { repetitionRateHz: RATE_HZ }, { profileIntervals: true }, 1, COVERAGE_SEEDS).fits;
    // Profile interval (support plane, Δdeviance = 1): an open side (no root before the bound) counts as open.
    const profileInside = fits.filter((fit) => {
      const interval = fit.components[0]?.tauNsInterval;
      return (interval?.lowNs ?? 0) <= 20 && 20 <= (interval?.highNs ?? Number.POSITIVE_INFINITY);
    }).length;
    expect(Math.abs(profileInside / COVERAGE_SEEDS - COVERAGE)).toBeLessThan(COVERAGE_TOLERANCE);
    // The rate k = 1/τ with its delta-method error SE(τ)/τ²: a symmetric interval that holds.
    const rateInside = fits.filter(
      (fit) => Math.abs(1 / tauOf(fit) - 1 / 20) <= tauErrorOf(fit) / tauOf(fit) ** 2,
    ).length;
    expect(Math.abs(rateInside / COVERAGE_SEEDS - COVERAGE)).toBeLessThan(COVERAGE_TOLERANCE);
    // τ ± SE(τ) cannot be a 68 % interval here: with SE(τ) = τ̂²·SE(k) and SE(k) ≥ k/4 (measured: median
    // SE(τ)/τ = 0.28), every τ̂ > τ is inside (τ̂ − τ = x/(k·k̂) ≤ τ̂²·SE(k) ⇔ x(k − x) ≤ k·SE(k), and x(k − x) ≤
    // k²/4), so it covers more than half plus part of the other side: conservative, never optimistic.
    const relativeErrors = fits.map((fit) => tauErrorOf(fit) / tauOf(fit)).sort((a, b) => a - b);
    expect(relativeErrors[Math.floor(COVERAGE_SEEDS / 2)]).toBeGreaterThan(0.25);
    const tauInside = fits.filter((fit) => Math.abs(tauOf(fit) - 20) <= tauErrorOf(fit)).length / COVERAGE_SEEDS;
    expect(tauInside).toBeGreaterThan(COVERAGE + COVERAGE_TOLERANCE);
    // τ's mean is high by more than 2 SE of the mean (Jensen: E[1/k̂] > 1/k for an unbiased k̂ with a 26 %
    // spread; second order (SE/τ)² ≈ +7 %, measured +14.5 % at 200 seeds), while the rate is unbiased and the
    // median nearly so: the count of τ̂ above the truth is within 2 binomial SE of half (sign test). So the issue's "τ unbiased within
    // 2 SE of the mean" holds for the rate and the median, not for τ's mean; docs/decay.md.
    const taus = fits.map(tauOf);
    expect(biasInSe(taus, 20)).toBeGreaterThan(2);
    expect(
      Math.abs(
        biasInSe(
          taus.map((tau) => 1 / tau),
          1 / 20,
        ),
      ),
    ).toBeLessThan(2);
    const above = taus.filter((tau) => tau > 20).length;
    // (1000 seeds: 536 above, +2.3 binomial SE — the ML's small finite-sample skew; allowed 3 SE as above.)
    expect(Math.abs(above - COVERAGE_SEEDS / 2)).toBeLessThan((LONG ? 3 : 2) * Math.sqrt(COVERAGE_SEEDS / 4));
  });

  it("20 ns, free background: the engine's fit is scipy's Poisson ML fit of the same counts, seed by seed and on average", () => {
    // test/reference/decay/periodic_background.py: numpy-seeded counts, scipy Poisson ML with b ≥ 0 ('bounded')
    // and with b free as long as the model stays > 0 ('free'; FFT circular convolution on a 10× finer grid), and
    // ('--exact') seed 0 by a model exact for a channel-flat IRF: Gauss–Legendre integral of the periodic decay
    // over the channel pair, circular sum, linear-interpolated shift; Nelder–Mead from 6 starts.
    const reference = JSON.parse(
      readFileSync(new URL('../../reference/decay/periodic_background.json', import.meta.url), 'utf8'),
    ) as PeriodicReference;
    const source = { irf: Float64Array.from(reference.irf), widthNs: reference.channelWidthNs };
    const decayOf = (counts: readonly number[]): ReturnType<typeof createDecay> =>
      createDecay({
        timeNs: Float64Array.from(counts, (_unused, k) => k * source.widthNs),
        counts: Float64Array.from(counts),
        channelWidthNs: source.widthNs,
        irfCounts: source.irf,
        metadata: { repetitionRateHz: reference.repetitionRateHz },
      });
    // One seed, same model (flat IRF, whole window): τ, b and the shift agree to the optimisers' precision —
    // the engine stops when the Newton decrement is < 1e-7, i.e. within √1e-7 standard errors of the optimum.
    const seed = reference.seeds[reference.exact.seedIndex];
    if (seed === undefined) throw new Error('periodic_background.json has no exact seed');
    const exact = fitDecay(decayOf(seed.counts), {
      irfWithinChannel: 'flat',
      rangeNs: [0, (seed.counts.length - 1) * source.widthNs],
      profileIntervals: false,
    });
    const tolerance = (error: number | undefined): number => Math.sqrt(DECREMENT_TOLERANCE) * (error ?? 0);
    expect(exact.converged).toBe(true);
    expect(Math.abs(tauOf(exact) - reference.exact.tauNs)).toBeLessThan(
      tolerance(tauErrorOf(exact)) + reference.exact.tauPrecisionNs,
    );
    expect(Math.abs(exact.backgroundPerChannel - reference.exact.backgroundPerChannel)).toBeLessThan(
      tolerance(exact.backgroundPerChannelStdErr),
    );
    expect(Math.abs(exact.shiftNs - reference.exact.shiftNs)).toBeLessThan(1e-4 * source.widthNs);
    expect(exact.backgroundPerChannel).toBeLessThan(0);

    const engine = (options: FitDecayOptions): DecayFitResult[] =>
      reference.seeds.map((entry) => fitDecay(decayOf(entry.counts), { profileIntervals: false, ...options }));
    for (const [kind, options] of [
      ['bounded', BACKGROUND_AT_LEAST_ZERO],
      ['free', {}],
    ] as const) {
      const scipyTaus = reference.seeds.map((entry) => entry[kind].tauNs);
      const engineFits = engine(options);
      const engineTaus = engineFits.map(tauOf);
      // Same counts, same estimator (the engine's default IRF treatment and range): the means agree within one
      // standard error of the mean.
      expect(Math.abs(mean(engineTaus) - mean(scipyTaus))).toBeLessThan(sd(scipyTaus) / Math.sqrt(scipyTaus.length));
      // Censoring at b = 0: about as many fits end on the bound (or below 0 when free). Single seeds differ by a
      // few ns here, because the engine's default range starts at the IRF rise and its IRF is second-order.
      const atOrBelowZero = (values: readonly number[]): number => values.filter((b) => b <= 1e-6).length;
      expect(
        Math.abs(
          atOrBelowZero(engineFits.map((fit) => fit.backgroundPerChannel)) -
            atOrBelowZero(reference.seeds.map((entry) => entry[kind].backgroundPerChannel)),
        ),
      ).toBeLessThanOrEqual(5);
    }
    // scipy's own figures: the bounded mean is low by more than 2 SE of the mean (−7.6 %, −5.3 SE); freeing b
    // removes that bias (+2.7 %, +0.8 SE on these 50 seeds) at the cost of a spread several times wider.
    const bounded = reference.seeds.map((entry) => entry.bounded.tauNs);
    const unbounded = reference.seeds.map((entry) => entry.free.tauNs);
    expect(biasInSe(bounded, reference.tauNs)).toBeLessThan(-2);
    expect(Math.abs(biasInSe(unbounded, reference.tauNs))).toBeLessThan(2);
    expect(sd(unbounded)).toBeGreaterThan(2 * sd(bounded));
  });

  it('ordinary periodic fits keep b ≥ 0: 1.5 ns, 3000 photons, no background (empty channels) all converge', () => {
    // Allowing b < 0 here would put the optimum on the positivity limit (m → 0 in an empty channel), where 26 of
    // 100 such fits stalled; only τ > 0.4 × the period is refitted without the bound (component-fit.ts).
    const fits = fitSeries(foldedDecay(1.5, 3000, 0, 500, 60), { repetitionRateHz: RATE_HZ }, {}, 1, 100).fits;
    expect(fits.every((fit) => fit.converged && fit.backgroundPerChannel >= 0)).toBe(true);
    expect(fits.every((fit) => !fit.warnings.some((w) => w.startsWith('the fitted background is negative')))).toBe(
      true,
    );
  });

  it('20 ns with the rate unknown: warned and not acceptable', () => {
    const unknown = fitSeries(dye20, {}, {}, 1);
    expect(unknown.fits.every((fit) => warnsEarlierPulses(fit) && !fit.acceptable)).toBe(true);
  });

  it('no earlier-pulse warning when the decay dies out inside the window (4 ns in 51.2 ns, rate unknown): false-positive rate < 5 %', () => {
    const channels = 1024;
    const widthNs = 0.05;
    const irf = gaussianIrf(channels, widthNs, 1.5, 0.2);
    const expected = expectedDecayCounts({
      channels,
      channelWidthNs: widthNs,
      tauNs: [4],
      photons: 1e5,
      irf,
      backgroundPerChannel: 2,
    });
    const { fits } = fitSeries({ irf, expected, widthNs }, {}, {}, 1000);
    const warned = fits.filter(warnsEarlierPulses).length;
    expect(warned / fits.length).toBeLessThan(0.05);
  });
});
