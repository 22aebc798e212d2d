// The lifetime-fit options a lab sets in driftlight.yaml reach the job's analysis settings (issues 15.6, 17.1, 17.4).
import { describe, expect, it } from 'vitest';
import { resolveConfig } from '../../../src/config/resolve.js';
import { analysisSettingsFrom } from '../../../src/pipeline/settings.js';

describe('decay settings from the config', () => {
  it('passes analysis.scatter (default false)', () => {
    expect(analysisSettingsFrom(resolveConfig({}, { baseDir: '/tmp' })).scatter).toBe(false);
    expect(analysisSettingsFrom(resolveConfig({ analysis: { scatter: true } }, { baseDir: '/tmp' })).scatter).toBe(true);
  });
});
