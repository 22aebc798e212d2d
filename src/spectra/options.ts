// Shared option resolution for the spectral and photophysical core: validate with zod, fill defaults, freeze.
import type { z } from 'zod';
import { ConfigInvalid } from '../model/errors.js';

/** Parses user options against `schema` (defaults filled), freezes the result; throws ConfigInvalid naming `configPath`. */
export function resolveWithSchema<Schema extends z.ZodType>(
  schema: Schema,
  input: unknown,
  configPath: string,
): Readonly<z.output<Schema>> {
  const parsed = schema.safeParse(input ?? {});
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    const where = issue === undefined || issue.path.length === 0 ? configPath : `${configPath}.${issue.path.join('.')}`;
    throw new ConfigInvalid(issue?.message ?? 'invalid options', { configPath: where });
  }
  return Object.freeze(parsed.data);
}
