// The one reader of acquisition times. Every place that needs "when was this measured" (intake,
// pairing, QC history, filing by date) goes through readAcquisitionTime, so a date means the same
// instant everywhere. Pure: no clock, no environment; time zones through Intl (pure) or ±HH:MM.
//
// Read: ISO 8601 (extended and basic, with or without zone), year-first dates with / or . separators,
// day/month/year with . / or - separators (refused as DATE_AMBIGUOUS when both fields could be the
// month and the configured date order does not say), English month names, and Excel serial dates
// (1900 date system, the default of spreadsheet programs; common practice). Times without a zone are
// local wall-clock times of the configured zone (default UTC). Impossible dates and times (31.02.,
// 25:00, an offset beyond ±14:00) are refused as DATE_INVALID.

/** Order of day, month and year in numeric dates (config instrument.dateOrder). */
export type DateOrder = 'DMY' | 'MDY' | 'YMD';
export const DATE_ORDERS: readonly DateOrder[] = ['DMY', 'MDY', 'YMD'];

export interface AcquisitionTimeOptions {
  /** How numeric day/month dates are ordered; without it a date whose day and month could swap is refused. */
  readonly dateOrder?: DateOrder;
  /** IANA zone ("Europe/Berlin") or fixed offset ("+01:00") of times written without a zone; default UTC. */
  readonly timeZone?: string;
}

/** The spelling a time was read from. */
export type AcquisitionTimeForm = 'iso' | 'year-first' | 'day-month' | 'month-name' | 'excel-serial';

export type AcquisitionTimeReading =
  | {
      readonly ok: true;
      /** Milliseconds since 1970-01-01T00:00:00Z. */
      readonly epochMs: number;
      /** Canonical UTC ISO 8601 text ("2026-12-05T08:30:00.000Z"): the only form stored or passed on. */
      readonly iso: string;
      readonly form: AcquisitionTimeForm;
      /** Whether the zone came from the text itself or from the configured zone (or its UTC default). */
      readonly zone: 'text' | 'configured';
    }
  | {
      readonly ok: false;
      readonly code: 'DATE_AMBIGUOUS' | 'DATE_INVALID';
      /** What is wrong with the text, naming it. */
      readonly message: string;
      /** How to fix it. */
      readonly hint: string;
    };

const MONTH_NAMES = ['jan', 'feb', 'mar', 'apr', 'may', 'jun', 'jul', 'aug', 'sep', 'oct', 'nov', 'dec'] as const;
/** Excel 1900 serial of 1970-01-01 (25569); serials below 61 fall before Excel's phantom 1900-02-29. */
const EXCEL_EPOCH_SERIAL = 25_569;
const EXCEL_FIRST_SAFE_SERIAL = 61;
const EXCEL_LAST_SERIAL = 2_958_465; // 9999-12-31
const DAY_MS = 86_400_000;

const TIME = String.raw`(\d{1,2}):(\d{2})(?::(\d{2})(?:[.,](\d{1,9}))?)?(?:\s*([AaPp])\.?[Mm]\.?)?`;
const ZONE = String.raw`(?:\s*(Z|UTC|GMT|[+-]\d{2}(?::?\d{2})?))?`;
const ISO_EXTENDED = new RegExp(String.raw`^(\d{4})-(\d{2})-(\d{2})(?:[T\s]+${TIME}${ZONE})?$`, 'i');
const ISO_BASIC = /^(\d{4})(\d{2})(\d{2})(?:T(\d{2})(\d{2})(\d{2})?(?:[.,](\d{1,9}))?(Z|[+-]\d{2}(?:\d{2})?)?)?$/i;
const YEAR_FIRST = new RegExp(String.raw`^(\d{4})([/.])(\d{1,2})\2(\d{1,2})(?:[T\s,]+${TIME}${ZONE})?$`, 'i');
const DAY_MONTH = new RegExp(String.raw`^(\d{1,2})([./-])(\d{1,2})\2(\d{2,4})(?:[T\s,]+${TIME}${ZONE})?$`, 'i');
const DAY_NAME_YEAR = new RegExp(
  String.raw`^(\d{1,2})[\s-]+([A-Za-z]{3,9})\.?[\s-]+(\d{4})(?:[T\s,]+${TIME}${ZONE})?$`,
  'i',
);
const NAME_DAY_YEAR = new RegExp(
  String.raw`^([A-Za-z]{3,9})\.?\s+(\d{1,2}),?\s+(\d{4})(?:[T\s,]+${TIME}${ZONE})?$`,
  'i',
);
const EXCEL_SERIAL = /^(\d{5,7})(?:[.,](\d+))?$/;
const WEEKDAY_PREFIX = /^(?:mon|tue|wed|thu|fri|sat|sun)[a-z]*\.?,?\s+/i;

/** Days since 1970-01-01 of a proleptic Gregorian date (H. Hinnant, "chrono-Compatible Low-Level Date Algorithms", days_from_civil). O(1). */
export function daysFromCivil(year: number, month: number, day: number): number {
  const shiftedYear = month <= 2 ? year - 1 : year;
  const era = Math.floor(shiftedYear / 400);
  const yearOfEra = shiftedYear - era * 400;
  const dayOfYear = Math.floor((153 * (month + (month > 2 ? -3 : 9)) + 2) / 5) + day - 1;
  const dayOfEra = yearOfEra * 365 + Math.floor(yearOfEra / 4) - Math.floor(yearOfEra / 100) + dayOfYear;
  return era * 146097 + dayOfEra - 719468;
}

/** Days in a month of the proleptic Gregorian calendar (leap years per ISO 8601). */
function daysInMonth(year: number, month: number): number {
  if (month === 2) return (year % 4 === 0 && year % 100 !== 0) || year % 400 === 0 ? 29 : 28;
  return [4, 6, 9, 11].includes(month) ? 30 : 31;
}

/** ISO 8601 UTC text of epoch ms ("2026-12-05T08:30:00.000Z"), without the Date global. O(1). */
export function isoFromEpochMs(epochMs: number): string {
  const days = Math.floor(epochMs / DAY_MS);
  let rest = epochMs - days * DAY_MS;
  const hours = Math.floor(rest / 3_600_000);
  rest -= hours * 3_600_000;
  const minutes = Math.floor(rest / 60_000);
  rest -= minutes * 60_000;
  const seconds = Math.floor(rest / 1000);
  const millis = Math.round(rest - seconds * 1000);
  const pad = (value: number, width = 2): string => String(value).padStart(width, '0');
  return `${civilFromDays(days)}T${pad(hours)}:${pad(minutes)}:${pad(seconds)}.${pad(millis, 3)}Z`;
}

/** YYYY-MM-DD of a day count since 1970-01-01 (H. Hinnant's civil_from_days). O(1). */
export function civilFromDays(days: number): string {
  const shifted = days + 719468;
  const era = Math.floor(shifted / 146097);
  const dayOfEra = shifted - era * 146097;
  const yearOfEra = Math.floor(
    (dayOfEra - Math.floor(dayOfEra / 1460) + Math.floor(dayOfEra / 36524) - Math.floor(dayOfEra / 146096)) / 365,
  );
  const dayOfYear = dayOfEra - (365 * yearOfEra + Math.floor(yearOfEra / 4) - Math.floor(yearOfEra / 100));
  const monthIndex = Math.floor((5 * dayOfYear + 2) / 153);
  const day = dayOfYear - Math.floor((153 * monthIndex + 2) / 5) + 1;
  const month = monthIndex < 10 ? monthIndex + 3 : monthIndex - 9;
  const year = yearOfEra + era * 400 + (month <= 2 ? 1 : 0);
  return `${String(year).padStart(4, '0')}-${String(month).padStart(2, '0')}-${String(day).padStart(2, '0')}`;
}

const OFFSET_ZONE = /^(?:UTC|GMT)?([+-])(\d{2}):?(\d{2})$/i;
const offsetFormatters = new Map<string, Intl.DateTimeFormat>();

/** True when `zone` is "UTC", a fixed offset like "+01:00", or an IANA zone name Intl knows. */
export function isKnownTimeZone(zone: string): boolean {
  if (OFFSET_ZONE.test(zone) || zone.toUpperCase() === 'UTC') return true;
  try {
    new Intl.DateTimeFormat('en-US', { timeZone: zone });
    return true;
  } catch {
    return false;
  }
}

/** Offset in ms of `zone` from UTC at the instant `epochMs` (local = UTC + offset). */
function zoneOffsetMs(epochMs: number, zone: string): number {
  if (zone.toUpperCase() === 'UTC') return 0;
  const fixed = OFFSET_ZONE.exec(zone);
  if (fixed !== null) return (fixed[1] === '-' ? -1 : 1) * (Number(fixed[2]) * 60 + Number(fixed[3])) * 60_000;
  let formatter = offsetFormatters.get(zone);
  if (formatter === undefined) {
    formatter = new Intl.DateTimeFormat('en-US', {
      timeZone: zone,
      year: 'numeric',
      month: '2-digit',
      day: '2-digit',
      hour: '2-digit',
      minute: '2-digit',
      second: '2-digit',
      hourCycle: 'h23',
    });
    offsetFormatters.set(zone, formatter);
  }
  const parts: Record<string, number> = {};
  for (const part of formatter.formatToParts(epochMs)) parts[part.type] = Number(part.value);
  const localMs =
    daysFromCivil(parts['year'] ?? 1970, parts['month'] ?? 1, parts['day'] ?? 1) * DAY_MS +
    (parts['hour'] ?? 0) * 3_600_000 +
    (parts['minute'] ?? 0) * 60_000 +
    (parts['second'] ?? 0) * 1000;
  return localMs - Math.floor(epochMs / 1000) * 1000;
}

/** Epoch ms of a local wall-clock time (ms since 1970-01-01 as if UTC) in `zone`; DST resolved by a second pass. O(1). */
export function wallClockToEpochMs(wallMs: number, zone: string): number {
  const firstGuess = wallMs - zoneOffsetMs(wallMs, zone);
  return wallMs - zoneOffsetMs(firstGuess, zone);
}

/** Local calendar date (YYYY-MM-DD) of an instant in `zone` (default UTC): the day results are filed under. */
export function localDateOf(epochMs: number, zone = 'UTC'): string {
  return civilFromDays(Math.floor((epochMs + zoneOffsetMs(epochMs, zone)) / DAY_MS));
}

interface Fields {
  readonly year: number;
  readonly month: number;
  readonly day: number;
  readonly hour?: string | undefined;
  readonly minute?: string | undefined;
  readonly second?: string | undefined;
  readonly fraction?: string | undefined;
  readonly meridiem?: string | undefined;
  readonly zone?: string | undefined;
}

type Refusal = Extract<AcquisitionTimeReading, { ok: false }>;

function invalid(text: string, why: string, hint: string): Refusal {
  return {
    ok: false,
    code: 'DATE_INVALID',
    message: `acquisition time "${text}" is not a real date and time: ${why}`,
    hint,
  };
}

const WRITE_ISO = 'Write acquisition times as ISO 8601, e.g. 2026-12-05T09:30:00+01:00.';

/** Epoch ms of validated calendar and clock fields, or a refusal naming the impossible field. */
function toEpochMs(
  text: string,
  fields: Fields,
  options: AcquisitionTimeOptions,
): { epochMs: number; zone: 'text' | 'configured' } | Refusal {
  const { year, month, day } = fields;
  if (month < 1 || month > 12) return invalid(text, `month ${month} does not exist`, WRITE_ISO);
  if (day < 1 || day > daysInMonth(year, month))
    return invalid(text, `day ${day} does not exist in ${year}-${String(month).padStart(2, '0')}`, WRITE_ISO);
  let hour = Number(fields.hour ?? 0);
  const minute = Number(fields.minute ?? 0);
  const second = Number(fields.second ?? 0);
  if (fields.meridiem !== undefined) {
    if (hour < 1 || hour > 12) return invalid(text, `hour ${hour} does not exist on a 12-hour clock`, WRITE_ISO);
    hour = (hour % 12) + (fields.meridiem.toLowerCase() === 'p' ? 12 : 0);
  }
  if (hour > 23) return invalid(text, `hour ${hour} does not exist (00–23)`, WRITE_ISO);
  if (minute > 59) return invalid(text, `minute ${minute} does not exist (00–59)`, WRITE_ISO);
  if (second > 59) return invalid(text, `second ${second} does not exist (00–59)`, WRITE_ISO);
  const fractionMs = fields.fraction === undefined ? 0 : Math.round(Number(`0.${fields.fraction}`) * 1000);
  const wallMs =
    daysFromCivil(year, month, day) * DAY_MS + hour * 3_600_000 + minute * 60_000 + second * 1000 + fractionMs;
  const zone = fields.zone?.toUpperCase();
  if (zone === undefined) {
    const configured = options.timeZone ?? 'UTC';
    return { epochMs: wallClockToEpochMs(wallMs, configured), zone: 'configured' };
  }
  if (zone === 'Z' || zone === 'UTC' || zone === 'GMT') return { epochMs: wallMs, zone: 'text' };
  const digits = zone.replace(':', '');
  const offsetHours = Number(digits.slice(1, 3));
  const offsetMinutes = digits.length > 3 ? Number(digits.slice(3, 5)) : 0;
  if (offsetHours > 14 || offsetMinutes > 59)
    return invalid(text, `offset ${fields.zone ?? ''} does not exist (at most ±14:00)`, WRITE_ISO);
  const sign = digits.startsWith('-') ? -1 : 1;
  return { epochMs: wallMs - sign * (offsetHours * 60 + offsetMinutes) * 60_000, zone: 'text' };
}

/** Year, month, day of a numeric date written day/month/year or month/day/year; refuses what the order cannot settle. */
function orderDayMonth(
  text: string,
  first: number,
  second: number,
  yearText: string,
  options: AcquisitionTimeOptions,
): { month: number; day: number; year: number } | Refusal {
  if (yearText.length !== 4) {
    return {
      ok: false,
      code: 'DATE_AMBIGUOUS',
      message: `acquisition time "${text}" has a ${yearText.length}-digit year, which does not say its century`,
      hint: `Export dates with a four-digit year, or as ISO 8601 (2026-12-05T09:30:00).`,
    };
  }
  const year = Number(yearText);
  const order = options.dateOrder;
  if (order === 'DMY') return { day: first, month: second, year };
  if (order === 'MDY') return { month: first, day: second, year };
  if (order === 'YMD') {
    return {
      ok: false,
      code: 'DATE_AMBIGUOUS',
      message: `acquisition time "${text}" puts the year last, but instrument.dateOrder is YMD`,
      hint: 'Set instrument.dateOrder to DMY or MDY for this instrument, or export ISO 8601 dates.',
    };
  }
  if (first === second) return { day: first, month: second, year };
  if (first > 12 && second <= 12) return { day: first, month: second, year };
  if (second > 12 && first <= 12) return { month: first, day: second, year };
  if (first > 12 && second > 12) return invalid(text, 'neither field can be the month', WRITE_ISO);
  return {
    ok: false,
    code: 'DATE_AMBIGUOUS',
    message: `acquisition time "${text}" can be read as ${yearText}-${pad2(second)}-${pad2(first)} (day first) or ${yearText}-${pad2(first)}-${pad2(second)} (month first)`,
    hint: "State the instrument's date order in the config (instrument.dateOrder: DMY, MDY or YMD, with instrument.timeZone), or export ISO 8601 dates.",
  };
}

function pad2(value: number): string {
  return String(value).padStart(2, '0');
}

function monthOfName(name: string): number | undefined {
  const index = MONTH_NAMES.indexOf(name.slice(0, 3).toLowerCase() as (typeof MONTH_NAMES)[number]);
  if (index < 0) return undefined;
  const full =
    [
      'january',
      'february',
      'march',
      'april',
      'may',
      'june',
      'july',
      'august',
      'september',
      'october',
      'november',
      'december',
    ][index] ?? '';
  const lower = name.toLowerCase();
  return lower.length === 3 || full.startsWith(lower) || (index === 8 && lower === 'sept') ? index + 1 : undefined;
}

/**
 * Reads an acquisition time as written by an instrument or a spreadsheet into one instant (ISO 8601;
 * Gregorian calendar via H. Hinnant's days_from_civil; Excel 1900 serial dates, common practice).
 * Refuses ambiguous day/month text (DATE_AMBIGUOUS) unless options.dateOrder settles it, and
 * impossible dates or times (DATE_INVALID). Zone-less times are local to options.timeZone (default UTC). O(length).
 */
export function readAcquisitionTime(
  raw: string | number,
  options: AcquisitionTimeOptions = {},
): AcquisitionTimeReading {
  const text = typeof raw === 'number' ? String(raw) : raw.trim();
  const done = (fields: Fields | Refusal, form: AcquisitionTimeForm): AcquisitionTimeReading => {
    if ('ok' in fields) return fields;
    const instant = toEpochMs(text, fields, options);
    if ('ok' in instant) return instant;
    return { ok: true, epochMs: instant.epochMs, iso: isoFromEpochMs(instant.epochMs), form, zone: instant.zone };
  };
  let match = ISO_EXTENDED.exec(text);
  if (match !== null) {
    const [, y, mo, d, h, mi, s, f, mer, z] = match;
    return done(
      {
        year: Number(y),
        month: Number(mo),
        day: Number(d),
        hour: h,
        minute: mi,
        second: s,
        fraction: f,
        meridiem: mer,
        zone: z,
      },
      'iso',
    );
  }
  match = ISO_BASIC.exec(text);
  if (match !== null) {
    const [, y, mo, d, h, mi, s, f, z] = match;
    return done(
      { year: Number(y), month: Number(mo), day: Number(d), hour: h, minute: mi, second: s, fraction: f, zone: z },
      'iso',
    );
  }
  match = YEAR_FIRST.exec(text);
  if (match !== null) {
    const [, y, , mo, d, h, mi, s, f, mer, z] = match;
    return done(
      {
        year: Number(y),
        month: Number(mo),
        day: Number(d),
        hour: h,
        minute: mi,
        second: s,
        fraction: f,
        meridiem: mer,
        zone: z,
      },
      'year-first',
    );
  }
  match = DAY_MONTH.exec(text);
  if (match !== null) {
    const [, a, , b, y, h, mi, s, f, mer, z] = match;
    const date = orderDayMonth(text, Number(a), Number(b), y ?? '', options);
    return done(
      'ok' in date ? date : { ...date, hour: h, minute: mi, second: s, fraction: f, meridiem: mer, zone: z },
      'day-month',
    );
  }
  const named = text.replace(WEEKDAY_PREFIX, '');
  match = DAY_NAME_YEAR.exec(named) ?? null;
  const dayFirst = match !== null;
  match ??= NAME_DAY_YEAR.exec(named);
  if (match !== null) {
    const [, p, q, y, h, mi, s, f, mer, z] = match;
    const month = monthOfName((dayFirst ? q : p) ?? '');
    if (month === undefined) return invalid(text, `"${dayFirst ? q : p}" is not a month name`, WRITE_ISO);
    return done(
      {
        year: Number(y),
        month,
        day: Number(dayFirst ? p : q),
        hour: h,
        minute: mi,
        second: s,
        fraction: f,
        meridiem: mer,
        zone: z,
      },
      'month-name',
    );
  }
  match = EXCEL_SERIAL.exec(text);
  if (match !== null) {
    const serial = Number(`${match[1]}.${match[2] ?? '0'}`);
    if (serial < EXCEL_FIRST_SAFE_SERIAL || serial > EXCEL_LAST_SERIAL) {
      return invalid(
        text,
        'as an Excel serial date it falls outside 1900-03-01 … 9999-12-31',
        'Format the spreadsheet cell as a date (ISO 8601) before exporting.',
      );
    }
    const wallMs = Math.round((serial - EXCEL_EPOCH_SERIAL) * DAY_MS);
    const epochMs = wallClockToEpochMs(wallMs, options.timeZone ?? 'UTC');
    return { ok: true, epochMs, iso: isoFromEpochMs(epochMs), form: 'excel-serial', zone: 'configured' };
  }
  return invalid(
    text,
    'it is not a date spelling driftlight reads',
    `${WRITE_ISO} docs/formats.md lists the spellings read.`,
  );
}

/** Epoch ms of an acquisition time read with default options (no date order, UTC), or undefined when refused. */
export function acquisitionEpochMs(text: string): number | undefined {
  const reading = readAcquisitionTime(text);
  return reading.ok ? reading.epochMs : undefined;
}
