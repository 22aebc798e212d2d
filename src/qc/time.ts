// Clock-free time arithmetic for the pure core: ISO 8601 parsing to epoch ms and local wall-clock
// parts in an IANA zone (through Intl, which is pure) or a fixed ±HH:MM offset.

import { acquisitionEpochMs, civilFromDays, daysFromCivil } from '../model/acquisition-time.js';
import { itemAt } from '../model/item-at.js';

export { civilFromDays, daysFromCivil };

/** Epoch ms of a date-time read by the one acquisition-time reader (src/model/acquisition-time.ts; no offset means UTC); undefined if unreadable or ambiguous. */
export function parseIsoToEpochMs(text: string): number | undefined {
  return acquisitionEpochMs(text);
}

/** Epoch ms of an ISO string, throwing RangeError naming `what` when it cannot be read. */
export function requireEpochMs(text: string, what: string): number {
  const epochMs = parseIsoToEpochMs(text);
  if (epochMs === undefined) throw new RangeError(`${what} is not an ISO 8601 date-time: "${text}"`);
  return epochMs;
}

/** Wall-clock parts of an instant in a zone. */
export interface LocalParts {
  /** Local calendar date as YYYY-MM-DD. */
  readonly date: string;
  /** Minutes since local midnight. */
  readonly minuteOfDay: number;
  /** Day of week, 'mon' … 'sun'. */
  readonly weekday: Weekday;
}

export const WEEKDAYS = ['mon', 'tue', 'wed', 'thu', 'fri', 'sat', 'sun'] as const;
export type Weekday = (typeof WEEKDAYS)[number];

const OFFSET_PATTERN = /^(?:UTC)?([+-])(\d{2}):?(\d{2})$/;

/** True when `zone` is an IANA zone name Intl knows, "UTC", or a fixed offset like "+01:00". */
export function isValidTimeZone(zone: string): boolean {
  if (OFFSET_PATTERN.test(zone)) return true;
  try {
    new Intl.DateTimeFormat('en-US', { timeZone: zone });
    return true;
  } catch {
    return false;
  }
}

const formatterCache = new Map<string, Intl.DateTimeFormat>();

/** Local date, minute of day and weekday of `epochMs` in `zone` (IANA via Intl, or ±HH:MM). O(1). */
export function localParts(epochMs: number, zone: string): LocalParts {
  const offset = OFFSET_PATTERN.exec(zone);
  if (offset !== null) {
    const [, sign, hours, minutes] = offset;
    const offsetMs = (sign === '-' ? -1 : 1) * (Number(hours) * 60 + Number(minutes)) * 60_000;
    return utcParts(epochMs + offsetMs);
  }
  let formatter = formatterCache.get(zone);
  if (formatter === undefined) {
    formatter = new Intl.DateTimeFormat('en-US', {
      timeZone: zone,
      year: 'numeric',
      month: '2-digit',
      day: '2-digit',
      hour: '2-digit',
      minute: '2-digit',
      hourCycle: 'h23',
    });
    formatterCache.set(zone, formatter);
  }
  const parts: Record<string, string> = {};
  for (const part of formatter.formatToParts(epochMs)) parts[part.type] = part.value;
  const year = Number(parts['year']);
  const month = Number(parts['month']);
  const day = Number(parts['day']);
  const wallClockMs =
    daysFromCivil(year, month, day) * 86_400_000 + Number(parts['hour']) * 3_600_000 + Number(parts['minute']) * 60_000;
  return utcParts(wallClockMs);
}

/** Parts of an instant read as UTC wall-clock time. */
function utcParts(wallClockMs: number): LocalParts {
  const days = Math.floor(wallClockMs / 86_400_000);
  const minuteOfDay = Math.floor((wallClockMs - days * 86_400_000) / 60_000);
  // 1970-01-01 was a Thursday (index 3 in WEEKDAYS).
  const weekday = itemAt(WEEKDAYS, (((days + 3) % 7) + 7) % 7);
  return { date: civilFromDays(days), minuteOfDay, weekday };
}

/** "HH:MM" → minutes since midnight, or undefined when malformed. */
export function parseClockTime(text: string): number | undefined {
  const match = /^(\d{2}):(\d{2})$/.exec(text);
  if (match === null) return undefined;
  const hours = Number(match[1]);
  const minutes = Number(match[2]);
  return hours < 24 && minutes < 60 ? hours * 60 + minutes : undefined;
}

/** ISO 8601 UTC text ("2026-12-01T09:30:00.000Z") of epoch ms, without the Date global. O(1). */
export function epochMsToIso(epochMs: number): string {
  const days = Math.floor(epochMs / 86_400_000);
  let rest = epochMs - days * 86_400_000;
  const hours = Math.floor(rest / 3_600_000);
  rest -= hours * 3_600_000;
  const minutes = Math.floor(rest / 60_000);
  rest -= minutes * 60_000;
  const seconds = Math.floor(rest / 1000);
  const millis = Math.round(rest - seconds * 1000);
  const pad = (value: number, width = 2): string => String(value).padStart(width, '0');
  return `${civilFromDays(days)}T${pad(hours)}:${pad(minutes)}:${pad(seconds)}.${pad(millis, 3)}Z`;
}

/** Epoch ms of a local wall-clock time (date YYYY-MM-DD, minute of day) in `zone`, resolving DST by a second pass. O(1). */
export function zonedTimeToEpochMs(date: string, minuteOfDay: number, zone: string): number {
  const [year, month, day] = date.split('-').map(Number);
  const wallMs = daysFromCivil(year ?? 1970, month ?? 1, day ?? 1) * 86_400_000 + minuteOfDay * 60_000;
  const offsetAt = (epochMs: number): number => {
    const local = localParts(epochMs, zone);
    const [y, m, d] = local.date.split('-').map(Number);
    const localWallMs = daysFromCivil(y ?? 1970, m ?? 1, d ?? 1) * 86_400_000 + local.minuteOfDay * 60_000;
    return localWallMs - Math.floor(epochMs / 60_000) * 60_000;
  };
  const firstGuess = wallMs - offsetAt(wallMs);
  return wallMs - offsetAt(firstGuess);
}
