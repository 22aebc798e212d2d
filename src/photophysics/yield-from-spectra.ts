// The one path from two corrected emission spectra to a relative quantum yield and its budget, used by
// the pipeline (src/analysis/yield-step.ts) and the `yield` command alike: integrals over one window,
// their uncertainty estimated from the spectra's own noise, every budget line labelled with its basis.
import { formatSignificant } from '../model/format-number.js';
import type { Spectrum } from '../model/spectrum.js';
import { integralWithUncertainty } from '../spectra/index.js';
import { relativeQuantumYield, type QuantumYieldResult, type RelativeYieldOptions, type RelativeYieldUncertainties } from './relative-yield.js';

/** A standard uncertainty with how it was obtained ('stated in …', 'assumed: …'). */
export interface LabelledUncertainty {
  readonly value: number;
  readonly basis: string;
}

export interface SpectraYieldInput {
  /** Emission spectra after every correction the result lists (same value unit). */
  readonly sampleEmission: Spectrum;
  readonly referenceEmission: Spectrum;
  /** Integration window in nm, applied to both spectra. */
  readonly windowNm: readonly [number, number];
  readonly sampleAbsorbance: number;
  readonly referenceAbsorbance: number;
  readonly sampleRefractiveIndex: number;
  readonly referenceRefractiveIndex: number;
  readonly referenceYield: number;
  readonly referenceYieldUncertainty?: LabelledUncertainty;
  readonly sampleAbsorbanceUncertainty?: LabelledUncertainty;
  readonly referenceAbsorbanceUncertainty?: LabelledUncertainty;
  readonly sampleRefractiveIndexUncertainty?: LabelledUncertainty;
  readonly referenceRefractiveIndexUncertainty?: LabelledUncertainty;
  readonly detectorCorrectionRelative?: LabelledUncertainty;
  readonly options?: RelativeYieldOptions;
}

export interface SpectraYieldResult extends QuantumYieldResult {
  readonly sampleIntegral: number;
  readonly referenceIntegral: number;
}

function noiseBasis(noiseSigma: number, windowNm: readonly [number, number]): string {
  return `estimated from noise: σ = ${formatSignificant(noiseSigma, 3)} per point (second differences, MAD), u = σ·√Σw² over ${formatSignificant(windowNm[0])}–${formatSignificant(windowNm[1])} nm (trapezoid weights w)`;
}

/** Φ from two corrected spectra over one window (Brouwer, Pure Appl. Chem. 83, 2213 (2011)); integral u from noise (GUM §5.1). */
export function quantumYieldFromSpectra(input: SpectraYieldInput): SpectraYieldResult {
  const sample = integralWithUncertainty(input.sampleEmission, input.windowNm);
  const reference = integralWithUncertainty(input.referenceEmission, input.windowNm);
  const uncertainties: { -readonly [K in keyof RelativeYieldUncertainties]: number } = {};
  const basis: Partial<Record<keyof RelativeYieldUncertainties, string>> = {};
  const put = (key: keyof RelativeYieldUncertainties, labelled: LabelledUncertainty | undefined): void => {
    if (labelled === undefined) return;
    uncertainties[key] = labelled.value;
    basis[key] = labelled.basis;
  };
  if (sample.standardUncertainty !== undefined && sample.noiseSigma !== undefined) {
    put('sampleIntegral', { value: sample.standardUncertainty, basis: noiseBasis(sample.noiseSigma, input.windowNm) });
  }
  if (reference.standardUncertainty !== undefined && reference.noiseSigma !== undefined) {
    put('referenceIntegral', { value: reference.standardUncertainty, basis: noiseBasis(reference.noiseSigma, input.windowNm) });
  }
  put('referenceYield', input.referenceYieldUncertainty);
  put('sampleAbsorbance', input.sampleAbsorbanceUncertainty);
  put('referenceAbsorbance', input.referenceAbsorbanceUncertainty);
  put('sampleRefractiveIndex', input.sampleRefractiveIndexUncertainty);
  put('referenceRefractiveIndex', input.referenceRefractiveIndexUncertainty);
  put('detectorCorrectionRelative', input.detectorCorrectionRelative);
  const result = relativeQuantumYield({
    sampleIntegral: sample.integral,
    referenceIntegral: reference.integral,
    sampleAbsorbance: input.sampleAbsorbance,
    referenceAbsorbance: input.referenceAbsorbance,
    sampleRefractiveIndex: input.sampleRefractiveIndex,
    referenceRefractiveIndex: input.referenceRefractiveIndex,
    referenceYield: input.referenceYield,
    uncertainties,
    uncertaintyBasis: basis,
    ...(input.options === undefined ? {} : { options: input.options }),
  });
  return Object.freeze({ ...result, sampleIntegral: sample.integral, referenceIntegral: reference.integral });
}
