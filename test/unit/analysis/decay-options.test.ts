// Issue 17.1 / 17.4 in the pipeline: the instrument's repetition rate (config) is used for a decay whose
// file states none, the file's own rate wins, and the pile-up correction is switched on by the config.
// Truth: a 4 ns decay at 80 MHz folded from 60 single pulses (see test/unit/decay/earlier-pulses.test.ts).
import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { analyze } from '../../../src/analysis/analyze.js';
import type { AnalysisJobPayload, AnalysisSettings } from '../../../src/analysis/payload.js';
import { createSeededRandom, expectedDecayCounts, gaussianIrf, samplePoisson } from '../../../src/decay/index.js';
import { writeDecayCsv } from '../../../src/formats/csv-writer.js';
import { createDecay, type DecayMetadata } from '../../../src/model/decay.js';
import { metricsOfResult } from '../../../src/qc/observation.js';

const channels = 500;
const widthNs = 12.5 / channels;
const irf = Float64Array.from(gaussianIrf(channels, widthNs, 1.5, 0.2), (value) => Math.round(value * 1e5));

function foldedCounts(seed: number): Float64Array {
  const periods = 60;
  const longIrf = new Float64Array(channels * periods);
  longIrf.set(irf);
  const long = expectedDecayCounts({
    channels: channels * periods,
    channelWidthNs: widthNs,
    tauNs: [4],
    photons: 1e5,
    irf: longIrf,
  });
  const expected = new Float64Array(channels).fill(2);
  for (let k = 0; k < long.length; k++)
    expected[k % channels] = (expected[k % channels] as number) + (long[k] as number);
  const random = createSeededRandom(seed);
  return Float64Array.from(expected, (mean) => samplePoisson(mean, random));
}

function decayFile(metadata: Partial<DecayMetadata>, counts = foldedCounts(3)): string {
  return writeDecayCsv(
    createDecay({
      timeNs: Float64Array.from({ length: channels }, (_unused, k) => Number((k * widthNs).toPrecision(12))),
      counts,
      channelWidthNs: widthNs,
      irfCounts: irf,
      metadata,
    }),
  );
}

function payload(content: string, settings: Partial<AnalysisSettings>): AnalysisJobPayload {
  return {
    setId: 'ctrl',
    role: 'control',
    sampleId: 'CTRL-x',
    sampleInfo: {},
    missingParts: [],
    files: [
      {
        name: 'ctrl_decay.csv',
        sha256: createHash('sha256').update(content).digest('hex'),
        part: 'decay',
        role: 'control',
        origin: 'own',
        content,
      },
    ],
    settings: {
      components: 1,
      estimator: 'ml',
      innerFilter: 'centred',
      maxAbsorbanceForYield: 0.1,
      refractiveIndex: {},
      defaultRefractiveIndex: 1.333,
      cuvette: { pathLengthCm: 1, excitationWindowStartCm: 0.4, excitationWindowEndCm: 0.6 },
      maxFileBytes: 50_000_000,
      ...settings,
    },
    analyzedAt: '2026-03-14T12:00:00.000Z',
    configHash: 'c'.repeat(64),
    softwareVersion: '0.1.0',
  };
}

describe('repetition rate in the pipeline', () => {
  it('without any rate: the lifetime is flagged, names the option, and QC does not judge it', () => {
    const { result } = analyze(payload(decayFile({}), {}));
    expect(result.decayFit?.acceptable).toBe(false);
    expect(
      result.decayFit?.warnings.some(
        (w) => w.startsWith('light from earlier pulses') && w.includes('instrument.repetitionRateMHz'),
      ),
    ).toBe(true);
    expect(result.decayFit?.repetitionRateHz).toBeUndefined();
    expect(metricsOfResult(result).meanLifetimeNs).toBeUndefined();
  });

  it("with the instrument's rate from the config: periodic model, τ within 3 SE of the 4 ns truth, judged by QC", () => {
    const { result } = analyze(payload(decayFile({}), { repetitionRateHz: 80e6 }));
    expect(result.decayFit?.acceptable).toBe(true);
    expect(result.decayFit?.repetitionRateHz).toBe(80e6);
    const component = result.decayFit?.components[0];
    expect(Math.abs((component?.tauNs ?? 0) - 4)).toBeLessThan(3 * (component?.tauNsStdErr ?? 0));
    expect(metricsOfResult(result).meanLifetimeNs).toBeCloseTo(component?.tauNs ?? 0, 12);
  });

  it("the file's own rate wins over the config's", () => {
    const { result } = analyze(payload(decayFile({ repetitionRateHz: 80e6 }), { repetitionRateHz: 1e6 }));
    expect(result.decayFit?.repetitionRateHz).toBe(80e6);
    expect(result.decayFit?.acceptable).toBe(true);
  });
});

describe('pile-up correction in the pipeline', () => {
  it('is applied when the config turns it on (collection time and rate from the file), and recorded', () => {
    // 4·10⁵ counts in 1 s at 80 MHz: 0.5 % of the pulses; the correction is small but applied.
    const metadata = { repetitionRateHz: 80e6, collectionTimeS: 1 };
    const off = analyze(payload(decayFile(metadata), {})).result;
    expect(off.decayFit?.pileUpCorrected).toBe(false);
    const on = analyze(payload(decayFile(metadata), { pileUpCorrection: true })).result;
    expect(on.decayFit?.pileUpCorrected).toBe(true);
    // Without a collection time it cannot be applied and says so.
    const unknown = analyze(payload(decayFile({ repetitionRateHz: 80e6 }), { pileUpCorrection: true })).result;
    expect(unknown.decayFit?.pileUpCorrected).toBe(false);
    expect(unknown.decayFit?.warnings.some((w) => w.startsWith('pile-up correction requested'))).toBe(true);
  });
});

describe('a separate IRF file on its own time axis (issue 15.7)', () => {
  const decayChannels = 512;
  const decayWidthNs = 0.05;
  /** A Gaussian IRF (centre 2 ns, FWHM 250 ps) integrated on `count` channels of `width` starting at `startNs`, as an IRF file. */
  const irfFile = (width: number, count: number, startNs: number): string =>
    writeDecayCsv(
      createDecay({
        timeNs: Float64Array.from({ length: count }, (_unused, k) => Number((startNs + k * width).toPrecision(12))),
        counts: Float64Array.from(gaussianIrf(count, width, 2 - startNs, 0.25), (value) => Math.round(value * 1e5)),
        channelWidthNs: width,
        metadata: {},
      }),
    );
  // Truth 3.4 ns, simulated with the same IRF on the decay's own 50 ps channels.
  const simulated = expectedDecayCounts({
    channels: decayChannels,
    channelWidthNs: decayWidthNs,
    tauNs: [3.4],
    photons: 2e5,
    irf: gaussianIrf(decayChannels, decayWidthNs, 2, 0.25),
    backgroundPerChannel: 2,
  });
  const random = createSeededRandom(21);
  const decayContent = writeDecayCsv(
    createDecay({
      timeNs: Float64Array.from({ length: decayChannels }, (_unused, k) => Number((k * decayWidthNs).toPrecision(12))),
      counts: Float64Array.from(simulated, (mean) => samplePoisson(mean, random)),
      channelWidthNs: decayWidthNs,
      metadata: {},
    }),
  );
  const withIrf = (irfContent: string): AnalysisJobPayload => {
    const base = payload(decayContent, {});
    return {
      ...base,
      files: [
        ...base.files,
        {
          name: 'irf.csv',
          sha256: createHash('sha256').update(irfContent).digest('hex'),
          part: 'irf',
          role: 'irf',
          origin: 'paired',
          pairedFromSetId: 'irf-set',
          content: irfContent,
        },
      ],
    };
  };

  it('resamples a finer IRF with an offset axis onto the decay and recovers τ (within 3 SE of 3.4 ns)', () => {
    const { result } = analyze(withIrf(irfFile(0.025, 1200, -3)));
    expect(result.decayFit?.irfSource).toBe('irf-file');
    expect(
      result.warnings.some((w) => /the IRF was resampled from 0\.02500 ns .* and placed by its own time axis/.test(w)),
    ).toBe(true);
    const component = result.decayFit?.components[0];
    expect(Math.abs((component?.tauNs ?? 0) - 3.4)).toBeLessThan(3 * (component?.tauNsStdErr ?? 0));
  });

  it('refuses a coarser IRF with IRF_AXIS_MISMATCH and its hint, and says the lifetime is from a tail fit', () => {
    const { result } = analyze(withIrf(irfFile(0.1, 256, 0)));
    expect(result.decayFit?.irfSource).toBe('none');
    const missing = result.missing.find((m) => m.what === 'irf');
    expect(missing?.reason).toMatch(/^IRF_AXIS_MISMATCH: .*coarser.*finer channels/);
  });
});
