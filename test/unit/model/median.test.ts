// The one median. Expected values checked with numpy.median (numpy, python3 on the dev machine).
import { describe, expect, it } from 'vitest';
import { medianOf } from '../../../src/model/median.js';
import { medianOf as qcMedianOf } from '../../../src/qc/statistics.js';

describe('medianOf', () => {
  it('takes the middle value, or the mean of the two middle values', () => {
    expect(medianOf([3, 1, 2])).toBe(2); // numpy.median → 2.0
    expect(medianOf([4, 1, 3, 2])).toBe(2.5); // numpy.median → 2.5
    expect(medianOf([-1.5, 7, 2.25, 2.25, 10])).toBe(2.25); // numpy.median → 2.25
  });

  it('throws on an empty list and is the one the QC statistics use', () => {
    expect(() => medianOf([])).toThrow(RangeError);
    expect(qcMedianOf).toBe(medianOf);
  });
});
