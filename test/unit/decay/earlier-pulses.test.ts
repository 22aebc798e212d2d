// Issue 17.1: light from earlier pulses. Truth is simulated independently of the periodic formula: the
// single-pulse reconvolution model (checked against quadrature in exponential-convolution.test.ts) is
// evaluated over 60 periods and folded onto one period (Σ over earlier pulses by brute force), plus a
// constant background, then Poisson-sampled with seeded generators. Bias is judged against the standard
// error of the mean over the seeds (sd/√n). Seeds: DRIFTLIGHT_LONG_SEEDS (default 50; each case < 2 s).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
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
): Series {
  const fits: DecayFitResult[] = [];
  for (let seed = firstSeed; seed < firstSeed + SEEDS; seed++) {
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

  it('20 ns with the rate known and a free background: τ trades off against the background, and every fit warns', () => {
    const free = fitSeries(dye20, { repetitionRateHz: RATE_HZ }, {}, 1);
    expect(
      free.fits.every((fit) =>
        fit.warnings.some((w) => w.includes('0.4 × the pulse period') && w.includes('--fix background')),
      ),
    ).toBe(true);
    // Measured (docs/decay.md table): the bound b ≥ 0 censors the trade-off, so the mean sits below the truth.
    expect(free.meanNs).toBeLessThan(20 - (2 * free.sdNs) / Math.sqrt(SEEDS));
  });

  it('20 ns, background allowed below 0 (model kept > 0 by the Poisson deviance): 1/τ unbiased, τ several times more spread', () => {
    const bounded = fitSeries(dye20, { repetitionRateHz: RATE_HZ }, {}, 1);
    const free = fitSeries(dye20, { repetitionRateHz: RATE_HZ }, { bounds: { backgroundPerChannel: [-1e9, 1e9] } }, 1);
    const rates = free.fits.map((fit) => 1 / (fit.components[0]?.tauNs ?? Number.NaN));
    const meanRate = rates.reduce((a, b) => a + b, 0) / rates.length;
    const sdRate = Math.sqrt(rates.reduce((a, b) => a + (b - meanRate) ** 2, 0) / (rates.length - 1));
    expect(Math.abs(meanRate - 1 / 20)).toBeLessThan((2 * sdRate) / Math.sqrt(SEEDS));
    expect(free.fits.every((fit) => fit.converged && fit.fittedCounts.every((m) => m > 0))).toBe(true);
    expect(free.sdNs).toBeGreaterThan(4 * bounded.sdNs);
  });

  it("20 ns, free background: the bias is the estimator's, not the engine's (an independent scipy ML fit of the same counts agrees)", () => {
    // test/reference/decay/periodic_background.py: numpy-seeded counts, FFT circular-convolution model, scipy
    // Poisson ML with b ≥ 0 ('bounded', the engine's default) and with b free as long as the model stays > 0.
    const reference = JSON.parse(
      readFileSync(new URL('../../reference/decay/periodic_background.json', import.meta.url), 'utf8'),
    ) as PeriodicReference;
    const source = { irf: Float64Array.from(reference.irf), widthNs: reference.channelWidthNs };
    const engine = (options: FitDecayOptions): DecayFitResult[] =>
      reference.seeds.map((seed) =>
        fitDecay(
          createDecay({
            timeNs: Float64Array.from(seed.counts, (_unused, k) => k * source.widthNs),
            counts: Float64Array.from(seed.counts),
            channelWidthNs: source.widthNs,
            irfCounts: source.irf,
            metadata: { repetitionRateHz: reference.repetitionRateHz },
          }),
          { profileIntervals: false, ...options },
        ),
      );
    const mean = (values: readonly number[]): number => values.reduce((a, b) => a + b, 0) / values.length;
    const sd = (values: readonly number[]): number =>
      Math.sqrt(values.reduce((a, b) => a + (b - mean(values)) ** 2, 0) / (values.length - 1));
    for (const [kind, options] of [
      ['bounded', {}],
      ['free', { bounds: { backgroundPerChannel: [-1e9, 1e9] } }],
    ] as const) {
      const scipyTaus = reference.seeds.map((seed) => seed[kind].tauNs);
      const engineFits = engine(options);
      const engineTaus = engineFits.map((fit) => fit.components[0]?.tauNs ?? Number.NaN);
      // Same counts, same estimator: the two means agree within one standard error of the mean.
      expect(Math.abs(mean(engineTaus) - mean(scipyTaus))).toBeLessThan(sd(scipyTaus) / Math.sqrt(scipyTaus.length));
      // Censoring at b = 0: about as many fits end on the bound (or below 0 when free). Single seeds differ by
      // a few ns: along the τ–background ridge the likelihood is so flat that the two IRF treatments move them.
      const atOrBelowZero = (values: readonly number[]): number => values.filter((b) => b <= 1e-6).length;
      expect(
        Math.abs(
          atOrBelowZero(engineFits.map((fit) => fit.backgroundPerChannel)) -
            atOrBelowZero(reference.seeds.map((seed) => seed[kind].backgroundPerChannel)),
        ),
      ).toBeLessThanOrEqual(5);
    }
    // The bounded mean is low by more than 2 SE of the mean (scipy: −7.6 %, −5.3 SE); freeing b removes that bias
    // (+2.7 %, +0.8 SE) at the cost of a spread several times wider: a degeneracy, not a defect of the fit.
    const bounded = reference.seeds.map((seed) => seed.bounded.tauNs);
    const unbounded = reference.seeds.map((seed) => seed.free.tauNs);
    expect(mean(bounded)).toBeLessThan(reference.tauNs - (2 * sd(bounded)) / Math.sqrt(bounded.length));
    expect(Math.abs(mean(unbounded) - reference.tauNs)).toBeLessThan((2 * sd(unbounded)) / Math.sqrt(unbounded.length));
    expect(sd(unbounded)).toBeGreaterThan(2 * sd(bounded));
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
