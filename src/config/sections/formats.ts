// Config section `formats`: instrument profiles that declare, per file pattern, a layout the
// sniffing cannot settle (docs/formats.md "Instrument profiles"). The profile schema lives with
// the readers (src/formats/profile.ts); this section lists them.
import { z } from 'zod';
import { formatProfileSchema } from '../../formats/index.js';

export const formatsSection = z
  .strictObject({
    profiles: z
      .array(formatProfileSchema)
      .default([])
      .describe(
        "Instrument profiles, tried in order; the first whose match pattern fits a file name fixes that file's layout (see docs/formats.md). Default: [] (every layout sniffed)",
      ),
  })
  .prefault({});

export type FormatsConfig = z.output<typeof formatsSection>;
