// Options of fitDecay and globalFit: the user-facing partial type and the one resolver that validates
// (zod), fills defaults and freezes. Every option's unit and default is documented here, once.
import { z } from 'zod';
import { ConfigInvalid } from '../model/errors.js';
import { ESTIMATORS, type Estimator } from './estimators.js';
import { PARAMETER_NAMES, type ParameterName } from './parameters.js';

export type ComponentChoice = 1 | 2 | 3 | 4 | 'auto';

/** Options a caller writes; every field is optional. */
export interface FitDecayOptions {
  /** Number of exponentials 1–4, or 'auto' (1–3 chosen by BIC and residual tests). Default 1. */
  readonly components?: ComponentChoice | undefined;
  /** 'ml' (Poisson deviance), 'lsq-neyman' (weights 1/max(n,1)) or 'lsq-pearson' (weights 1/m). Default 'ml'. */
  readonly estimator?: Estimator | undefined;
  /** Fit range [startNs, endNs] on the channel start times, inclusive. Default: from the IRF rise (or the decay peak without IRF) to the end of the data. */
  readonly rangeNs?: readonly [number, number] | undefined;
  /** Parameters held at a value, e.g. { tau1Ns: 3.9 } (units as in the parameter name). Default none; scatter is fixed at 0 unless `scatter`. */
  readonly fixed?: Partial<Record<ParameterName, number>> | undefined;
  /** Bounds [min, max] per parameter. Defaults: τ in [Δ/50, 1000·window] ns, component photons ≥ 0, background ≥ 0 (with a repetition rate and τ > 0.4 × the period: refitted unbounded below, the model kept > 0 in every channel; given bounds hold without a refit), shift within ±max(10Δ, 2·FWHM). */
  readonly bounds?: Partial<Record<ParameterName, readonly [number, number]>> | undefined;
  /** globalFit only: parameters shared by all decays. Default every lifetime. A single decay has nothing to link. */
  readonly links?: readonly ParameterName[] | undefined;
  /** IRF counts on the decay's channels; overrides decay.irfCounts. Without any IRF the tail is fitted. */
  readonly irfCounts?: ArrayLike<number> | undefined;
  /** Excitation repetition rate in Hz; overrides metadata. When known, earlier pulses are modelled. */
  readonly repetitionRateHz?: number | undefined;
  /** Apply the Coates pile-up correction before fitting (needs collection time and repetition rate). Default false. */
  readonly pileUpCorrection?: boolean | undefined;
  /** Start-value sets for 2+ components (true = 4, false = 1): peeled lifetimes, then spreads ranked by the objective at the start; the next is tried while the fit is not clean; the lowest objective wins. Default 4. */
  readonly multiStart?: number | boolean | undefined;
  /** Fit a scatter term (a fraction of the IRF added to the model). Default false. */
  readonly scatter?: boolean | undefined;
  /** Confidence level of the profile intervals (0.6827 ↔ Δdeviance = 1). Default 0.6827. */
  readonly confidenceLevel?: number | undefined;
  /** Compute profile (support-plane) intervals for each free lifetime. Default true. */
  readonly profileIntervals?: boolean | undefined;
  /** Iteration cap of the Levenberg–Marquardt loop. Default 200. */
  readonly maxIterations?: number | undefined;
  /** IRF within a channel: 'second-order' (Catmull–Rom shift and Δ²/12 flat-channel correction, bias O(Δ⁴)) or 'flat' (piecewise-constant IRF, linear shift, bias O(Δ²)); docs/decay.md. Default 'second-order'. */
  readonly irfWithinChannel?: 'flat' | 'second-order' | undefined;
}

const parameterName = z.enum(PARAMETER_NAMES as [ParameterName, ...ParameterName[]]);
const arrayLikeOfNumbers = z.custom<ArrayLike<number>>(
  (value) => value instanceof Float64Array || (Array.isArray(value) && value.every((item) => typeof item === 'number')),
  { message: 'expected an array of numbers' },
);

const schema = z
  .object({
    components: z.union([z.literal(1), z.literal(2), z.literal(3), z.literal(4), z.literal('auto')]).default(1),
    estimator: z.enum(ESTIMATORS).default('ml'),
    rangeNs: z
      .tuple([z.number(), z.number()])
      .refine(([start, end]) => end > start, { message: 'rangeNs must be [startNs, endNs] with endNs > startNs' })
      .optional(),
    fixed: z.partialRecord(parameterName, z.number().refine(Number.isFinite, 'must be finite')).default({}),
    bounds: z
      .partialRecord(
        parameterName,
        z
          .tuple([z.number(), z.number()])
          .refine(([low, high]) => high >= low, { message: 'bounds must be [min, max] with max ≥ min' }),
      )
      .default({}),
    links: z.array(parameterName).optional(),
    irfCounts: arrayLikeOfNumbers.optional(),
    repetitionRateHz: z.number().positive().optional(),
    pileUpCorrection: z.boolean().default(false),
    multiStart: z
      .union([z.number().int().min(1).max(8), z.boolean()])
      .default(4)
      .transform((value) => (value === true ? 4 : value === false ? 1 : value)),
    scatter: z.boolean().default(false),
    confidenceLevel: z.number().gt(0).lt(1).default(0.6827),
    profileIntervals: z.boolean().default(true),
    maxIterations: z.number().int().min(1).max(10_000).default(200),
    irfWithinChannel: z.enum(['flat', 'second-order']).default('second-order'),
  })
  .strict();

export type ResolvedFitDecayOptions = Readonly<z.output<typeof schema>>;

/** Validates fit options, fills defaults and freezes them; throws ConfigInvalid naming the option path. */
export function resolveFitDecayOptions(
  options: FitDecayOptions | undefined,
  configPath = 'fitDecay',
): ResolvedFitDecayOptions {
  const parsed = schema.safeParse(options ?? {});
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    const where = issue === undefined || issue.path.length === 0 ? configPath : `${configPath}.${issue.path.join('.')}`;
    throw new ConfigInvalid(issue?.message ?? 'invalid fit options', { configPath: where });
  }
  return Object.freeze(parsed.data);
}
