// Relative quantum yield of the sample against a reference standard measured in (or paired into)
// the set, and the excited-state rate constants from Φ and τ.
import type { Spectrum } from '../model/spectrum.js';
import { findSolvent, findStandard, rateConstantsFromYield, relativeQuantumYield, standardWarnings } from '../photophysics/index.js';
import { integrateIntensity } from '../spectra/index.js';
import type { AnalysisSettings } from './payload.js';
import type { AbsorbanceSummary, QuantumYieldSummary, RateConstantsSummary } from './result.js';
import type { StepContext } from './step-context.js';

export interface YieldInputs {
  readonly sampleEmission: Spectrum;
  readonly sampleAbsorbance: AbsorbanceSummary;
  readonly sampleSolvent: string | undefined;
  readonly referenceEmission: Spectrum;
  readonly referenceAbsorbance: AbsorbanceSummary;
  readonly standardId: string;
  readonly referenceSetId: string | undefined;
}

/** The refractive index of a solvent: the config map, the built-in table, else the default (with a warning). */
export function refractiveIndexFor(solvent: string | undefined, settings: AnalysisSettings, context: StepContext): number {
  if (solvent !== undefined) {
    const configured = settings.refractiveIndex[solvent];
    if (configured !== undefined) return configured;
    const row = findSolvent(solvent);
    if (row !== undefined) return row.refractiveIndex;
  }
  context.warnings.push(`no refractive index for solvent "${solvent ?? 'unknown'}": used ${settings.defaultRefractiveIndex}`);
  return settings.defaultRefractiveIndex;
}

/** Φ = Φ_ref·(F/F_ref)·(f_ref/f)·(n²/n_ref²) via the photophysics module; throws what it throws. */
export function computeQuantumYield(inputs: YieldInputs, settings: AnalysisSettings, context: StepContext): QuantumYieldSummary {
  const configured = settings.reference;
  const standard = findStandard(inputs.standardId);
  const referenceYield = configured?.quantumYield ?? standard.quantumYield;
  const referenceYieldU = configured?.quantumYieldStdUncertainty ?? standard.standardUncertainty;
  const referenceN = configured?.refractiveIndex ?? standard.refractiveIndex;
  const sampleN = refractiveIndexFor(inputs.sampleSolvent, settings, context);
  const warnings = standardWarnings(standard, inputs.referenceAbsorbance.excitationNm);
  const qy = relativeQuantumYield({
    sampleIntegral: integrateIntensity(inputs.sampleEmission),
    referenceIntegral: integrateIntensity(inputs.referenceEmission),
    sampleAbsorbance: inputs.sampleAbsorbance.absorbanceAtExcitation,
    referenceAbsorbance: inputs.referenceAbsorbance.absorbanceAtExcitation,
    sampleRefractiveIndex: sampleN,
    referenceRefractiveIndex: referenceN,
    referenceYield,
    uncertainties: { referenceYield: referenceYieldU },
    options: { absorbanceWarnLimit: Math.min(settings.maxAbsorbanceForYield, 0.1) },
  });
  return {
    value: qy.quantumYield,
    standardUncertainty: qy.standardUncertainty,
    budget: qy.budget.map((line) => ({
      source: line.quantity,
      relativeUncertainty: qy.quantumYield > 0 ? line.contribution / qy.quantumYield : 0,
    })),
    standardId: standard.id,
    ...(inputs.referenceSetId === undefined ? {} : { referenceSetId: inputs.referenceSetId }),
    warnings: [...warnings, ...qy.warnings],
  };
}

/** k_r, k_nr, τ0 from Φ and the intensity-weighted mean τ (Birks 1976). */
export function computeRates(quantumYield: QuantumYieldSummary, tauNs: number): RateConstantsSummary {
  const rates = rateConstantsFromYield({ quantumYield: quantumYield.value, tauNs, quantumYieldUncertainty: quantumYield.standardUncertainty });
  return { krPerS: rates.krPerS, knrPerS: rates.knrPerS, tau0Ns: rates.tau0Ns, totalDecayRatePerS: rates.totalDecayRatePerS };
}
