// Relative (single-point) fluorescence quantum yield against a standard, with a GUM uncertainty budget.
import { z } from 'zod';
import { AnalysisFailed, InputRejected } from '../model/errors.js';
import { formatSignificant } from '../model/format-number.js';
import { resolveWithSchema } from '../spectra/options.js';
import { absorptanceFromAbsorbance, absorptanceSlope } from './absorptance.js';
import { combineUncertainty, type BudgetInput, type BudgetLine } from './uncertainty-budget.js';

const relativeYieldOptionsSchema = z
  .object({
    /** 'absorptance' uses f = 1 − 10^(−A) (Brouwer 2011); 'absorbance' uses A itself (dilute limit). Default 'absorptance'. */
    lightAbsorbed: z.enum(['absorptance', 'absorbance']).default('absorptance'),
    /** Warn when an absorbance at excitation exceeds this (default 0.05; Brouwer 2011 / practice). */
    absorbanceWarnLimit: z.number().positive().default(0.05),
    /** Refuse when an absorbance at excitation exceeds this (default 0.1, the looser convention; practice). */
    absorbanceRefuseLimit: z.number().positive().default(0.1),
    /** u(A) used when none is given, absorbance units (default 0.001: photometric repeatability, practice). */
    defaultAbsorbanceUncertainty: z.number().nonnegative().default(0.001),
    /** u(n) used when none is given (default 0.0005, see refractive-indices.ts). */
    defaultRefractiveIndexUncertainty: z.number().nonnegative().default(0.0005),
  })
  .strict();

/** User-facing options of relativeQuantumYield. */
export type RelativeYieldOptions = z.input<typeof relativeYieldOptionsSchema>;

/** Validates RelativeYieldOptions, fills defaults, freezes. */
export function resolveRelativeYieldOptions(
  options?: RelativeYieldOptions,
): Readonly<z.output<typeof relativeYieldOptionsSchema>> {
  return resolveWithSchema(relativeYieldOptionsSchema, options, 'quantumYield');
}

/** Standard uncertainties of the inputs (same units as the inputs); omitted ones use the option defaults or are reported as not stated. */
export interface RelativeYieldUncertainties {
  readonly referenceYield?: number;
  readonly sampleIntegral?: number;
  readonly referenceIntegral?: number;
  readonly sampleAbsorbance?: number;
  readonly referenceAbsorbance?: number;
  readonly sampleRefractiveIndex?: number;
  readonly referenceRefractiveIndex?: number;
  /** Relative standard uncertainty of the detector-correction ratio between the two emission ranges (e.g. 0.02). */
  readonly detectorCorrectionRelative?: number;
}

export interface RelativeYieldInput {
  /** Integrated, corrected emission of the sample (any unit, same as the reference). */
  readonly sampleIntegral: number;
  readonly referenceIntegral: number;
  /** Absorbance (1 cm) at the excitation wavelength. */
  readonly sampleAbsorbance: number;
  readonly referenceAbsorbance: number;
  readonly sampleRefractiveIndex: number;
  readonly referenceRefractiveIndex: number;
  readonly referenceYield: number;
  /** True when sample and reference are in the same solvent: n cancels exactly and has no budget line (default: n values equal). */
  readonly sameSolvent?: boolean;
  readonly uncertainties?: RelativeYieldUncertainties;
  /** How each given uncertainty was obtained (e.g. 'estimated from noise: …'); a given value without one is labelled 'stated'. */
  readonly uncertaintyBasis?: Partial<Record<keyof RelativeYieldUncertainties, string>>;
  readonly options?: RelativeYieldOptions;
}

export interface QuantumYieldResult {
  readonly quantumYield: number;
  /** Combined standard uncertainty u_c(Φ) (JCGM 100:2008). */
  readonly standardUncertainty: number;
  readonly budget: readonly BudgetLine[];
  readonly dominantContribution: string;
  readonly warnings: readonly string[];
}

function checkAbsorbance(
  absorbance: number,
  role: string,
  limits: { warn: number; refuse: number },
  warnings: string[],
): void {
  if (!(absorbance > 0))
    throw new InputRejected(
      'INPUT_INVALID',
      `the ${role} absorbance at excitation is ${formatSignificant(absorbance)}; it must be positive`,
    );
  if (absorbance > limits.refuse) {
    throw new AnalysisFailed(
      'OUT_OF_RANGE',
      `the ${role} absorbance at excitation is ${formatSignificant(absorbance)}, above ${limits.refuse}; inner-filter effects make a relative yield untrustworthy — dilute it`,
    );
  }
  if (absorbance > limits.warn)
    warnings.push(
      `the ${role} absorbance at excitation is ${formatSignificant(absorbance)} (> ${limits.warn}, Brouwer 2011)`,
    );
}

/** Φ = Φ_ref·(F/F_ref)·(f_ref/f)·(n²/n_ref²), f = 1 − 10^(−A) (Brouwer, Pure Appl. Chem. 83, 2213 (2011)), with a first-order GUM budget. */
export function relativeQuantumYield(input: RelativeYieldInput): QuantumYieldResult {
  const options = resolveRelativeYieldOptions(input.options);
  const u = input.uncertainties ?? {};
  const warnings: string[] = [];
  const limits = { warn: options.absorbanceWarnLimit, refuse: options.absorbanceRefuseLimit };
  checkAbsorbance(input.sampleAbsorbance, 'sample', limits, warnings);
  checkAbsorbance(input.referenceAbsorbance, 'reference', limits, warnings);
  for (const [name, value] of [
    ['sample integral', input.sampleIntegral],
    ['reference integral', input.referenceIntegral],
  ] as const) {
    if (!(value > 0))
      throw new InputRejected('INPUT_INVALID', `the ${name} is ${formatSignificant(value)}; it must be positive`);
  }
  if (!(input.referenceYield > 0 && input.referenceYield <= 1)) {
    throw new InputRejected('INPUT_INVALID', `the reference yield ${input.referenceYield} is outside (0, 1]`);
  }
  const useAbsorptance = options.lightAbsorbed === 'absorptance';
  const absorbed = (a: number): number => (useAbsorptance ? absorptanceFromAbsorbance(a) : a);
  const absorbedSlope = (a: number): number => (useAbsorptance ? absorptanceSlope(a) : 1);
  const fSample = absorbed(input.sampleAbsorbance);
  const fReference = absorbed(input.referenceAbsorbance);
  const nSample = input.sampleRefractiveIndex;
  const nReference = input.referenceRefractiveIndex;
  const quantumYield =
    input.referenceYield *
    (input.sampleIntegral / input.referenceIntegral) *
    (fReference / fSample) *
    ((nSample * nSample) / (nReference * nReference));
  if (quantumYield > 1)
    warnings.push(
      `the yield ${quantumYield.toPrecision(4)} exceeds 1; check the corrections, absorbances and standard`,
    );
  const given = input.uncertaintyBasis ?? {};
  const NOT_STATED = 'assumed zero: not stated';
  const absorbanceDefault = `assumed: ${options.defaultAbsorbanceUncertainty} (photometric repeatability, common practice)`;
  const indexDefault = `assumed: ${options.defaultRefractiveIndexUncertainty} (table value, see refractive-indices.ts)`;
  const stated = (
    value: number | undefined,
    fallback: number,
    fallbackBasis: string,
    key: keyof RelativeYieldUncertainties,
  ): [number, string] => (value === undefined ? [fallback, fallbackBasis] : [value, given[key] ?? 'stated']);
  const lines: BudgetInput[] = [];
  const [uRef, uRefBasis] = stated(u.referenceYield, 0, NOT_STATED, 'referenceYield');
  lines.push({
    quantity: 'referenceYield',
    value: input.referenceYield,
    standardUncertainty: uRef,
    sensitivityCoefficient: quantumYield / input.referenceYield,
    basis: uRefBasis,
  });
  const [uF, uFBasis] = stated(u.sampleIntegral, 0, NOT_STATED, 'sampleIntegral');
  lines.push({
    quantity: 'sampleIntegral',
    value: input.sampleIntegral,
    standardUncertainty: uF,
    sensitivityCoefficient: quantumYield / input.sampleIntegral,
    basis: uFBasis,
  });
  const [uFr, uFrBasis] = stated(u.referenceIntegral, 0, NOT_STATED, 'referenceIntegral');
  lines.push({
    quantity: 'referenceIntegral',
    value: input.referenceIntegral,
    standardUncertainty: uFr,
    sensitivityCoefficient: -quantumYield / input.referenceIntegral,
    basis: uFrBasis,
  });
  const [uA, uABasis] = stated(
    u.sampleAbsorbance,
    options.defaultAbsorbanceUncertainty,
    absorbanceDefault,
    'sampleAbsorbance',
  );
  lines.push({
    quantity: 'sampleAbsorbance',
    value: input.sampleAbsorbance,
    standardUncertainty: uA,
    sensitivityCoefficient: (-quantumYield / fSample) * absorbedSlope(input.sampleAbsorbance),
    basis: uABasis,
  });
  const [uAr, uArBasis] = stated(
    u.referenceAbsorbance,
    options.defaultAbsorbanceUncertainty,
    absorbanceDefault,
    'referenceAbsorbance',
  );
  lines.push({
    quantity: 'referenceAbsorbance',
    value: input.referenceAbsorbance,
    standardUncertainty: uAr,
    sensitivityCoefficient: (quantumYield / fReference) * absorbedSlope(input.referenceAbsorbance),
    basis: uArBasis,
  });
  const sameSolvent = input.sameSolvent ?? nSample === nReference;
  if (!sameSolvent) {
    const [un, unBasis] = stated(
      u.sampleRefractiveIndex,
      options.defaultRefractiveIndexUncertainty,
      indexDefault,
      'sampleRefractiveIndex',
    );
    lines.push({
      quantity: 'sampleRefractiveIndex',
      value: nSample,
      standardUncertainty: un,
      sensitivityCoefficient: (2 * quantumYield) / nSample,
      basis: unBasis,
    });
    const [unr, unrBasis] = stated(
      u.referenceRefractiveIndex,
      options.defaultRefractiveIndexUncertainty,
      indexDefault,
      'referenceRefractiveIndex',
    );
    lines.push({
      quantity: 'referenceRefractiveIndex',
      value: nReference,
      standardUncertainty: unr,
      sensitivityCoefficient: (-2 * quantumYield) / nReference,
      basis: unrBasis,
    });
  }
  // The detector correction enters as a factor D = 1 on the integral ratio: ∂Φ/∂D = Φ.
  const [uD, uDBasis] = stated(u.detectorCorrectionRelative, 0, NOT_STATED, 'detectorCorrectionRelative');
  lines.push({
    quantity: 'detectorCorrection',
    value: 1,
    standardUncertainty: uD,
    sensitivityCoefficient: quantumYield,
    basis: uDBasis,
  });
  for (const line of lines)
    if (line.basis === NOT_STATED) warnings.push(`u(${line.quantity}) not stated: its contribution is counted as zero`);
  const budget = combineUncertainty(lines);
  return Object.freeze({
    quantumYield,
    standardUncertainty: budget.combinedStandardUncertainty,
    budget: budget.lines,
    dominantContribution: budget.dominantContribution,
    warnings: Object.freeze(warnings),
  });
}
