// Invariants of the data model (Spectrum, Decay): what a constructor accepts and what it rejects.
import { describe, expect, it } from 'vitest';
import { createDecay, createSpectrum, InputRejected } from '../../../src/model/index.js';

function codeOf(fn: () => unknown): string | undefined {
  try {
    fn();
  } catch (error) {
    return error instanceof InputRejected ? error.code : 'not-typed';
  }
  return undefined;
}

describe('createSpectrum', () => {
  it('keeps an ascending axis and its values', () => {
    const spectrum = createSpectrum({ kind: 'emission', wavelengthNm: [400, 401, 402], values: [1, 2, 3] });
    expect(Array.from(spectrum.wavelengthNm)).toEqual([400, 401, 402]);
    expect(spectrum.valueUnit).toBe('a.u.');
    expect(Object.isFrozen(spectrum)).toBe(true);
  });

  it.each([
    ['duplicate axis', [400, 400, 401], [1, 2, 3], 'AXIS_DUPLICATE'],
    ['reversal', [400, 402, 401], [1, 2, 3], 'AXIS_NOT_ASCENDING'],
    ['NaN value', [400, 401, 402], [1, Number.NaN, 3], 'NON_FINITE'],
    ['unequal lengths', [400, 401, 402], [1, 2], 'LENGTH_MISMATCH'],
    ['one point', [400], [1], 'TOO_FEW_POINTS'],
  ])('rejects %s with a typed error', (_label, wavelengthNm, values, code) => {
    expect(codeOf(() => createSpectrum({ kind: 'emission', wavelengthNm, values }))).toBe(code);
  });
});

describe('createDecay', () => {
  it('derives the channel width from a uniform axis', () => {
    const decay = createDecay({ timeNs: [0, 0.05, 0.1, 0.15], counts: [0, 10, 5, 2] });
    expect(decay.channelWidthNs).toBeCloseTo(0.05, 12);
  });

  it.each([
    ['negative counts', [0, 1, 2, 3], [1, -1, 0, 0], 'NEGATIVE_COUNTS'],
    ['non-uniform channels', [0, 1, 2, 4], [1, 1, 1, 1], 'AXIS_NOT_UNIFORM'],
    ['Infinity', [0, 1, 2, 3], [1, Number.POSITIVE_INFINITY, 1, 1], 'NON_FINITE'],
  ])('rejects %s with a typed error', (_label, timeNs, counts, code) => {
    expect(codeOf(() => createDecay({ timeNs, counts }))).toBe(code);
  });
});

describe('InputRejected with a code read back from the ledger', () => {
  it('keeps a code this version does not list and gives a generic hint instead of throwing', () => {
    // A job failure may carry a system code (e.g. ERR_WORKER_OUT_OF_MEMORY) or another version's code.
    const error = new InputRejected('ERR_WORKER_OUT_OF_MEMORY' as 'SET_FAILED', 'worker ran out of memory');
    expect(error.code).toBe('ERR_WORKER_OUT_OF_MEMORY');
    expect(error.hint).toBe('See the message and the log.');
    expect(new InputRejected('SET_FAILED', 'x').hint).toContain('could not be analysed');
  });
});
