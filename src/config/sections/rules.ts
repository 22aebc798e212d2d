// Config section `rules`: the QC rule set (filled in by the QC module).
import { z } from 'zod';

export const rulesSection = z
  .looseObject({
    file: z.string().min(1).optional().describe('YAML rule set; relative to the config file. Default: the built-in rule set'),
  })
  .prefault({});

export type RulesConfig = z.output<typeof rulesSection>;
