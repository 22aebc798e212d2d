// The IRF width a decay fit reports (decayFit.irfFwhmNs) and the QC metric it feeds (irfWidthNs):
// a Gaussian IRF's FWHM is 2·√(2·ln 2)·σ (textbook definition of the Gaussian's full width at half
// maximum), so the width simulated is the width reported, within half a channel (the histogram's
// resolution; common practice, not a published tolerance).
import { describe, expect, it } from 'vitest';
import { fitSetDecay } from '../../../src/analysis/decay-step.js';
import { createStepContext } from '../../../src/analysis/step-context.js';
import type { AnalysisResult } from '../../../src/analysis/result.js';
import { decayHistogram, withoutIrf } from '../../../src/demo/synthetic.js';
import { createSeededRandom } from '../../../src/decay/index.js';
import { metricsOfResult } from '../../../src/qc/observation.js';

const settings = {
  components: 1,
  estimator: 'ml',
  innerFilter: 'centred',
  maxAbsorbanceForYield: 0.1,
  refractiveIndex: {},
  defaultRefractiveIndex: 1.333,
  cuvette: { pathLengthCm: 1, excitationWindowStartCm: 0.4, excitationWindowEndCm: 0.6 },
  maxFileBytes: 1e7,
} as const;

describe('IRF width in the decay fit summary', () => {
  it.each([0.2, 0.45])(
    'reports the FWHM of a %s ns Gaussian IRF (0.05 ns channels) within half a channel',
    (fwhmNs) => {
      const decay = decayHistogram(
        { tauNs: [3.9], photons: 200_000, channels: 512, channelWidthNs: 0.05, irfFwhmNs: fwhmNs },
        {},
        createSeededRandom(11),
      );
      const { summary } = fitSetDecay(decay, undefined, settings, createStepContext());
      expect(summary.irfSource).toBe('decay-column');
      expect(Math.abs((summary.irfFwhmNs ?? 0) - fwhmNs)).toBeLessThanOrEqual(0.025);
    },
  );

  it('reports no width without an IRF (tail fit), and QC sees irfWidthNs only when it is there', () => {
    const decay = decayHistogram(
      { tauNs: [3.9], photons: 200_000, channels: 512, channelWidthNs: 0.05, irfFwhmNs: 0.3 },
      {},
      createSeededRandom(12),
    );
    const { summary } = fitSetDecay(withoutIrf(decay), undefined, settings, createStepContext());
    expect(summary.irfFwhmNs).toBeUndefined();
    const base = { spectra: {}, missing: [] } as unknown as AnalysisResult;
    expect(metricsOfResult({ ...base, decayFit: summary })).not.toHaveProperty('irfWidthNs');
    expect(metricsOfResult({ ...base, decayFit: { ...summary, irfFwhmNs: 0.45 } }).irfWidthNs).toBe(0.45);
  });
});
