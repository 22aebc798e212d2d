// Config section `limits`: guards against runaway inputs.
import { z } from 'zod';

export const limitsSection = z
  .strictObject({
    maxFileBytes: z
      .number()
      .int()
      .min(1)
      .default(50 * 1024 * 1024)
      .describe('Larger files are quarantined (FILE_TOO_LARGE), in bytes. Default: 52428800 (50 MB)'),
  })
  .prefault({});

export type LimitsConfig = z.output<typeof limitsSection>;
