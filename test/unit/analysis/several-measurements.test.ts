// Issue 18.3: a file holding several measurements (decay columns, spectra sharing an axis, x,y pairs) gives
// one result per measurement, each naming its column, none dropped. Fixtures: test/fixtures/formats/layouts/,
// written by make_layouts.py, whose generator states the truth checked here (τ of each decay column, the
// centre of each Gaussian emission band).
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { analyze } from '../../../src/analysis/analyze.js';
import type { AnalysisJobPayload } from '../../../src/analysis/payload.js';
import type { SetPart } from '../../../src/analysis/result.js';

const fixture = (name: string): string =>
  readFileSync(new URL(`../../fixtures/formats/layouts/${name}`, import.meta.url), 'utf8');

function payloadOf(files: { name: string; part: SetPart }[]): AnalysisJobPayload {
  return {
    setId: 'multi-01-ab12',
    role: 'sample',
    sampleId: 'multi-01',
    sampleInfo: {},
    files: files.map(({ name, part }) => {
      const content = fixture(name);
      return {
        name,
        part,
        role: 'sample',
        origin: 'own',
        sha256: createHash('sha256').update(content).digest('hex'),
        content,
      };
    }),
    missingParts: [],
    settings: {
      components: 1,
      estimator: 'ml',
      innerFilter: 'none',
      maxAbsorbanceForYield: 0.1,
      refractiveIndex: {},
      defaultRefractiveIndex: 1.333,
      cuvette: { pathLengthCm: 1, excitationWindowStartCm: 0.4, excitationWindowEndCm: 0.6 },
      maxFileBytes: 50_000_000,
    },
    analyzedAt: '2026-03-14T12:00:00.000Z',
    configHash: 'c'.repeat(64),
    softwareVersion: '0.1.0',
  };
}

/** Every result of an analysis, the set's own first. */
function resultsOf(payload: AnalysisJobPayload): ReturnType<typeof analyze>['result'][] {
  const output = analyze(payload);
  return [output.result, ...(output.measurements ?? []).map((m) => m.result)];
}

describe('one file, several measurements: one result each (issue 18.3)', () => {
  it('two decay columns (two emission wavelengths): two lifetimes, each result naming its column', () => {
    const results = resultsOf(payloadOf([{ name: 'decay_two_wavelengths.csv', part: 'decay' }]));
    expect(results.map((r) => r.setId)).toEqual(['multi-01-ab12', 'multi-01-ab12.em-520-nm']);
    expect(results.map((r) => r.measurement?.id)).toEqual([
      'decay_two_wavelengths.csv#em 450 nm',
      'decay_two_wavelengths.csv#em 520 nm',
    ]);
    expect(results.map((r) => [r.measurement?.index, r.measurement?.of, r.measurement?.part])).toEqual([
      [0, 2, 'decay'],
      [1, 2, 'decay'],
    ]);
    expect(results[1]?.measurement?.setId).toBe('multi-01-ab12');
    // make_layouts.py: C450 = decay_counts(tau_ns=2.0), C520 = decay_counts(tau_ns=4.0), offset 5, counts rounded.
    const taus = results.map((r) => r.decayFit?.tauMeanIntensityNs ?? Number.NaN);
    expect(Math.abs((taus[0] ?? 0) / 2.0 - 1)).toBeLessThan(0.05);
    expect(Math.abs((taus[1] ?? 0) / 4.0 - 1)).toBeLessThan(0.05);
    for (const r of results)
      expect(r.warnings.some((w) => w.includes('holds 2 measurements, each with a result of its own'))).toBe(true);
  });

  it('parallel and perpendicular decays sharing one IRF column: both fitted with that IRF', () => {
    const output = analyze(payloadOf([{ name: 'decay_polarisation_irf.csv', part: 'decay' }]));
    const results = [output.result, ...(output.measurements ?? []).map((m) => m.result)];
    expect(results.map((r) => r.measurement?.column)).toEqual(['parallel', 'perpendicular']);
    expect(results.map((r) => r.decayFit?.irfSource)).toEqual(['decay-column', 'decay-column']);
    // Each result fits its own column: its total counts are that column's sum in the file (the fixture's decay
    // starts at its peak before the IRF, so its τ is not a check value).
    const rows = fixture('decay_polarisation_irf.csv')
      .trim()
      .split('\n')
      .slice(1)
      .map((line) => line.split(',').map(Number));
    expect(results.map((r) => r.decayFit?.totalCounts)).toEqual(
      [1, 2].map((column) => rows.reduce((sum, row) => sum + (row[column] ?? 0), 0)),
    );
    // Each result has its own outbox files, named by its own id.
    expect(output.artifacts.map((a) => a.name)).toEqual(['multi-01-ab12.decay.fit.csv']);
    expect(output.measurements?.[0]?.artifacts.map((a) => a.name)).toEqual([
      'multi-01-ab12.perpendicular.decay.fit.csv',
    ]);
  });

  it('three emission spectra sharing one axis, and three x,y pairs: three results each, peaks where the generator put them', () => {
    // make_layouts.py: emission_values(WL, 440 / 460 / 480), and for the pairs 440 / 470 (own axis 402…) / 480.
    const shared = resultsOf(payloadOf([{ name: 'emission_three_samples.csv', part: 'emission' }]));
    expect(shared.map((r) => r.setId)).toEqual(['multi-01-ab12', 'multi-01-ab12.sample-B', 'multi-01-ab12.sample-C']);
    expect(shared.map((r) => Math.round(r.spectra.emission?.peakWavelengthNm ?? 0))).toEqual([440, 460, 480]);
    const pairs = resultsOf(payloadOf([{ name: 'emission_xy_pairs_tab.txt', part: 'emission' }]));
    expect(pairs.map((r) => r.measurement?.column)).toEqual(['sampleA', 'sampleB', 'sampleC']);
    expect(pairs.map((r) => Math.round(r.spectra.emission?.peakWavelengthNm ?? 0))).toEqual([440, 470, 480]);
  });

  it('a supporting part (absorbance) holding several measurements serves with its first and names the others', () => {
    const output = analyze(
      payloadOf([
        { name: 'decay_two_wavelengths.csv', part: 'decay' },
        { name: 'emission_three_samples.csv', part: 'absorbance' },
      ]),
    );
    // Only the decay fans out; the absorbance file's extra columns are named, not silently passed over.
    expect(output.measurements).toHaveLength(1);
    expect(
      output.result.warnings.some(
        (w) =>
          w.includes('as the set\'s absorbance it serves with "sample A"') &&
          w.includes('sample B') &&
          w.includes('sample C'),
      ),
    ).toBe(true);
  });

  it('a file with one measurement gives one result without a measurement field (unchanged)', () => {
    const output = analyze(payloadOf([{ name: 'decay_time_ns.csv', part: 'decay' }]));
    expect(output.measurements).toBeUndefined();
    expect(output.result.measurement).toBeUndefined();
    expect(output.result.setId).toBe('multi-01-ab12');
  });
});
