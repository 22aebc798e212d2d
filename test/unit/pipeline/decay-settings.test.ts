// The lifetime-fit options a lab sets in driftlight.yaml reach the job's analysis settings (issues 15.6, 17.1, 17.4).
import { describe, expect, it } from 'vitest';
import { resolveConfig } from '../../../src/config/resolve.js';
import { analysisSettingsFrom } from '../../../src/pipeline/settings.js';

describe('decay settings from the config', () => {
  it('passes analysis.scatter (default false)', () => {
    expect(analysisSettingsFrom(resolveConfig({}, { baseDir: '/tmp' })).scatter).toBe(false);
    expect(analysisSettingsFrom(resolveConfig({ analysis: { scatter: true } }, { baseDir: '/tmp' })).scatter).toBe(
      true,
    );
  });
});

describe('repetition rate and pile-up correction from the config (issue 17.1, 17.4)', () => {
  it('passes instrument.repetitionRateMHz (in Hz) and analysis.pileUpCorrection (default false)', () => {
    const defaults = analysisSettingsFrom(resolveConfig({}, { baseDir: '/tmp' }));
    expect(defaults.repetitionRateHz).toBeUndefined();
    expect(defaults.pileUpCorrection).toBe(false);
    const set = analysisSettingsFrom(
      resolveConfig(
        { instrument: { repetitionRateMHz: 80 }, analysis: { pileUpCorrection: true } },
        { baseDir: '/tmp' },
      ),
    );
    expect(set.repetitionRateHz).toBe(80e6);
    expect(set.pileUpCorrection).toBe(true);
  });
});
