// Set assembly decisions (pure): classification by content, metadata and name; placement; readiness;
// pairing choice within a window.
import { describe, expect, it } from 'vitest';
import { DEFAULT_FILE_NAME_PATTERN } from '../../../src/config/sections/assembly.js';
import {
  choosePairing,
  classifyFile,
  makeSetId,
  placeFile,
  setReadiness,
  type AssemblyRules,
  type OpenSetView,
} from '../../../src/pipeline/assemble.js';

const rules: AssemblyRules = {
  fileNamePatterns: [new RegExp(DEFAULT_FILE_NAME_PATTERN, 'i')],
  referencePatterns: [/^REF-/],
  controlPatterns: [/^CTRL-/],
  requiredParts: ['emission', 'absorbance', 'decay', 'irf'],
  referenceRequiredParts: ['emission', 'absorbance'],
  setTimeoutMs: 1000,
};
const t0 = new Date('2026-03-14T10:00:00Z');

function view(partial: Partial<OpenSetView> & Pick<OpenSetView, 'files'>): OpenSetView {
  return {
    id: 's1',
    sampleId: 'orchid-01',
    role: 'sample',
    createdAt: t0,
    deadlineAt: new Date(t0.getTime() + 1000),
    ...partial,
  };
}

describe('classifyFile', () => {
  it('takes the sample id from metadata first, then the file name, then the stem', () => {
    expect(
      classifyFile(
        {
          name: 'x_em.csv',
          dataType: 'spectrum',
          spectrumKind: 'emission',
          metadataSampleId: 'orchid-09',
          hasIrfColumn: false,
        },
        rules,
      ),
    ).toMatchObject({ sampleId: 'orchid-09', sampleIdSource: 'metadata', part: 'emission' });
    expect(
      classifyFile(
        { name: 'orchid-01_abs.jdx', dataType: 'spectrum', spectrumKind: 'absorbance', hasIrfColumn: false },
        rules,
      ),
    ).toMatchObject({ sampleId: 'orchid-01', sampleIdSource: 'pattern', part: 'absorbance', role: 'absorbance' });
    expect(classifyFile({ name: 'run0314-c.csv', dataType: 'decay', hasIrfColumn: true }, rules)).toMatchObject({
      sampleId: 'run0314-c',
      sampleIdSource: 'fallback',
      part: 'decay',
    });
  });

  it('lets the content win over a contradicting name (a decay named _em stays a decay)', () => {
    expect(classifyFile({ name: 'orchid-01_em.csv', dataType: 'decay', hasIrfColumn: false }, rules).part).toBe(
      'decay',
    );
    expect(classifyFile({ name: 'orchid-01_irf.csv', dataType: 'decay', hasIrfColumn: false }, rules).part).toBe('irf');
  });
});

describe('placeFile and setReadiness', () => {
  it('joins a waiting set of the same sample and creates control sets from the configured pattern', () => {
    const open = [view({ files: [{ name: 'orchid-01_em.csv', part: 'emission', hasIrfColumn: false }] })];
    const c = classifyFile(
      { name: 'orchid-01_abs.jdx', dataType: 'spectrum', spectrumKind: 'absorbance', hasIrfColumn: false },
      rules,
    );
    expect(placeFile({ name: 'orchid-01_abs.jdx', classification: c }, open, rules)).toEqual({
      kind: 'join',
      setId: 's1',
    });
    const ctrl = classifyFile(
      { name: 'CTRL-teal_em.csv', dataType: 'spectrum', spectrumKind: 'emission', hasIrfColumn: false },
      rules,
    );
    expect(placeFile({ name: 'CTRL-teal_em.csv', classification: ctrl }, open, rules)).toMatchObject({
      kind: 'create',
      role: 'control',
    });
  });

  it('makes an IRF that names no sample a stand-alone set', () => {
    const c = classifyFile(
      {
        name: 'scatter.csv',
        dataType: 'decay',
        metadataRole: 'irf',
        metadataSampleId: 'scatter-0905',
        hasIrfColumn: false,
      },
      rules,
    );
    expect(placeFile({ name: 'scatter.csv', classification: c }, [], rules)).toEqual({
      kind: 'create',
      sampleId: 'scatter-0905',
      role: 'irf',
      standalone: true,
    });
  });

  it('is complete when the required parts are present (a decay with an IRF column supplies the IRF)', () => {
    const files = [
      { name: 'a', part: 'emission' as const, hasIrfColumn: false },
      { name: 'b', part: 'absorbance' as const, hasIrfColumn: false },
      { name: 'c', part: 'decay' as const, hasIrfColumn: true },
    ];
    expect(setReadiness(view({ files }), rules, t0)).toEqual({ ready: true, reason: 'complete', missingParts: [] });
    const noIrf = files.map((f) => ({ ...f, hasIrfColumn: false }));
    expect(setReadiness(view({ files: noIrf }), rules, t0)).toMatchObject({ ready: false, missingParts: ['irf'] });
    expect(setReadiness(view({ files: noIrf }), rules, new Date(t0.getTime() + 1000))).toMatchObject({
      ready: true,
      reason: 'timeout',
      missingParts: ['irf'],
    });
  });

  it('waits for every file a manifest lists', () => {
    const set = view({
      files: [{ name: 'a.csv', part: 'emission', hasIrfColumn: false }],
      manifestFiles: ['a.csv', 'b.csv'],
    });
    expect(setReadiness(set, rules, t0).ready).toBe(false);
    expect(
      setReadiness(
        { ...set, files: [...set.files, { name: 'b.csv', part: 'absorbance', hasIrfColumn: false }] },
        rules,
        t0,
      ).reason,
    ).toBe('manifest-complete');
  });
});

describe('choosePairing', () => {
  const c = (fileId: number, iso: string, setId = 'other') => ({
    fileId,
    setId,
    sampleId: null,
    measuredAt: new Date(iso),
  });
  it('prefers the most recent candidate at or before the set, within the window', () => {
    const candidates = [
      c(1, '2026-03-13T08:00:00Z'),
      c(2, '2026-03-14T09:00:00Z'),
      c(3, '2026-03-14T11:00:00Z'),
      c(4, '2026-03-10T09:00:00Z'),
    ];
    expect(choosePairing(candidates, t0, 24)?.fileId).toBe(2);
    expect(choosePairing([c(3, '2026-03-14T11:00:00Z')], t0, 24)?.fileId).toBe(3);
    expect(choosePairing([c(4, '2026-03-10T09:00:00Z')], t0, 24)).toBeUndefined();
    expect(choosePairing([c(2, '2026-03-14T09:00:00Z', 's1')], t0, 24, { excludeSetId: 's1' })).toBeUndefined();
  });

  it('builds file-system-safe set ids', () => {
    expect(makeSetId('dye 7/β', 'abcdef0123456789')).toBe('dye_7_-abcdef012345');
  });
});
