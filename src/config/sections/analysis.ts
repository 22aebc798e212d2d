// Config section `analysis`: defaults for the lifetime fit, inner-filter correction and solvents.
import { z } from 'zod';

export const analysisSection = z
  .strictObject({
    components: z
      .union([z.literal(1), z.literal(2), z.literal(3), z.literal(4), z.literal('auto')])
      .default(1)
      .describe('Exponential components in the lifetime fit (1–4 or auto). Default: 1'),
    estimator: z
      .enum(['ml', 'lsq-neyman', 'lsq-pearson'])
      .default('ml')
      .describe('Fit estimator: Poisson maximum likelihood or weighted least squares. Default: ml'),
    scatter: z
      .boolean()
      .default(false)
      .describe('Fit a scatter term (a fraction of the IRF added to the decay model) in lifetime fits. Default: false'),
    pileUpCorrection: z
      .boolean()
      .default(false)
      .describe(
        'Apply the Coates pile-up correction to decays before fitting (needs the collection time and the repetition rate). Default: false',
      ),
    innerFilter: z
      .enum(['none', 'centred', 'geometric'])
      .default('centred')
      .describe('Inner-filter correction form for emission spectra. Default: centred'),
    maxAbsorbanceForYield: z
      .number()
      .positive()
      .default(0.1)
      .describe('Warn when the absorbance at excitation exceeds this for a yield (base-10). Default: 0.1'),
    refractiveIndex: z
      .record(z.string(), z.number().min(1).max(3))
      .default({})
      .describe('Refractive index by solvent name (as written in the files), for yields. Default: {} (built-in table)'),
    defaultRefractiveIndex: z
      .number()
      .min(1)
      .max(3)
      .default(1.333)
      .describe('Refractive index used when a solvent is unknown. Default: 1.333'),
    yieldWindowNm: z
      .array(z.number().positive())
      .length(2)
      .refine((w) => (w[1] ?? 0) > (w[0] ?? 0), { message: 'yieldWindowNm needs [from, to] with from < to' })
      .optional()
      .describe(
        'Integration window of both emission spectra for a yield, [from, to] in nm (two numbers). Default: the range common to sample and reference, scatterExclusionNm away from the excitation line and its second order',
      ),
    scatterExclusionNm: z
      .number()
      .nonnegative()
      .default(15)
      .describe(
        'Distance in nm kept from the excitation wavelength and from twice it (Rayleigh line, second order) by the default yield window (common practice). Default: 15',
      ),
    bandEdgeFraction: z
      .number()
      .positive()
      .max(1)
      .default(0.1)
      .describe(
        'A band whose value at either edge of the yield window exceeds this fraction of its peak is not back to baseline (scan cut short). Default: 0.1',
      ),
    bandEdgeAction: z
      .enum(['refuse', 'flag'])
      .default('refuse')
      .describe(
        'What a band not back to baseline does to the yield: refuse (yield missing with the reason) or flag (yield reported with a flag). Default: refuse',
      ),
  })
  .prefault({});

export type AnalysisConfig = z.output<typeof analysisSection>;
