// Config section `references`: which sample ids are reference standards, and which standard.
import { z } from 'zod';

export const referenceEntry = z.strictObject({
  id: z.string().min(1).describe('Name of this reference entry.'),
  sampleIdPattern: z
    .string()
    .min(1)
    .describe('Regular expression matched against sample ids; a match makes the set a reference-standard set.'),
  standardId: z
    .string()
    .min(1)
    .describe('Id of the standard in the built-in standards table (or your own name with quantumYield set).'),
  quantumYield: z
    .number()
    .gt(0, { error: 'expected a number between 0 and 1' })
    .max(1, { error: 'expected a number between 0 and 1' })
    .optional()
    .describe('Quantum yield of the standard, overriding the table. Default: from the table'),
  quantumYieldStdUncertainty: z
    .number()
    .min(0)
    .optional()
    .describe('Standard uncertainty of that yield. Default: from the table'),
  refractiveIndex: z
    .number()
    .min(1)
    .max(3)
    .optional()
    .describe("Refractive index of the standard's solvent. Default: from the table"),
});

export const referencesSection = z
  .array(referenceEntry)
  .default([])
  .describe('Reference standards measured in the lab. Default: []');

export type ReferenceConfig = z.output<typeof referenceEntry>;
