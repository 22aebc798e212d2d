// Gradient (dilution-series) quantum yield: slopes of integrated emission vs absorbance through the origin,
// linearity checks, and the ratio to the reference series (Williams, Winfield & Miller, Analyst 108, 1067 (1983)).
import { z } from 'zod';
import { InputRejected } from '../model/errors.js';
import { resolveWithSchema } from '../spectra/options.js';
import { absorptanceFromAbsorbance } from './absorptance.js';
import { fitThroughOrigin, type OriginLineFit } from './linear-fit.js';
import type { QuantumYieldResult } from './relative-yield.js';
import { combineUncertainty, type BudgetInput } from './uncertainty-budget.js';

const gradientOptionsSchema = z
  .object({
    /** x of the line: 'absorbance' (Williams et al. 1983) or 'absorptance' 1 − 10^(−A). Default 'absorbance'. */
    abscissa: z.enum(['absorbance', 'absorptance']).default('absorbance'),
    /** Warn when a series' R² (about the mean) falls below this (default 0.99; practice). */
    minRSquared: z.number().min(0).max(1).default(0.99),
    /** Warn when |b2·x_max/b1| of a quadratic through the origin exceeds this and b2 is significant at `curvatureAlpha` (default 0.05). */
    maxRelativeCurvature: z.number().positive().default(0.05),
    /** Two-sided significance level of the t test on the quadratic term, n − 2 degrees of freedom (default 0.01). */
    curvatureAlpha: z.number().positive().max(0.5).default(0.01),
    /** Significance level of the exact runs test for too few residual sign runs (Swed & Eisenhart 1943; default 0.01). */
    residualRunsAlpha: z.number().positive().max(0.5).default(0.01),
    /** Warn when the highest absorbance of a series exceeds this (default 0.1; practice). */
    absorbanceWarnLimit: z.number().positive().default(0.1),
    /** u(n) used when none is given (default 0.0005). */
    defaultRefractiveIndexUncertainty: z.number().nonnegative().default(0.0005),
  })
  .strict();

/** User-facing options of gradientQuantumYield. */
export type GradientYieldOptions = z.input<typeof gradientOptionsSchema>;

/** Validates GradientYieldOptions, fills defaults, freezes. */
export function resolveGradientYieldOptions(
  options?: GradientYieldOptions,
): Readonly<z.output<typeof gradientOptionsSchema>> {
  return resolveWithSchema(gradientOptionsSchema, options, 'quantumYield.gradient');
}

export interface DilutionSeries {
  /** Absorbances (1 cm) at the excitation wavelength, one per dilution. */
  readonly absorbances: readonly number[];
  /** Integrated corrected emission, one per dilution (same unit for sample and reference). */
  readonly integrals: readonly number[];
}

export interface GradientYieldInput {
  readonly sample: DilutionSeries;
  readonly reference: DilutionSeries;
  readonly referenceYield: number;
  readonly sampleRefractiveIndex: number;
  readonly referenceRefractiveIndex: number;
  readonly sameSolvent?: boolean;
  readonly uncertainties?: {
    readonly referenceYield?: number;
    readonly sampleRefractiveIndex?: number;
    readonly referenceRefractiveIndex?: number;
  };
  readonly options?: GradientYieldOptions;
}

export interface SeriesFit extends OriginLineFit {
  /** Highest absorbance in the series (reported, Williams et al. 1983 keep A ≤ 0.1). */
  readonly highestAbsorbance: number;
}

export interface GradientYieldResult extends QuantumYieldResult {
  readonly sampleFit: SeriesFit;
  readonly referenceFit: SeriesFit;
}

function fitSeries(
  series: DilutionSeries,
  role: string,
  options: Readonly<z.output<typeof gradientOptionsSchema>>,
  warnings: string[],
): SeriesFit {
  if (series.absorbances.length < 3) {
    throw new InputRejected(
      'TOO_FEW_POINTS',
      `the ${role} dilution series has ${series.absorbances.length} points; the gradient method needs at least 3`,
    );
  }
  const x = series.absorbances.map((a) => (options.abscissa === 'absorptance' ? absorptanceFromAbsorbance(a) : a));
  const fit = fitThroughOrigin(x, [...series.integrals], undefined, `${role} dilution series`);
  const highestAbsorbance = Math.max(...series.absorbances);
  if (fit.rSquared < options.minRSquared)
    warnings.push(`the ${role} series is not linear: R² = ${fit.rSquared.toFixed(4)} < ${options.minRSquared}`);
  if (
    fit.relativeCurvature !== undefined &&
    fit.curvaturePValue !== undefined &&
    Math.abs(fit.relativeCurvature) > options.maxRelativeCurvature &&
    fit.curvaturePValue < options.curvatureAlpha
  ) {
    warnings.push(
      `the ${role} series curves ${fit.relativeCurvature < 0 ? 'downwards (inner filter or aggregation?)' : 'upwards'}: ` +
        `relative curvature ${fit.relativeCurvature.toFixed(3)} at the highest point (t test p = ${fit.curvaturePValue.toPrecision(2)} < ${options.curvatureAlpha})`,
    );
  }
  // Exact runs test: with 5 points no sign pattern reaches p < 0.2, with 7 none p < 0.03, so short series are never flagged.
  if (fit.residualRunsPValue < options.residualRunsAlpha) {
    warnings.push(
      `the ${role} residuals show a systematic pattern (${fit.residualSignRuns} sign runs, runs test p = ${fit.residualRunsPValue.toPrecision(2)} < ${options.residualRunsAlpha})`,
    );
  }
  if (highestAbsorbance > options.absorbanceWarnLimit)
    warnings.push(`the ${role} series reaches A = ${highestAbsorbance} (> ${options.absorbanceWarnLimit})`);
  return Object.freeze({ ...fit, highestAbsorbance });
}

/** Φx = Φr·(Gx/Gr)·(nx²/nr²), G = least-squares slope through the origin of integral vs absorbance (Williams, Winfield & Miller 1983), with GUM budget. */
export function gradientQuantumYield(input: GradientYieldInput): GradientYieldResult {
  const options = resolveGradientYieldOptions(input.options);
  const warnings: string[] = [];
  const sampleFit = fitSeries(input.sample, 'sample', options, warnings);
  const referenceFit = fitSeries(input.reference, 'reference', options, warnings);
  if (!(sampleFit.slope > 0 && referenceFit.slope > 0)) {
    throw new InputRejected(
      'INPUT_INVALID',
      'a gradient is not positive; check that the integrals rise with absorbance',
    );
  }
  const nx = input.sampleRefractiveIndex;
  const nr = input.referenceRefractiveIndex;
  const quantumYield = input.referenceYield * (sampleFit.slope / referenceFit.slope) * ((nx * nx) / (nr * nr));
  const u = input.uncertainties ?? {};
  const lines: BudgetInput[] = [
    {
      quantity: 'referenceYield',
      value: input.referenceYield,
      standardUncertainty: u.referenceYield ?? 0,
      sensitivityCoefficient: quantumYield / input.referenceYield,
      basis: u.referenceYield === undefined ? 'not stated' : 'stated',
    },
    {
      quantity: 'sampleGradient',
      value: sampleFit.slope,
      standardUncertainty: sampleFit.slopeStandardError,
      sensitivityCoefficient: quantumYield / sampleFit.slope,
      basis: 'residual scatter of the fit',
    },
    {
      quantity: 'referenceGradient',
      value: referenceFit.slope,
      standardUncertainty: referenceFit.slopeStandardError,
      sensitivityCoefficient: -quantumYield / referenceFit.slope,
      basis: 'residual scatter of the fit',
    },
  ];
  if (!(input.sameSolvent ?? nx === nr)) {
    lines.push(
      {
        quantity: 'sampleRefractiveIndex',
        value: nx,
        standardUncertainty: u.sampleRefractiveIndex ?? options.defaultRefractiveIndexUncertainty,
        sensitivityCoefficient: (2 * quantumYield) / nx,
        basis: u.sampleRefractiveIndex === undefined ? 'practice default' : 'stated',
      },
      {
        quantity: 'referenceRefractiveIndex',
        value: nr,
        standardUncertainty: u.referenceRefractiveIndex ?? options.defaultRefractiveIndexUncertainty,
        sensitivityCoefficient: (-2 * quantumYield) / nr,
        basis: u.referenceRefractiveIndex === undefined ? 'practice default' : 'stated',
      },
    );
  }
  if (u.referenceYield === undefined)
    warnings.push('u(referenceYield) not stated: its contribution is counted as zero');
  const budget = combineUncertainty(lines);
  return Object.freeze({
    quantumYield,
    standardUncertainty: budget.combinedStandardUncertainty,
    budget: budget.lines,
    dominantContribution: budget.dominantContribution,
    warnings: Object.freeze(warnings),
    sampleFit,
    referenceFit,
  });
}
