// Config section `rules`: the QC rule set (filled in by the QC module).
import { z } from 'zod';
import { isValidTimeZone } from '../../qc/time.js';

export const rulesSection = z
  .strictObject({
    file: z
      .string()
      .min(1)
      .optional()
      .describe('YAML rule set; relative to the config file. Default: the built-in rule set'),
    timeZone: z
      .string()
      .refine(isValidTimeZone, {
        error: 'expected an IANA time zone such as Europe/Berlin, or an offset such as +01:00',
      })
      .optional()
      .describe(
        "The lab's time zone for local-time rules (control-missing due times, weekdays); overrides the rule set's. Default: the rule set's timeZone (UTC in the built-in set)",
      ),
  })
  .prefault({});

export type RulesConfig = z.output<typeof rulesSection>;
