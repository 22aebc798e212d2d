// Instrument profiles (issue 18 item 5): a profile fixes what the sniffing cannot settle, and reads
// files of the layout table that are refused without one. Expected numbers are the files' own.
import { describe, expect, it } from 'vitest';
import { readData, readMeasurements, matchProfile, formatProfileSchema } from '../../../src/formats/index.js';
import { resolveConfig } from '../../../src/config/index.js';
import { bytes, rejection } from './helpers.js';
import { readFileSync } from 'node:fs';
import { LAYOUTS } from './layouts-outcome.js';

const profile = (fields: Record<string, unknown>) => formatProfileSchema.parse(fields);

describe('matchProfile', () => {
  const profiles = [
    profile({ match: 'run*_tcspc.txt', name: 'a' }),
    profile({ match: 'lab2/**/*.csv', name: 'b' }),
    profile({ match: '*.CSV', name: 'c' }),
  ];
  it.each([
    ['run7_tcspc.txt', 'a'],
    ['/data/inbox/RUN12_TCSPC.TXT', 'a'],
    ['/x/lab2/day1/a.csv', 'b'],
    ['lab2/a.csv', 'b'],
    ['other.csv', 'c'],
    ['run7_tcspc.dat', undefined],
  ])('%s → %s', (file, name) => {
    expect(matchProfile(profiles, file)?.name).toBe(name);
  });
});

describe('profiles read what sniffing cannot', () => {
  it('reads a header-less TCSPC file (refused without a profile) as a ps decay', () => {
    const content = readFileSync(`${LAYOUTS}tcspc_run7.dat`);
    expect(rejection(() => readData(content, { fileName: 'tcspc_run7.dat' })).code).toBe('UNKNOWN_UNIT');
    const data = readData(content, {
      fileName: 'tcspc_run7.dat',
      profiles: [{ match: 'tcspc_*.dat', axisUnit: 'ps', kind: 'decay' }],
    });
    expect(data.type).toBe('decay');
    if (data.type !== 'decay') return;
    expect(data.decay.timeNs[0]).toBe(0.25); // first row of the file: 250 ps
    expect(data.decay.channelWidthNs).toBe(0.025); // 25 ps steps in the file
    expect(data.layout.profile).toBe('tcspc_*.dat');
    expect(data.layout.conversions.map((c) => c.code)).toContain('profile-applied');
  });

  it('fixes delimiter, decimal mark, header lines, names line, axis, value and IRF columns and channel width', () => {
    const text = [
      'instrument note 1',
      'instrument note 2',
      'ch;sample;perp;prompt',
      ...Array.from({ length: 8 }, (_, i) => `${i};${100 - i},5;${50 - i};${i === 1 ? 9 : 0}`),
    ].join('\n');
    const all = readMeasurements(bytes(text), {
      fileName: 'x/run_a.csv',
      profiles: [
        {
          match: '*.csv',
          delimiter: 'semicolon',
          decimalMark: ',',
          headerLines: 3,
          columnNamesLine: 3,
          axisColumn: 'ch',
          axisUnit: 'channel',
          valueColumns: ['sample', 3],
          irfColumn: 'prompt',
          channelWidthNs: 0.05,
          role: 'sample',
        },
      ],
    });
    expect(all.map((data) => data.id)).toEqual(['x/run_a.csv#sample', 'x/run_a.csv#perp']);
    const [first, second] = all;
    if (first?.type !== 'decay' || second?.type !== 'decay') throw new Error('expected decays');
    expect(Array.from(first.decay.counts.slice(0, 2))).toEqual([100.5, 99.5]);
    expect(Array.from(second.decay.counts.slice(0, 2))).toEqual([50, 49]);
    expect(first.decay.irfCounts?.[1]).toBe(9);
    expect(first.decay.timeNs[3]).toBeCloseTo(0.15, 12);
    expect(first.decay.metadata.role).toBe('sample');
  });

  it('says which profile setting does not fit', () => {
    const error = rejection(() =>
      readData(bytes('a\nb\n1,2\n3,4\n5,6\n7,8\n'), {
        fileName: 'a.csv',
        profiles: [{ match: 'a.csv', headerLines: 1 }],
      }),
    );
    expect(error.code).toBe('NO_DATA');
    expect(error.hint).toMatch(/headerLines/);
  });
});

describe('config formats.profiles', () => {
  it('validates profiles and refuses an unknown field', () => {
    const config = resolveConfig({ formats: { profiles: [{ match: '*.txt', axisUnit: 'ps' }] } }, { baseDir: '/' });
    expect(config.formats.profiles[0]?.axisUnit).toBe('ps');
    expect(() =>
      resolveConfig({ formats: { profiles: [{ match: '*.txt', axisUnits: 'ps' }] } }, { baseDir: '/' }),
    ).toThrow(/axisUnits/);
  });
});
