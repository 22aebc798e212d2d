// JobFailure conversion: permanence by class, code or flag; the round trip through BullMQ's
// failedReason; reasons BullMQ writes itself.
import { describe, expect, it } from 'vitest';
import { AnalysisFailed, ConfigInvalid, InputRejected, Transient } from '../../../src/model/errors.js';
import { decodeFailure, encodeFailure, toJobFailure } from '../../../src/queue/job-failure.js';

describe('toJobFailure', () => {
  it.each([
    ['InputRejected', new InputRejected('NON_NUMERIC', 'column 2 holds text'), true],
    ['ConfigInvalid', new ConfigInvalid('bad path'), true],
    ['AnalysisFailed', new AnalysisFailed('FIT_FAILED', 'no convergence'), true],
    ['Transient', new Transient('disk busy'), false],
    ['plain Error', new Error('boom'), false],
    ['permanent flag', Object.assign(new Error('odd'), { permanent: true, code: 'CUSTOM' }), true],
    ['input code on a plain object', { code: 'TRUNCATED', message: 'ends early' }, true],
  ])('%s → permanent %s', (_name, error, permanent) => {
    expect(toJobFailure(error).permanent).toBe(permanent);
  });

  it('keeps code, message and the class hint; fills the table hint for a bare known code', () => {
    expect(toJobFailure(new InputRejected('NON_NUMERIC', 'column 2 holds text', { hint: 'use a dot' }))).toEqual({
      code: 'NON_NUMERIC',
      message: 'column 2 holds text',
      hint: 'use a dot',
      permanent: true,
    });
    expect(toJobFailure({ code: 'FIT_FAILED', message: 'm' }).hint).toMatch(/did not converge/);
    expect(toJobFailure('just text')).toEqual({
      code: 'TRANSIENT',
      message: 'just text',
      hint: expect.any(String),
      permanent: false,
    });
  });
});

describe('encodeFailure / decodeFailure', () => {
  it('round-trips a failure through an error message', () => {
    const failure = { code: 'NON_NUMERIC', message: 'column 2: "a,b"', hint: 'h', permanent: true };
    expect(decodeFailure(encodeFailure(failure))).toEqual(failure);
  });

  it("reads BullMQ's own reasons: stalls as WORKER_LOST, anything else as TRANSIENT", () => {
    expect(decodeFailure('job stalled more than allowable limit')).toMatchObject({
      code: 'WORKER_LOST',
      permanent: false,
    });
    expect(decodeFailure('Missing lock for job 1')).toEqual({
      code: 'TRANSIENT',
      message: 'Missing lock for job 1',
      permanent: false,
    });
    expect(decodeFailure(undefined)).toMatchObject({ code: 'TRANSIENT', permanent: false });
  });
});
