// Config section `instrument`: detector correction curve, IRF validity and cuvette geometry.
import { z } from 'zod';

export const instrumentSection = z
  .strictObject({
    detectorCorrectionFile: z.string().min(1).optional()
      .describe('Spectral correction curve (wavelength, value) applied to every emission spectrum; relative to the config file. Default: none'),
    detectorCurveMeaning: z.enum(['from-header', 'multiply', 'divide']).default('from-header')
      .describe('What the detector curve holds: multiply (correction factors) or divide (relative response / sensitivity); from-header reads it from the curve\'s value column, unit or header and refuses the curve when they do not tell. Default: from-header'),
    irfValidityHours: z.number().min(0).default(24)
      .describe('An IRF is valid for pairing this long after it was recorded, in hours. Default: 24'),
    cuvette: z
      .strictObject({
        pathLengthCm: z.number().positive().default(1).describe('Absorbance path length in cm. Default: 1'),
        excitationWindowStartCm: z.number().min(0).default(0.4).describe('Start of the viewed zone along the excitation beam, in cm (geometric inner filter). Default: 0.4'),
        excitationWindowEndCm: z.number().positive().default(0.6).describe('End of the viewed zone along the excitation beam, in cm. Default: 0.6'),
      })
      .prefault({}),
  })
  .prefault({});

export type InstrumentConfig = z.output<typeof instrumentSection>;
