// Stern–Volmer analysis of a quenching series: K_SV from intensities, K_D from lifetimes, k_q, static vs
// dynamic mechanism, the combined model for upward curvature, and the diffusion-limit check.
import { z } from 'zod';
import { InputRejected } from '../model/errors.js';
import { resolveWithSchema } from '../spectra/options.js';
import { fitThroughOrigin, quadraticWithIntercept } from './linear-fit.js';
import { studentTUpperTail } from './student-t.js';
import { diffusionLimitPerMPerS, viscosityOf } from './viscosities.js';
import { itemAt } from '../model/item-at.js';

const sternVolmerOptionsSchema = z
  .object({
    /** 'auto' weights by 1/u² when ratio uncertainties are given, else ordinary least squares. */
    weighting: z.enum(['auto', 'ordinary', 'weighted']).default('auto'),
    /** One-sided significance level of the t test on the quadratic term of F0/F vs [Q] (default 0.01). */
    curvatureAlpha: z.number().positive().max(0.5).default(0.01),
    /** Sample temperature in K for the diffusion limit (default 298.15). */
    temperatureK: z.number().positive().default(298.15),
  })
  .strict();

/** User-facing options of sternVolmer. */
export type SternVolmerOptions = z.input<typeof sternVolmerOptionsSchema>;

/** Validates SternVolmerOptions, fills defaults, freezes. */
export function resolveSternVolmerOptions(
  options?: SternVolmerOptions,
): Readonly<z.output<typeof sternVolmerOptionsSchema>> {
  return resolveWithSchema(sternVolmerOptionsSchema, options, 'quench');
}

export interface QuenchSeriesInput {
  /** Quencher concentrations in M (one must be 0 when raw intensities or lifetimes are given). */
  readonly concentrationsM: readonly number[];
  /** F0/F at each concentration; or give `intensities` (F0 taken at [Q] = 0). */
  readonly intensityRatios?: readonly number[];
  readonly intensities?: readonly number[];
  /** Standard uncertainties of F0/F, for weighted least squares. */
  readonly intensityRatioUncertainties?: readonly number[];
  /** Lifetimes τ in ns at each concentration (τ0 at [Q] = 0). */
  readonly lifetimesNs?: readonly number[];
  /** Unquenched lifetime τ0 in ns when no lifetime series is given, and its standard uncertainty. */
  readonly tau0Ns?: number;
  readonly tau0UncertaintyNs?: number;
  readonly solvent?: string;
  readonly viscosityPaS?: number;
  readonly options?: SternVolmerOptions;
}

export type QuenchingMechanism = 'dynamic' | 'static' | 'combined' | 'undetermined';

export interface SternVolmerResult {
  /** Slope of F0/F − 1 vs [Q], M⁻¹, and its standard error. */
  readonly ksvPerM: number;
  readonly ksvStandardErrorPerM: number;
  /** Slope of τ0/τ − 1 vs [Q], M⁻¹ (dynamic constant), when lifetimes were given. */
  readonly kdPerM: number | undefined;
  readonly kdStandardErrorPerM: number | undefined;
  /** Static (association) constant of the combined model, M⁻¹. */
  readonly ksPerM: number | undefined;
  readonly tau0Ns: number | undefined;
  /** Bimolecular quenching constant k_q = K/τ0, M⁻¹s⁻¹ (K = K_D when lifetimes are given, else K_SV). */
  readonly kqPerMPerS: number | undefined;
  readonly kqStandardUncertaintyPerMPerS: number | undefined;
  readonly kqBasis: 'lifetimes' | 'intensities' | undefined;
  readonly mechanism: QuenchingMechanism;
  /** Relative curvature c2·[Q]max/c1 of F0/F = c0 + c1[Q] + c2[Q]² (free intercept), its t statistic and one-sided p-value. */
  readonly intensityCurvature: number | undefined;
  readonly intensityCurvatureT: number | undefined;
  readonly intensityCurvaturePValue: number | undefined;
  readonly diffusionLimitPerMPerS: number | undefined;
  readonly exceedsDiffusionLimit: boolean | undefined;
  readonly warnings: readonly string[];
}

function valueAtZero(concentrationsM: readonly number[], values: readonly number[], what: string): number {
  const index = concentrationsM.findIndex((c) => c === 0);
  const value = index < 0 ? undefined : values[index];
  if (value === undefined || !(value > 0))
    throw new InputRejected('INPUT_INVALID', `${what} needs a positive value at [Q] = 0`);
  return value;
}

/** Stern–Volmer fits through intercept 1: F0/F = 1 + K_SV[Q], τ0/τ = 1 + K_D[Q], k_q = K/τ0; combined (1 + K_D[Q])(1 + K_S[Q]) (IUPAC Gold Book; Lakowicz ch. 8). */
export function sternVolmer(input: QuenchSeriesInput): SternVolmerResult {
  const options = resolveSternVolmerOptions(input.options);
  const q = input.concentrationsM;
  const warnings: string[] = [];
  if (q.length < 3)
    throw new InputRejected('TOO_FEW_POINTS', `a quenching series needs at least 3 concentrations, got ${q.length}`);
  if (q.some((c) => !(c >= 0))) throw new InputRejected('INPUT_INVALID', 'quencher concentrations must be ≥ 0 M');
  let ratios: readonly number[];
  if (input.intensityRatios !== undefined) ratios = input.intensityRatios;
  else if (input.intensities !== undefined) {
    const intensities = input.intensities;
    const f0 = valueAtZero(q, intensities, 'the intensity series');
    ratios = intensities.map((f) => {
      if (!(f > 0)) throw new InputRejected('INPUT_INVALID', `an intensity is ${f}; F0/F needs positive intensities`);
      return f0 / f;
    });
  } else throw new InputRejected('MISSING_COLUMN', 'give F0/F ratios or intensities');
  const useWeights =
    options.weighting === 'weighted' ||
    (options.weighting === 'auto' && input.intensityRatioUncertainties !== undefined);
  if (useWeights && input.intensityRatioUncertainties === undefined)
    throw new InputRejected('MISSING_COLUMN', 'weighted fitting needs F0/F uncertainties');
  const weights = useWeights ? input.intensityRatioUncertainties?.map((u) => 1 / (u * u)) : undefined;
  const excess = ratios.map((r) => r - 1);
  const intensityFit = fitThroughOrigin(q, excess, weights, 'Stern–Volmer intensity series');
  // Curvature test on F0/F = c0 + c1[Q] + c2[Q]² with a free intercept: an error in F0 scales every ratio
  // alike (a change of c0, not curvature), and weights 1/(F0/F)² assume a constant relative error of F
  // (practice) unless uncertainties are given. One-sided t test on c2 > 0 with n − 3 degrees of freedom.
  const curvatureWeights = weights ?? ratios.map((r) => 1 / (r * r));
  const quadratic = quadraticWithIntercept(q, ratios, curvatureWeights);
  const curvaturePValue =
    quadratic === undefined ? undefined : studentTUpperTail(quadratic.c2TStatistic, quadratic.degreesOfFreedom);
  const curved = curvaturePValue !== undefined && curvaturePValue < options.curvatureAlpha;

  let kdPerM: number | undefined;
  let kdStandardErrorPerM: number | undefined;
  let tau0Ns = input.tau0Ns;
  let tau0UncertaintyNs = input.tau0UncertaintyNs ?? 0;
  if (input.lifetimesNs !== undefined) {
    const lifetimes = input.lifetimesNs;
    const fittedTau0Ns = valueAtZero(q, lifetimes, 'the lifetime series');
    tau0Ns = fittedTau0Ns;
    tau0UncertaintyNs = input.tau0UncertaintyNs ?? 0;
    const lifetimeFit = fitThroughOrigin(
      q,
      lifetimes.map((t) => fittedTau0Ns / t - 1),
      undefined,
      'Stern–Volmer lifetime series',
    );
    kdPerM = lifetimeFit.slope;
    kdStandardErrorPerM = lifetimeFit.slopeStandardError;
  }

  let mechanism: QuenchingMechanism = 'undetermined';
  let ksPerM: number | undefined;
  const ksv = intensityFit.slope;
  const ksvSe = intensityFit.slopeStandardError;
  if (kdPerM !== undefined && kdStandardErrorPerM !== undefined) {
    const kdSignificant = kdPerM > 2 * kdStandardErrorPerM && kdPerM > 0.05 * ksv;
    const difference = ksv - kdPerM;
    const differenceSe = Math.hypot(ksvSe, kdStandardErrorPerM);
    if (!kdSignificant && ksv > 0) mechanism = 'static';
    else if (Math.abs(difference) <= 2 * differenceSe || Math.abs(difference) <= 0.1 * Math.abs(ksv))
      mechanism = 'dynamic';
    else if (difference > 0) mechanism = 'combined';
    else warnings.push('lifetimes are quenched more than intensities; check the series (K_D > K_SV is not physical)');
    if (mechanism === 'combined' || mechanism === 'static') {
      const kd = mechanism === 'static' ? 0 : kdPerM;
      ksPerM = fitThroughOrigin(
        q,
        ratios.map((r, i) => r / (1 + kd * itemAt(q, i)) - 1),
        undefined,
        'static part',
      ).slope;
    }
  } else if (curved && quadratic !== undefined) {
    mechanism = 'combined';
    // F0/F = c0·(1 + (K_D + K_S)[Q] + K_D·K_S[Q]²): the two constants are the roots of t² − b1·t + b2 = 0, b = c/c0.
    const b1 = quadratic.c1 / quadratic.c0;
    const b2 = quadratic.c2 / quadratic.c0;
    const discriminant = b1 * b1 - 4 * b2;
    if (discriminant >= 0) {
      const r1 = (b1 + Math.sqrt(discriminant)) / 2;
      const r2 = (b1 - Math.sqrt(discriminant)) / 2;
      warnings.push(
        `upward curvature: the combined model gives constants ${r1.toPrecision(4)} and ${r2.toPrecision(4)} M⁻¹; lifetimes are needed to tell which is dynamic`,
      );
    } else warnings.push('upward curvature beyond the combined static–dynamic model (sphere-of-action quenching?)');
  } else {
    warnings.push('without lifetimes a linear Stern–Volmer plot cannot tell dynamic from static quenching');
  }
  if (curved && input.lifetimesNs !== undefined && mechanism === 'dynamic')
    warnings.push('the intensity plot curves upward although lifetimes agree; check the highest concentrations');

  const kqBasis = kdPerM !== undefined ? 'lifetimes' : tau0Ns !== undefined ? 'intensities' : undefined;
  const kForKq = kdPerM ?? ksv;
  const kForKqSe = kdStandardErrorPerM ?? ksvSe;
  let kqPerMPerS: number | undefined;
  let kqStandardUncertaintyPerMPerS: number | undefined;
  if (tau0Ns !== undefined && tau0Ns > 0) {
    const tau0S = tau0Ns * 1e-9;
    kqPerMPerS = kForKq / tau0S;
    kqStandardUncertaintyPerMPerS = Math.abs(kqPerMPerS) * Math.hypot(kForKqSe / kForKq, tau0UncertaintyNs / tau0Ns);
  } else warnings.push('τ0 unknown: k_q not computed (give lifetimes or tau0Ns)');

  let limit: number | undefined;
  const viscosityPaS =
    input.viscosityPaS ?? (input.solvent === undefined ? undefined : viscosityOf(input.solvent).viscosityPaS);
  if (viscosityPaS !== undefined) limit = diffusionLimitPerMPerS(options.temperatureK, viscosityPaS);
  const exceeds = limit === undefined || kqPerMPerS === undefined ? undefined : kqPerMPerS > limit;
  if (limit !== undefined && kqPerMPerS !== undefined && kqPerMPerS > limit) {
    warnings.push(
      `k_q = ${kqPerMPerS.toExponential(2)} M⁻¹s⁻¹ exceeds the diffusion limit ${limit.toExponential(2)}: static quenching or binding contributes`,
    );
  }
  return Object.freeze({
    ksvPerM: ksv,
    ksvStandardErrorPerM: ksvSe,
    kdPerM,
    kdStandardErrorPerM,
    ksPerM,
    tau0Ns,
    kqPerMPerS,
    kqStandardUncertaintyPerMPerS,
    kqBasis,
    mechanism,
    intensityCurvature:
      quadratic === undefined || quadratic.c1 === 0 ? undefined : (quadratic.c2 * Math.max(...q)) / quadratic.c1,
    intensityCurvatureT: quadratic?.c2TStatistic,
    intensityCurvaturePValue: curvaturePValue,
    diffusionLimitPerMPerS: limit,
    exceedsDiffusionLimit: exceeds,
    warnings: Object.freeze(warnings),
  });
}
