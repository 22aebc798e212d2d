// Config section `digest`: the daily digest (HTML with charts, Markdown, JSON and an optional CSV under
// results/digest/), when it is built, for which time zone, and whether it is e-mailed.
import { z } from 'zod';
import { isValidTimeZone } from '../../qc/time.js';

export const digestSection = z
  .strictObject({
    enabled: z
      .boolean()
      .default(false)
      .describe(
        'Build the digest every day at `time` while `driftlight watch` runs (and catch up a missed one at start). `driftlight digest --date` works either way. Default: false',
      ),
    time: z
      .string()
      .regex(/^([01]\d|2[0-3]):[0-5]\d$/, { error: 'expected a local time HH:MM such as 07:00' })
      .default('07:00')
      .describe('Local time (HH:MM, 24 h) the digest of the previous day is built. Default: 07:00'),
    timeZone: z
      .string()
      .refine(isValidTimeZone, {
        error: 'expected an IANA time zone such as Europe/Berlin, or an offset such as +01:00',
      })
      .optional()
      .describe(
        "Time zone of `time` and of the day a digest covers (IANA name or ±HH:MM). Default: rules.timeZone (the rule set's zone)",
      ),
    historyDays: z
      .number()
      .int()
      .min(1)
      .max(3650)
      .default(60)
      .describe("Days of history in the digest's control charts and instrument trends. Default: 60"),
    dailyCsv: z
      .boolean()
      .default(true)
      .describe(
        "Also write the day's summary table (as `driftlight export`) as results/digest/DATE.csv. Default: true",
      ),
    emailChannel: z
      .string()
      .min(1)
      .optional()
      .describe(
        'Id of an `alerts.channels` entry of type email: the digest is sent through it (HTML with a plain-text part). Default: none (not e-mailed)',
      ),
  })
  .prefault({});

export type DigestConfig = z.output<typeof digestSection>;
