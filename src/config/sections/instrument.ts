// Config section `instrument`: detector correction curve, IRF validity, cuvette geometry and how the
// instrument writes acquisition times (date order, time zone).
import { z } from 'zod';
import { isKnownTimeZone } from '../../model/acquisition-time.js';

export const instrumentSection = z
  .strictObject({
    detectorCorrectionFile: z
      .string()
      .min(1)
      .optional()
      .describe(
        'Spectral correction curve (wavelength, value) applied to every emission spectrum; relative to the config file. Default: none',
      ),
    detectorCurveMeaning: z
      .enum(['from-header', 'multiply', 'divide'])
      .default('from-header')
      .describe(
        "What the detector curve holds: multiply (correction factors) or divide (relative response / sensitivity); from-header reads it from the curve's value column, unit or header and refuses the curve when they do not tell. Default: from-header",
      ),
    dateOrder: z
      .enum(['DMY', 'MDY', 'YMD'])
      .optional()
      .describe(
        "Order of day, month and year in the instrument's numeric dates: DMY (05.12.2026 = 5 December), MDY (12/05/2026 = 5 December) or YMD. Without it a date whose day and month could be swapped is refused (DATE_AMBIGUOUS). Default: none (ISO 8601 and unambiguous dates only)",
      ),
    timeZone: z
      .string()
      .refine(isKnownTimeZone, {
        error: 'expected an IANA time zone such as Europe/Berlin, or an offset such as +01:00',
      })
      .default('UTC')
      .describe(
        'Time zone of acquisition times written without one (IANA name such as Europe/Berlin, or +01:00); results and outbox are filed by the acquisition date in this zone. Default: UTC',
      ),
    repetitionRateMHz: z
      .number()
      .positive()
      .optional()
      .describe(
        'Excitation repetition rate of this instrument in MHz, used for decays whose file does not state one (earlier pulses are then modelled). Default: none (a decay whose tail has not died out by the end of the window is flagged)',
      ),
    irfValidityHours: z
      .number()
      .min(0)
      .default(24)
      .describe('An IRF is valid for pairing this long after it was recorded, in hours. Default: 24'),
    cuvette: z
      .strictObject({
        pathLengthCm: z.number().positive().default(1).describe('Absorbance path length in cm. Default: 1'),
        excitationWindowStartCm: z
          .number()
          .min(0)
          .default(0.4)
          .describe('Start of the viewed zone along the excitation beam, in cm (geometric inner filter). Default: 0.4'),
        excitationWindowEndCm: z
          .number()
          .positive()
          .default(0.6)
          .describe('End of the viewed zone along the excitation beam, in cm. Default: 0.6'),
      })
      .prefault({}),
  })
  .prefault({});

export type InstrumentConfig = z.output<typeof instrumentSection>;
