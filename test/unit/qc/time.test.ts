// Clock-free time helpers of the core, checked against the JavaScript Date implementation (ECMA-262)
// and known DST transitions (EU rule: last Sunday of March/October at 01:00 UTC).
import { describe, expect, it } from 'vitest';
import { epochMsToIso, localParts, parseIsoToEpochMs, zonedTimeToEpochMs } from '../../../src/qc/index.js';

describe('time helpers', () => {
  it('parses ISO 8601 with Z, offsets, fractions and date-only like Date.parse', () => {
    for (const text of [
      '2026-03-02T08:00:00Z',
      '2026-03-02T09:30:15.250+01:00',
      '2024-02-29T23:59:59-05:30',
      '2026-12-31T00:00:00.000Z',
      '1999-01-01',
    ]) {
      expect(parseIsoToEpochMs(text)).toBe(Date.parse(text));
    }
    expect(parseIsoToEpochMs('02/03/2026')).toBeUndefined();
    expect(parseIsoToEpochMs('2026-13-01')).toBeUndefined();
  });

  it('formats epoch ms as ISO UTC like Date.toISOString', () => {
    for (const epochMs of [0, 1_772_438_400_123, -86_400_001, 4_102_444_799_999])
      expect(epochMsToIso(epochMs)).toBe(new Date(epochMs).toISOString());
  });

  it('gives local date, minute and weekday in IANA zones and fixed offsets', () => {
    // 2026-03-29 01:30 UTC: Berlin already on CEST (03:30 local, Sunday).
    expect(localParts(Date.parse('2026-03-29T01:30:00Z'), 'Europe/Berlin')).toEqual({
      date: '2026-03-29',
      minuteOfDay: 3 * 60 + 30,
      weekday: 'sun',
    });
    expect(localParts(Date.parse('2026-03-02T23:30:00Z'), '-05:00')).toEqual({
      date: '2026-03-02',
      minuteOfDay: 18 * 60 + 30,
      weekday: 'mon',
    });
  });

  it('converts local wall time to an instant across DST', () => {
    expect(zonedTimeToEpochMs('2026-03-27', 10 * 60, 'Europe/Berlin')).toBe(Date.parse('2026-03-27T09:00:00Z')); // CET
    expect(zonedTimeToEpochMs('2026-03-30', 10 * 60, 'Europe/Berlin')).toBe(Date.parse('2026-03-30T08:00:00Z')); // CEST
    expect(zonedTimeToEpochMs('2026-03-02', 10 * 60, 'UTC')).toBe(Date.parse('2026-03-02T10:00:00Z'));
  });
});
