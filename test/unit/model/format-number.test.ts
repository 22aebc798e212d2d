// Issue 15 item 9: numbers in messages and text reports as a person reads them. Expected strings follow from the
// definition of significant digits (common practice); the two inputs are the ones the issue reported.
import { describe, expect, it } from 'vitest';
import { formatSignificant } from '../../../src/model/format-number.js';

describe('formatSignificant', () => {
  it.each([
    [-53.056000000000004, 4, '-53.06'], // issue 15: float noise in a message
    [74141691.8185, 4, '7.414e7'], // issue 15: an integral printed with all its digits
    [0.1 + 0.2, 4, '0.3'],
    [0.0452, 3, '0.0452'],
    [0.00001234, 3, '1.23e-5'],
    [1500, 4, '1500'],
    [0, 4, '0'],
    [0.925, 2, '0.93'],
  ])('%f to %i digits is %s', (value, digits, expected) => {
    expect(formatSignificant(value, digits)).toBe(expected);
  });

  it('leaves non-finite values readable', () => {
    expect(formatSignificant(Number.NaN)).toBe('NaN');
    expect(formatSignificant(Number.POSITIVE_INFINITY)).toBe('Infinity');
  });
});

describe('QC messages use it for large values (issue 15 item 9)', () => {
  it('prints an intensity per absorbed light of 74141691.8185 as 7.4142e7 a.u., and small values with the metric decimals', async () => {
    const { formatMetricValue } = await import('../../../src/qc/metrics.js');
    expect(formatMetricValue('intensityPerAbsorbedLight', 74141691.8185)).toBe('7.4142e7 a.u.');
    expect(formatMetricValue('meanLifetimeNs', 4.01234)).toBe('4.012 ns');
  });
});
