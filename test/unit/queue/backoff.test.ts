// The one backoff rule: firstMs · 2^(attempt − 1), capped. Expected values are plain powers of two
// (exponential backoff as commonly practised; the doubling is the project's choice).
import { describe, expect, it } from 'vitest';
import { exponentialBackoffMs } from '../../../src/queue/backoff.js';

describe('exponentialBackoffMs', () => {
  it('doubles per failure from the first wait', () => {
    expect([1, 2, 3, 4].map((attempt) => exponentialBackoffMs(500, attempt))).toEqual([500, 1000, 2000, 4000]);
  });

  it('stops at the cap, and the exponent at 30 so the wait stays finite', () => {
    expect(exponentialBackoffMs(1000, 7, 60_000)).toBe(60_000);
    expect(exponentialBackoffMs(1, 100)).toBe(2 ** 30);
  });

  it('treats attempt 0 like attempt 1', () => {
    expect(exponentialBackoffMs(250, 0)).toBe(250);
  });
});
