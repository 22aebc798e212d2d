// Issue 17.1: light from earlier pulses. Truth is simulated independently of the periodic formula: the
// single-pulse reconvolution model (checked against quadrature in exponential-convolution.test.ts) is
// evaluated over 60 periods and folded onto one period (Σ over earlier pulses by brute force), plus a
// constant background, then Poisson-sampled with seeded generators. Bias is judged against the standard
// error of the mean over the seeds (sd/√n). Seeds: DRIFTLIGHT_LONG_SEEDS (default 50; each case < 2 s).
import { describe, expect, it } from 'vitest';
import { createSeededRandom, expectedDecayCounts, fitDecay, gaussianIrf, samplePoisson, type DecayFitResult, type FitDecayOptions } from '../../../src/decay/index.js';
import { createDecay } from '../../../src/model/index.js';

const SEEDS = Number(process.env.DRIFTLIGHT_LONG_SEEDS ?? 50);
const RATE_HZ = 80e6;
const PERIOD_NS = 1e9 / RATE_HZ;

/** Expected counts of a periodically excited decay, folded from 60 single pulses; window = one period (12.5 ns). */
function foldedDecay(tauNs: number, photonsPerPeriod: number, backgroundPerChannel: number, channels: number, periods: number): { irf: Float64Array; expected: Float64Array; widthNs: number } {
  const widthNs = (PERIOD_NS * 1) / channels;
  const irf = gaussianIrf(channels, widthNs, 1.5, 0.2);
  const longIrf = new Float64Array(channels * periods);
  longIrf.set(irf);
  const long = expectedDecayCounts({ channels: channels * periods, channelWidthNs: widthNs, tauNs: [tauNs], photons: photonsPerPeriod, irf: longIrf });
  const expected = new Float64Array(channels).fill(backgroundPerChannel);
  for (let k = 0; k < long.length; k++) expected[k % channels] = (expected[k % channels] as number) + (long[k] as number);
  return { irf, expected, widthNs };
}

interface Series { meanNs: number; sdNs: number; fits: DecayFitResult[] }

function fitSeries(
  source: { irf: Float64Array; expected: Float64Array; widthNs: number }, metadata: { repetitionRateHz?: number }, options: FitDecayOptions, firstSeed: number,
): Series {
  const fits: DecayFitResult[] = [];
  for (let seed = firstSeed; seed < firstSeed + SEEDS; seed++) {
    const random = createSeededRandom(seed);
    const counts = Float64Array.from(source.expected, (mean) => samplePoisson(mean, random));
    const decay = createDecay({
      timeNs: Float64Array.from({ length: counts.length }, (_unused, k) => k * source.widthNs), counts, channelWidthNs: source.widthNs, irfCounts: source.irf, metadata,
    });
    fits.push(fitDecay(decay, { profileIntervals: false, ...options }));
  }
  const taus = fits.map((fit) => fit.components[0]?.tauNs ?? Number.NaN);
  const meanNs = taus.reduce((a, b) => a + b, 0) / taus.length;
  const sdNs = Math.sqrt(taus.reduce((a, b) => a + (b - meanNs) ** 2, 0) / (taus.length - 1));
  return { meanNs, sdNs, fits };
}

const warnsEarlierPulses = (fit: DecayFitResult): boolean => fit.warnings.some((w) => w.startsWith('light from earlier pulses') && w.includes('--repetition-rate-mhz'));

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
    expect(unknown.fits.every((fit) => !fit.acceptable && fit.unacceptableReasons.some((r) => /repetition rate is unknown/.test(r)))).toBe(true);
  });

  it('20 ns with the rate known and the background known (fixed at its true 2 counts/channel): unbiased within 2 SE of the mean', () => {
    const known = fitSeries(dye20, { repetitionRateHz: RATE_HZ }, { fixed: { backgroundPerChannel: 2 } }, 1);
    expect(Math.abs(known.meanNs - 20)).toBeLessThan((2 * known.sdNs) / Math.sqrt(SEEDS));
    expect(known.fits.every((fit) => !fit.warnings.some((w) => w.includes('0.4 × the pulse period')))).toBe(true);
  });

  it('20 ns with the rate known and a free background: τ trades off against the background, and every fit warns', () => {
    const free = fitSeries(dye20, { repetitionRateHz: RATE_HZ }, {}, 1);
    expect(free.fits.every((fit) => fit.warnings.some((w) => w.includes('0.4 × the pulse period') && w.includes('--fix background')))).toBe(true);
    // Measured (not a requirement): the mean sits below the truth; see docs/decay.md for the table.
    expect(free.meanNs).toBeLessThan(20);
  });

  it('20 ns with the rate unknown: warned and not acceptable', () => {
    const unknown = fitSeries(dye20, {}, {}, 1);
    expect(unknown.fits.every((fit) => warnsEarlierPulses(fit) && !fit.acceptable)).toBe(true);
  });

  it('no earlier-pulse warning when the decay dies out inside the window (4 ns in 51.2 ns, rate unknown): false-positive rate < 5 %', () => {
    const channels = 1024;
    const widthNs = 0.05;
    const irf = gaussianIrf(channels, widthNs, 1.5, 0.2);
    const expected = expectedDecayCounts({ channels, channelWidthNs: widthNs, tauNs: [4], photons: 1e5, irf, backgroundPerChannel: 2 });
    const { fits } = fitSeries({ irf, expected, widthNs }, {}, {}, 1000);
    const warned = fits.filter(warnsEarlierPulses).length;
    expect(warned / fits.length).toBeLessThan(0.05);
  });
});
