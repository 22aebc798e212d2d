// The one acquisition-time reader against a table of spellings. Expected instants were computed
// independently with Python's datetime and zoneinfo (python3, IANA tz database), e.g.
// datetime(2026,12,5,9,30,tzinfo=ZoneInfo('Europe/Berlin')).astimezone(timezone.utc), and Excel
// serials as datetime(1899,12,30) + timedelta(days=serial) (the 1900 date system; common practice).
import { describe, expect, it } from 'vitest';
import { localDateOf, readAcquisitionTime, type AcquisitionTimeOptions } from '../../../src/model/acquisition-time.js';
import { parseIsoToEpochMs } from '../../../src/qc/time.js';

const BERLIN_DMY: AcquisitionTimeOptions = { dateOrder: 'DMY', timeZone: 'Europe/Berlin' };

const READ: readonly { text: string; options?: AcquisitionTimeOptions; iso: string; form: string }[] = [
  { text: '2026-12-05T09:30:00+01:00', iso: '2026-12-05T08:30:00.000Z', form: 'iso' },
  { text: '2026-12-05T09:30:00Z', iso: '2026-12-05T09:30:00.000Z', form: 'iso' },
  { text: '2026-12-05T09:30:00.250-05:00', iso: '2026-12-05T14:30:00.250Z', form: 'iso' },
  { text: '2026-12-05 09:30', iso: '2026-12-05T09:30:00.000Z', form: 'iso' }, // no zone, none configured: UTC
  { text: '2026-12-05T09:30:00', options: { timeZone: 'Europe/Berlin' }, iso: '2026-12-05T08:30:00.000Z', form: 'iso' }, // Python zoneinfo: CET
  { text: '2026-07-05T09:30:00', options: { timeZone: 'Europe/Berlin' }, iso: '2026-07-05T07:30:00.000Z', form: 'iso' }, // Python zoneinfo: CEST
  { text: '2026-12-05T09:30', options: { timeZone: 'America/New_York' }, iso: '2026-12-05T14:30:00.000Z', form: 'iso' }, // Python zoneinfo: EST
  {
    text: '2026-12-05 09:30 UTC',
    options: { timeZone: 'Europe/Berlin' },
    iso: '2026-12-05T09:30:00.000Z',
    form: 'iso',
  }, // zone in the text wins
  { text: '20261205T093000Z', iso: '2026-12-05T09:30:00.000Z', form: 'iso' }, // ISO 8601 basic format
  { text: '2026/12/05 09:30:15', iso: '2026-12-05T09:30:15.000Z', form: 'year-first' },
  { text: '2024-02-29', iso: '2024-02-29T00:00:00.000Z', form: 'iso' }, // 2024 is a leap year
  { text: '05.12.2026 09:30', options: BERLIN_DMY, iso: '2026-12-05T08:30:00.000Z', form: 'day-month' }, // 5 December, not 12 May
  { text: '12/05/2026 9:30 PM', options: { dateOrder: 'MDY' }, iso: '2026-12-05T21:30:00.000Z', form: 'day-month' },
  { text: '13.05.2026', iso: '2026-05-13T00:00:00.000Z', form: 'day-month' }, // 13 can only be the day
  { text: '05/13/2026 08:00', iso: '2026-05-13T08:00:00.000Z', form: 'day-month' }, // 13 can only be the day
  { text: '07.07.2026', iso: '2026-07-07T00:00:00.000Z', form: 'day-month' }, // day = month: same either way
  { text: '5 Dec 2026 09:30', iso: '2026-12-05T09:30:00.000Z', form: 'month-name' },
  { text: 'Sat, Dec 5, 2026 09:30:00 GMT', iso: '2026-12-05T09:30:00.000Z', form: 'month-name' },
  { text: '05-December-2026', iso: '2026-12-05T00:00:00.000Z', form: 'month-name' },
  { text: '46361.395833333336', iso: '2026-12-05T09:30:00.000Z', form: 'excel-serial' }, // Python: 1899-12-30 + 46361.3958333 d
  { text: '46361', iso: '2026-12-05T00:00:00.000Z', form: 'excel-serial' }, // Python: 1899-12-30 + 46361 d
  {
    text: '46361.395833333336',
    options: { timeZone: 'Europe/Berlin' },
    iso: '2026-12-05T08:30:00.000Z',
    form: 'excel-serial',
  },
];

const REFUSED: readonly {
  text: string;
  options?: AcquisitionTimeOptions;
  code: 'DATE_AMBIGUOUS' | 'DATE_INVALID';
  says: RegExp;
}[] = [
  { text: '05.12.2026', code: 'DATE_AMBIGUOUS', says: /2026-12-05 \(day first\) or 2026-05-12 \(month first\)/ },
  { text: '05/12/2026 09:30', code: 'DATE_AMBIGUOUS', says: /day first/ },
  { text: '05.12.26', options: BERLIN_DMY, code: 'DATE_AMBIGUOUS', says: /2-digit year/ },
  { text: '05.12.2026', options: { dateOrder: 'YMD' }, code: 'DATE_AMBIGUOUS', says: /dateOrder is YMD/ },
  { text: '2026-12-05 25:00', code: 'DATE_INVALID', says: /hour 25/ },
  { text: '2026-12-05T24:00:00Z', code: 'DATE_INVALID', says: /hour 24/ },
  { text: '2026-12-05T09:60', code: 'DATE_INVALID', says: /minute 60/ },
  { text: '31.02.2026', options: BERLIN_DMY, code: 'DATE_INVALID', says: /day 31 does not exist in 2026-02/ },
  { text: '2026-02-29', code: 'DATE_INVALID', says: /day 29/ }, // 2026 is not a leap year
  { text: '05/13/2026', options: BERLIN_DMY, code: 'DATE_INVALID', says: /month 13/ }, // the stated order wins
  { text: '30.13.2026', code: 'DATE_INVALID', says: /neither field/ },
  { text: '13 Foo 2026', code: 'DATE_INVALID', says: /not a month name/ },
  { text: '2026-12-05T09:30+15:00', code: 'DATE_INVALID', says: /offset/ },
  { text: '13:00 PM 2026-12-05', code: 'DATE_INVALID', says: /not a date spelling/ },
  { text: '2026-12-05 13:00 PM', code: 'DATE_INVALID', says: /12-hour clock/ },
  { text: '12345678901', code: 'DATE_INVALID', says: /not a date spelling/ },
  { text: '3000000', code: 'DATE_INVALID', says: /Excel serial/ },
  { text: 'yesterday', code: 'DATE_INVALID', says: /not a date spelling/ },
];

describe('readAcquisitionTime', () => {
  it.each(READ)('reads "$text" as $iso', ({ text, options, iso, form }) => {
    const reading = readAcquisitionTime(text, options);
    expect(reading).toMatchObject({ ok: true, iso, form });
  });

  it.each(REFUSED)('refuses "$text" with $code and a hint', ({ text, options, code, says }) => {
    const reading = readAcquisitionTime(text, options);
    expect(reading.ok).toBe(false);
    if (reading.ok) return;
    expect(reading.code).toBe(code);
    expect(reading.message).toMatch(says);
    expect(reading.message).toContain(text);
    expect(reading.hint.length).toBeGreaterThan(20);
  });

  it('gives the ambiguous-date refusal the config keys that settle it', () => {
    const reading = readAcquisitionTime('05.12.2026');
    expect(!reading.ok && reading.hint).toMatch(/instrument\.dateOrder.*instrument\.timeZone/);
  });

  it('is the reader QC uses too: the same text gives the same instant, and ambiguous text none', () => {
    expect(parseIsoToEpochMs('2026-12-05T09:30:00+01:00')).toBe(Date.UTC(2026, 11, 5, 8, 30));
    expect(parseIsoToEpochMs('05.12.2026')).toBeUndefined();
    expect(parseIsoToEpochMs('2026-12-05 25:00')).toBeUndefined();
  });

  it('files by the local date of the lab zone (Python zoneinfo: 2026-12-05T23:30Z is 2026-12-06 in Berlin)', () => {
    expect(localDateOf(Date.UTC(2026, 11, 5, 23, 30), 'Europe/Berlin')).toBe('2026-12-06');
    expect(localDateOf(Date.UTC(2026, 11, 5, 23, 30))).toBe('2026-12-05');
    expect(localDateOf(Date.UTC(2026, 11, 5, 2, 0), '-05:00')).toBe('2026-12-04');
  });
});
