// Radiative rate constant from the absorption and emission spectra (Strickler & Berg, J. Chem. Phys. 37, 814 (1962)).
import { z } from 'zod';
import { InputRejected } from '../model/errors.js';
import type { Spectrum } from '../model/spectrum.js';
import { trapezoid } from '../spectra/integrate.js';
import { resolveWithSchema } from '../spectra/options.js';
import { itemAt } from '../model/item-at.js';

/** Strickler–Berg constant 2.880×10⁻⁹ (ν̃ in cm⁻¹, ε in M⁻¹cm⁻¹, rate in s⁻¹; REFERENCES.md, confirmed). */
export const STRICKLER_BERG_CONSTANT = 2.88e-9;

const stricklerBergOptionsSchema = z
  .object({
    /** Ratio of degeneracies g_lower/g_upper (default 1). */
    degeneracyRatio: z.number().positive().default(1),
    /** Wavelength window of the absorption band of the emitting transition, nm (default the whole spectrum). */
    absorptionWindowNm: z.tuple([z.number().positive(), z.number().positive()]).optional(),
    /** Wavelength window of the emission band, nm (default the whole spectrum). */
    emissionWindowNm: z.tuple([z.number().positive(), z.number().positive()]).optional(),
  })
  .strict();

/** User-facing options of stricklerBergRate. */
export type StricklerBergOptions = z.input<typeof stricklerBergOptionsSchema>;

/** Validates StricklerBergOptions, fills defaults, freezes. */
export function resolveStricklerBergOptions(
  options?: StricklerBergOptions,
): Readonly<z.output<typeof stricklerBergOptionsSchema>> {
  return resolveWithSchema(stricklerBergOptionsSchema, options, 'stricklerBerg');
}

export interface StricklerBergResult {
  /** Predicted radiative rate constant, s⁻¹. */
  readonly krPerS: number;
  /** Predicted radiative lifetime τ0 = 1/k_r, ns. */
  readonly tau0Ns: number;
  /** ∫ε d ln ν̃ over the band, M⁻¹cm⁻¹. */
  readonly integratedAbsorptivityPerMPerCm: number;
  /** ⟨ν̃f⁻³⟩⁻¹ = ∫F dν̃ / ∫ν̃⁻³F dν̃, cm⁻³. */
  readonly meanInverseCubeWavenumberPerCm3: number;
  /** measured k_r / predicted k_r, when a measured k_r was given. */
  readonly measuredToPredictedRatio: number | undefined;
  readonly warnings: readonly string[];
}

/**
 * 1/τ0 = 2.880×10⁻⁹·n²·⟨ν̃f⁻³⟩⁻¹·(gl/gu)·∫ε d ln ν̃ (Strickler & Berg 1962). `absorptivity`: ε in M⁻¹cm⁻¹ vs nm;
 * `emission`: photon spectrum per nm (corrected). On the nm axis, ∫ε d ln ν̃ = ∫ε/λ dλ and, since F(ν̃)dν̃ = F(λ)dλ,
 * ⟨ν̃f⁻³⟩⁻¹ = ∫F dλ / ∫(λ·1e−7)³F dλ. Compares with measuredKrPerS (s⁻¹) when given.
 */
export function stricklerBergRate(input: {
  readonly absorptivity: Spectrum;
  readonly emission: Spectrum;
  readonly refractiveIndex: number;
  readonly measuredKrPerS?: number;
  readonly options?: StricklerBergOptions;
}): StricklerBergResult {
  const options = resolveStricklerBergOptions(input.options);
  if (!(input.refractiveIndex >= 1))
    throw new InputRejected('INPUT_INVALID', `refractive index ${input.refractiveIndex} must be ≥ 1`);
  const warnings: string[] = [];
  const ab = input.absorptivity;
  const em = input.emission;
  const epsilonOverLambda = ab.values.map((e, i) => e / itemAt(ab.wavelengthNm, i));
  const integratedAbsorptivityPerMPerCm = trapezoid(
    ab.wavelengthNm,
    epsilonOverLambda,
    options.absorptionWindowNm?.[0],
    options.absorptionWindowNm?.[1],
  );
  const weighted = em.values.map((f, i) => f * (itemAt(em.wavelengthNm, i) * 1e-7) ** 3);
  const emissionTotal = trapezoid(
    em.wavelengthNm,
    em.values,
    options.emissionWindowNm?.[0],
    options.emissionWindowNm?.[1],
  );
  const emissionCubeWeighted = trapezoid(
    em.wavelengthNm,
    weighted,
    options.emissionWindowNm?.[0],
    options.emissionWindowNm?.[1],
  );
  if (!(integratedAbsorptivityPerMPerCm > 0) || !(emissionTotal > 0) || !(emissionCubeWeighted > 0)) {
    throw new InputRejected('INPUT_INVALID', 'the absorption and emission bands must have positive integrals');
  }
  if (ab.valueUnit !== 'a.u.' && !/m-1|m⁻¹|l\/mol|molar/i.test(ab.valueUnit)) {
    warnings.push(`the absorption values are in "${ab.valueUnit}"; Strickler–Berg needs molar absorptivity in M⁻¹cm⁻¹`);
  }
  const meanInverseCubeWavenumberPerCm3 = emissionTotal / emissionCubeWeighted;
  const n = input.refractiveIndex;
  const krPerS =
    STRICKLER_BERG_CONSTANT *
    n *
    n *
    meanInverseCubeWavenumberPerCm3 *
    options.degeneracyRatio *
    integratedAbsorptivityPerMPerCm;
  const ratio = input.measuredKrPerS === undefined ? undefined : input.measuredKrPerS / krPerS;
  if (ratio !== undefined && (ratio < 0.5 || ratio > 2)) {
    warnings.push(
      `measured/predicted k_r = ${ratio.toFixed(2)}: the emitting state may differ from the absorbing one, or the band windows are off`,
    );
  }
  return Object.freeze({
    krPerS,
    tau0Ns: 1e9 / krPerS,
    integratedAbsorptivityPerMPerCm,
    meanInverseCubeWavenumberPerCm3,
    measuredToPredictedRatio: ratio,
    warnings: Object.freeze(warnings),
  });
}
