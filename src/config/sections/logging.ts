// Config section `logging`: pino NDJSON to a file and to stdout.
import { z } from 'zod';

export const loggingSection = z
  .strictObject({
    level: z
      .enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent'])
      .default('info')
      .describe('Lowest level written. Default: info'),
    file: z
      .string()
      .min(1)
      .default('driftlight.log')
      .describe('Log file (NDJSON); relative paths resolve against the state folder. Default: driftlight.log'),
    stdout: z
      .enum(['auto', 'json', 'pretty', 'off'])
      .default('auto')
      .describe('Log to stdout: auto = pretty on a terminal, JSON otherwise. Default: auto'),
  })
  .prefault({});

export type LoggingConfig = z.output<typeof loggingSection>;
