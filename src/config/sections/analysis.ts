// Config section `analysis`: defaults for the lifetime fit, inner-filter correction and solvents.
import { z } from 'zod';

export const analysisSection = z
  .strictObject({
    components: z.union([z.literal(1), z.literal(2), z.literal(3), z.literal(4), z.literal('auto')]).default(1)
      .describe('Exponential components in the lifetime fit (1–4 or auto). Default: 1'),
    estimator: z.enum(['ml', 'lsq-neyman', 'lsq-pearson']).default('ml')
      .describe('Fit estimator: Poisson maximum likelihood or weighted least squares. Default: ml'),
    innerFilter: z.enum(['none', 'centred', 'geometric']).default('centred')
      .describe('Inner-filter correction form for emission spectra. Default: centred'),
    maxAbsorbanceForYield: z.number().positive().default(0.1)
      .describe('Warn when the absorbance at excitation exceeds this for a yield (base-10). Default: 0.1'),
    refractiveIndex: z.record(z.string(), z.number().min(1).max(3)).default({})
      .describe('Refractive index by solvent name (as written in the files), for yields. Default: {} (built-in table)'),
    defaultRefractiveIndex: z.number().min(1).max(3).default(1.333)
      .describe('Refractive index used when a solvent is unknown. Default: 1.333'),
  })
  .prefault({});

export type AnalysisConfig = z.output<typeof analysisSection>;
