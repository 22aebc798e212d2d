// The digest schedule's catch-up: which day's digest the latest scheduled run was due to build,
// across midnight and a daylight-saving change (zone rules from the IANA tz database).
import { describe, expect, it } from 'vitest';
import { cronPatternOf, dueDigestDate } from '../../../src/output/digest-schedule.js';

describe('digest schedule', () => {
  it('builds the cron pattern of a local time', () => {
    expect(cronPatternOf('07:00')).toBe('0 7 * * *');
    expect(cronPatternOf('23:45')).toBe('45 23 * * *');
  });

  it('the run due at or before now covers the previous local day', () => {
    // 07:00 in Berlin on 2026-12-05 is 06:00Z (CET = UTC+1 in winter; IANA tz database).
    expect(dueDigestDate('07:00', 'Europe/Berlin', new Date('2026-12-05T06:30:00Z'))).toBe('2026-12-04');
    // Before that morning's run, the latest run was the day before: it covered 2026-12-03.
    expect(dueDigestDate('07:00', 'Europe/Berlin', new Date('2026-12-05T05:30:00Z'))).toBe('2026-12-03');
    // Summer time (CEST = UTC+2): 07:00 local is 05:00Z.
    expect(dueDigestDate('07:00', 'Europe/Berlin', new Date('2026-07-01T05:10:00Z'))).toBe('2026-06-30');
    expect(dueDigestDate('07:00', 'Europe/Berlin', new Date('2026-07-01T04:50:00Z'))).toBe('2026-06-29');
    // A run late in the evening in a zone west of UTC: 23:30 in New York on 2026-12-04 is 04:30Z on the 5th (EST = UTC−5).
    expect(dueDigestDate('23:30', 'America/New_York', new Date('2026-12-05T04:45:00Z'))).toBe('2026-12-03');
  });
});
