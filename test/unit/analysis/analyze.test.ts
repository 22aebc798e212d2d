// analyze() on generated measurements with known truth (src/demo: τ and Φ set by the generator),
// complete and partial sets.
import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { analyze } from '../../../src/analysis/analyze.js';
import type { AnalysisJobPayload, PayloadFile } from '../../../src/analysis/payload.js';
import type { SetPart } from '../../../src/analysis/result.js';
import { generateDemoDay } from '../../../src/demo/scenario.js';
import type { MeasurementRole } from '../../../src/model/spectrum.js';

const day = generateDemoDay();
const sha = (text: string): string => createHash('sha256').update(text).digest('hex');

function file(name: string, part: SetPart, role: MeasurementRole, origin: PayloadFile['origin'] = 'own'): PayloadFile {
  const found = day.files.find((f) => f.name === name);
  if (found === undefined) throw new Error(`no demo file ${name}`);
  return { name, sha256: sha(found.content), part, role, origin, content: found.content };
}

function payload(files: PayloadFile[], extra: Partial<AnalysisJobPayload> = {}): AnalysisJobPayload {
  return {
    setId: 'orchid-01-test',
    role: 'sample',
    sampleId: 'orchid-01',
    sampleInfo: {},
    files,
    missingParts: [],
    settings: {
      components: 1,
      estimator: 'ml',
      innerFilter: 'centred',
      maxAbsorbanceForYield: 0.1,
      refractiveIndex: {},
      defaultRefractiveIndex: 1.333,
      cuvette: { pathLengthCm: 1, excitationWindowStartCm: 0.4, excitationWindowEndCm: 0.6 },
      maxFileBytes: 50_000_000,
      reference: { standardId: 'rhodamine-6g-ethanol' },
    },
    analyzedAt: '2026-03-14T12:00:00.000Z',
    configHash: 'c'.repeat(64),
    softwareVersion: '0.1.0',
    ...extra,
  };
}

describe('analyze', () => {
  it('recovers the generator truth for a complete set with a paired reference (τ within 3 %, Φ within 5 %)', () => {
    const truth = day.truth.find((t) => t.sampleId === 'orchid-01');
    const { result, artifacts } = analyze(
      payload([
        file('orchid-01_em.csv', 'emission', 'sample'),
        file('orchid-01_abs.jdx', 'absorbance', 'absorbance'),
        file('orchid-01_decay.csv', 'decay', 'sample'),
        { ...file('REF-R6G-0314_em.csv', 'reference-emission', 'reference', 'paired'), pairedFromSetId: 'ref-set' },
        { ...file('REF-R6G-0314_abs.jdx', 'reference-absorbance', 'reference', 'paired'), pairedFromSetId: 'ref-set' },
      ]),
    );
    expect(result.missing).toEqual([]);
    expect(result.partial).toBe(false);
    expect(result.decayFit?.irfSource).toBe('decay-column');
    expect(result.decayFit?.tauMeanIntensityNs).toBeCloseTo(truth?.tauNs ?? 0, 0);
    expect(Math.abs((result.decayFit?.tauMeanIntensityNs ?? 0) / (truth?.tauNs ?? 1) - 1)).toBeLessThan(0.03);
    expect(Math.abs((result.quantumYield?.value ?? 0) / (truth?.quantumYield ?? 1) - 1)).toBeLessThan(0.05);
    expect(result.quantumYield?.referenceSetId).toBe('ref-set');
    expect(Math.abs((result.rates?.krPerS ?? 0) / (truth?.krPerS ?? 1) - 1)).toBeLessThan(0.08);
    expect(result.provenance.corrections[0]).toBe('correctInnerFilter:emission');
    expect(artifacts.map((a) => a.name)).toEqual([
      'orchid-01-test.emission.corrected.csv',
      'orchid-01-test.emission.corrected.jdx',
      'orchid-01-test.decay.fit.csv',
    ]);
  });

  it('reports what a partial set could not compute, and why', () => {
    const { result } = analyze(
      payload([file('orchid-01_em.csv', 'emission', 'sample')], {
        missingParts: [{ part: 'decay', reason: 'no decay arrived with the set' }],
      }),
    );
    expect(result.partial).toBe(true);
    expect(result.spectra.emission?.peakWavelengthNm).toBeGreaterThan(500);
    const what = result.missing.map((m) => m.what);
    expect(what).toEqual(expect.arrayContaining(['decay', 'quantumYield', 'rates']));
    expect(result.missing.find((m) => m.what === 'quantumYield')?.reason).toContain('absorbance');
  });

  it('reports an unreadable file as a missing part instead of throwing', () => {
    const { result } = analyze(payload([file('orchid-03_em.csv', 'emission', 'sample')]));
    expect(result.partial).toBe(true);
    expect(result.missing[0]?.reason).toMatch(/^NON_NUMERIC/);
  });

  it('hands an unreadable own file back as a rejected input with its line, for quarantine (paired files are not)', () => {
    const own = file('orchid-03_em.csv', 'emission', 'sample');
    const { rejectedInputs } = analyze(payload([own]));
    expect(rejectedInputs).toEqual([
      expect.objectContaining({ name: 'orchid-03_em.csv', sha256: own.sha256, code: 'NON_NUMERIC', line: 41 }),
    ]);
    expect(rejectedInputs?.[0]?.hint).not.toBe('');
    const paired = analyze(payload([file('orchid-03_em.csv', 'emission', 'sample', 'paired')]));
    expect(paired.rejectedInputs).toEqual([]);
  });
});
