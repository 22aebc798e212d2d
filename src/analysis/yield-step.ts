// Relative quantum yield of the sample against a reference standard measured in (or paired into)
// the set, and the excited-state rate constants from Φ and τ. Φ is computed from exactly the spectra
// whose corrections the result lists, over one recorded window, through the same budget code path as
// the `yield` command (photophysics/yield-from-spectra.ts).
import { AnalysisFailed } from '../model/errors.js';
import type { Spectrum } from '../model/spectrum.js';
import {
  findSolvent,
  findStandard,
  quantumYieldFromSpectra,
  rateConstantsFromYield,
  standardUncertaintyBasis,
  standardWarnings,
} from '../photophysics/index.js';
import { defaultIntegrationWindow } from '../spectra/index.js';
import type { AnalysisSettings } from './payload.js';
import type { AbsorbanceSummary, QuantumYieldSummary, RateConstantsSummary } from './result.js';
import type { StepContext } from './step-context.js';

/** Defaults of settings.yieldWindow (the config section states them too). */
const WINDOW_DEFAULTS = { scatterExclusionNm: 15, bandEdgeFraction: 0.1, bandEdgeAction: 'refuse' } as const;

export interface YieldInputs {
  /** Emission spectra after every correction in sampleCorrections / referenceCorrections. */
  readonly sampleEmission: Spectrum;
  readonly sampleCorrections: readonly string[];
  readonly sampleAbsorbance: AbsorbanceSummary;
  readonly sampleSolvent: string | undefined;
  readonly referenceEmission: Spectrum;
  readonly referenceCorrections: readonly string[];
  readonly referenceAbsorbance: AbsorbanceSummary;
  readonly standardId: string;
  readonly referenceSetId: string | undefined;
  readonly excitationNm: number | undefined;
}

/** The refractive index of a solvent: the config map, the built-in table, else the default (with a warning). */
export function refractiveIndexFor(
  solvent: string | undefined,
  settings: AnalysisSettings,
  context: StepContext,
): number {
  if (solvent !== undefined) {
    const configured = settings.refractiveIndex[solvent];
    if (configured !== undefined) return configured;
    const row = findSolvent(solvent);
    if (row !== undefined) return row.refractiveIndex;
  }
  context.warnings.push(
    `no refractive index for solvent "${solvent ?? 'unknown'}": used ${settings.defaultRefractiveIndex}`,
  );
  return settings.defaultRefractiveIndex;
}

const isInnerFilter = (name: string): boolean => name.startsWith('correctInnerFilter');

/**
 * Φ = Φ_ref·(F/F_ref)·(f_ref/f)·(n²/n_ref²) (Brouwer, Pure Appl. Chem. 83, 2213 (2011)) from the corrected spectra.
 * When both spectra are corrected for the inner filter the attenuation is already undone, so f = A (the dilute-limit
 * form; 1 − 10^(−A) ≈ ln10·A·10^(−A/2) is what the uncorrected spectra need); otherwise f = 1 − 10^(−A).
 * Throws AnalysisFailed when sample and reference were not corrected alike, and what quantumYieldFromSpectra throws
 * (band not back to baseline with bandEdgeAction 'refuse', Φ above 1 by more than 3 u).
 */
export function computeQuantumYield(
  inputs: YieldInputs,
  settings: AnalysisSettings,
  context: StepContext,
): QuantumYieldSummary {
  const sampleInner = inputs.sampleCorrections.some(isInnerFilter);
  const referenceInner = inputs.referenceCorrections.some(isInnerFilter);
  if (sampleInner !== referenceInner) {
    throw new AnalysisFailed(
      'OUT_OF_RANGE',
      `the inner-filter correction was applied to the ${sampleInner ? 'sample' : 'reference'} emission only; a yield from spectra corrected differently would be wrong — see the missing correction's reason`,
    );
  }
  // Every other correction alike too (Brouwer 2011: sample and standard measured and corrected the same way):
  // a blank subtracted from one spectrum only biases F/F_ref by the solvent background and Raman band.
  const onlyIn = (from: readonly string[], other: readonly string[]): string[] =>
    from.filter((name) => !isInnerFilter(name) && !other.includes(name));
  const sampleOnly = onlyIn(inputs.sampleCorrections, inputs.referenceCorrections);
  const referenceOnly = onlyIn(inputs.referenceCorrections, inputs.sampleCorrections);
  if (sampleOnly.length > 0 || referenceOnly.length > 0) {
    const [name, which] = sampleOnly.length > 0 ? [sampleOnly[0], 'sample'] : [referenceOnly[0], 'reference'];
    throw new AnalysisFailed(
      'OUT_OF_RANGE',
      `the ${name} correction was applied to the ${which} emission only; a yield from spectra corrected differently would be wrong`,
      {
        hint:
          name === 'subtractBlank'
            ? 'Measure a blank of the solvent of both (or one per solvent) within assembly.pairingWindowHours.blank.'
            : 'Correct the sample and the reference standard alike.',
      },
    );
  }
  const configured = settings.reference;
  const standard = findStandard(inputs.standardId);
  const referenceYield = configured?.quantumYield ?? standard.quantumYield;
  const referenceYieldU =
    configured?.quantumYieldStdUncertainty === undefined
      ? { value: standard.standardUncertainty, basis: standardUncertaintyBasis(standard) }
      : {
          value: configured.quantumYieldStdUncertainty,
          basis: 'stated in the config (references[].quantumYieldStdUncertainty)',
        };
  const referenceN = configured?.refractiveIndex ?? standard.refractiveIndex;
  const sampleN = refractiveIndexFor(inputs.sampleSolvent, settings, context);
  const windowSettings = { ...WINDOW_DEFAULTS, ...settings.yieldWindow };
  const windowNm =
    windowSettings.windowNm ??
    defaultIntegrationWindow(
      [inputs.sampleEmission, inputs.referenceEmission],
      inputs.excitationNm,
      windowSettings.scatterExclusionNm,
    );
  const warnings = standardWarnings(standard, inputs.referenceAbsorbance.excitationNm);
  const lightAbsorbed = sampleInner ? 'absorbance' : 'absorptance';
  const qy = quantumYieldFromSpectra({
    sampleEmission: inputs.sampleEmission,
    referenceEmission: inputs.referenceEmission,
    windowNm,
    sampleAbsorbance: inputs.sampleAbsorbance.absorbanceAtExcitation,
    referenceAbsorbance: inputs.referenceAbsorbance.absorbanceAtExcitation,
    sampleRefractiveIndex: sampleN,
    referenceRefractiveIndex: referenceN,
    referenceYield,
    referenceYieldUncertainty: referenceYieldU,
    options: { lightAbsorbed, absorbanceWarnLimit: Math.min(settings.maxAbsorbanceForYield, 0.1) },
    bandEdgeFraction: windowSettings.bandEdgeFraction,
    bandEdgeAction: windowSettings.bandEdgeAction,
  });
  return {
    value: qy.quantumYield,
    standardUncertainty: qy.standardUncertainty,
    budget: qy.budget.map((line) => ({
      source: line.quantity,
      relativeUncertainty: qy.quantumYield > 0 ? line.contribution / qy.quantumYield : 0,
      inputStandardUncertainty: line.standardUncertainty,
      basis: line.basis,
    })),
    standardId: standard.id,
    ...(inputs.referenceSetId === undefined ? {} : { referenceSetId: inputs.referenceSetId }),
    inputs: {
      sampleIntegral: qy.sampleIntegral,
      referenceIntegral: qy.referenceIntegral,
      sampleAbsorbance: inputs.sampleAbsorbance.absorbanceAtExcitation,
      referenceAbsorbance: inputs.referenceAbsorbance.absorbanceAtExcitation,
      sampleRefractiveIndex: sampleN,
      referenceRefractiveIndex: referenceN,
      referenceYield,
      lightAbsorbed,
      windowNm: [windowNm[0], windowNm[1]],
      sampleCorrections: [...inputs.sampleCorrections],
      referenceCorrections: [...inputs.referenceCorrections],
    },
    flags: [...qy.flags],
    warnings: [...warnings, ...qy.warnings],
  };
}

/** k_r, k_nr, τ0 from Φ and the intensity-weighted mean τ (Birks 1976); a Φ above 1 within its uncertainty enters as 1. */
export function computeRates(quantumYield: QuantumYieldSummary, tauNs: number): RateConstantsSummary {
  const phi = Math.min(quantumYield.value, 1);
  const rates = rateConstantsFromYield({
    quantumYield: phi,
    tauNs,
    quantumYieldUncertainty: quantumYield.standardUncertainty,
  });
  return {
    krPerS: rates.krPerS,
    knrPerS: rates.knrPerS,
    tau0Ns: rates.tau0Ns,
    totalDecayRatePerS: rates.totalDecayRatePerS,
    quantumYield: phi,
    tauNs,
    tauBasis: 'intensity-weighted mean',
  };
}
