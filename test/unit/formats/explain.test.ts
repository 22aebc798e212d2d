// explainData() (behind `driftlight inspect --explain`): each line, column and key says how it was
// read, and a refused or ambiguous file gets a profile that is tried before it is offered.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { explainData, readMeasurements } from '../../../src/formats/index.js';
import { LAYOUTS } from './layouts-outcome.js';

const layout = (name: string) => readFileSync(`${LAYOUTS}${name}`);

describe('explainData', () => {
  it('names every header line, the column-name line, the data rows and each key of a read file', () => {
    const explanation = explainData(layout('emission_sections.txt'), { fileName: 'emission_sections.txt' });
    expect(explanation.outcome).toEqual({ read: ['emission_sections.txt'] });
    expect(explanation.lines.map((item) => item.readAs)).toEqual([
      'structure (section line or empty cells), not metadata',
      'metadata: key "SampleName", value ""',
      'metadata: key "ExcWavelength", value "350"',
      'metadata: key "Detector", value "PMT-A"',
      'structure (section line or empty cells), not metadata',
      'column names',
      'data rows: 2 column(s), delimiter tab, decimal mark "."',
    ]);
    expect(explanation.keys.map((item) => item.readAs)).toEqual([
      'empty value: kept in metadata.extra as "SampleName"',
      'words "exc wavelength" → excitationNm',
      'words "detector": not in the vocabulary, kept in metadata.extra',
    ]);
    expect(explanation.columns.map((item) => item.readAs)).toEqual([
      'axis (unit assumed)',
      'emission values of measurement emission_sections.txt',
    ]);
    // "Wavelength" without a unit is an assumption (nm): a profile is offered and was tried.
    expect(explanation.profile?.checked).toBe(true);
  });

  it('offers a profile for a refused header-less decay, with the channel width to fill in', () => {
    const explanation = explainData(layout('decay_headerless_2col.txt'), { fileName: 'decay_headerless_2col.txt' });
    expect('refused' in explanation.outcome && explanation.outcome.refused.code).toBe('UNKNOWN_UNIT');
    expect(explanation.profile?.checked).toBe(false);
    expect(explanation.profile?.yaml).toContain('axisUnit: "channel"');
    expect(explanation.profile?.yaml).toContain('channelWidthNs: "FILL IN"');
    expect(explanation.profile?.note).toMatch(/channelWidthNs/);
  });

  it('explains a Raman-shift refusal, which a profile with the excitation wavelength reads', () => {
    const summary = layout('raman_shift_no_excitation.csv');
    const raman = explainData(summary, { fileName: 'raman_shift_no_excitation.csv' });
    expect('refused' in raman.outcome && raman.outcome.refused.code).toBe('EXCITATION_REQUIRED');
    expect(
      readMeasurements(summary, {
        fileName: 'raman_shift_no_excitation.csv',
        profiles: [{ match: 'raman_*', excitationNm: 350 }],
      }),
    ).toHaveLength(1);
  });

  it('offers no profile for an excitation–emission matrix (a profile could only misread it)', () => {
    const explanation = explainData(layout('eem_matrix.csv'), { fileName: 'eem_matrix.csv' });
    expect('refused' in explanation.outcome && explanation.outcome.refused.code).toBe('MATRIX_LAYOUT');
    expect(explanation.profile).toBeNull();
  });

  it('lists the summary lines after the data', () => {
    const explanation = explainData(layout('decay_summary_block.txt'), { fileName: 'decay_summary_block.txt' });
    expect(
      explanation.lines.filter((item) => item.readAs.startsWith('after the data')).map((item) => item.where),
    ).toEqual(['line 50', 'line 51']);
  });
});
