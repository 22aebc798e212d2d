// The one path from two corrected emission spectra to a relative quantum yield and its budget, used by
// the pipeline (src/analysis/yield-step.ts) and the `yield` command alike: integrals over one window,
// their uncertainty estimated from the spectra's own noise, every budget line labelled with its basis.
import { AnalysisFailed } from '../model/errors.js';
import { formatSignificant } from '../model/format-number.js';
import type { Spectrum } from '../model/spectrum.js';
import { bandEdgeFractions, integralWithUncertainty } from '../spectra/index.js';
import {
  relativeQuantumYield,
  type QuantumYieldResult,
  type RelativeYieldOptions,
  type RelativeYieldUncertainties,
} from './relative-yield.js';

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
  /** A band whose value at a window edge exceeds this fraction of its peak is not back to baseline (default 0.1). */
  readonly bandEdgeFraction?: number;
  /** 'refuse' (default) throws AnalysisFailed; 'flag' adds the flag 'band-not-at-baseline' and a warning. */
  readonly bandEdgeAction?: 'refuse' | 'flag';
  /** Where the edge settings come from, for messages (default the config paths). */
  readonly settingNames?: { readonly fraction: string; readonly window: string };
}

export interface SpectraYieldResult extends QuantumYieldResult {
  readonly sampleIntegral: number;
  readonly referenceIntegral: number;
  /** 'band-not-at-baseline', 'above-one-within-uncertainty'. */
  readonly flags: readonly string[];
}

function noiseBasis(noiseSigma: number, windowNm: readonly [number, number]): string {
  return `estimated from noise: σ = ${formatSignificant(noiseSigma, 3)} per point (second differences, MAD), u = σ·√Σw² over ${formatSignificant(windowNm[0])}–${formatSignificant(windowNm[1])} nm (trapezoid weights w)`;
}

/**
 * Φ from two corrected spectra over one window (Brouwer, Pure Appl. Chem. 83, 2213 (2011)); integral u from noise (GUM §5.1).
 * Refuses (AnalysisFailed OUT_OF_RANGE) a band not back to baseline at a window edge (unless bandEdgeAction 'flag') and a
 * Φ above 1 by more than 3 u; a Φ above 1 within 3 u is returned with the flag 'above-one-within-uncertainty'.
 */
export function quantumYieldFromSpectra(input: SpectraYieldInput): SpectraYieldResult {
  const flags: string[] = [];
  const edgeWarnings: string[] = [];
  const fraction = input.bandEdgeFraction ?? 0.1;
  const names = input.settingNames ?? { fraction: 'analysis.bandEdgeFraction', window: 'analysis.yieldWindowNm' };
  for (const [role, spectrum] of [
    ['sample', input.sampleEmission],
    ['reference', input.referenceEmission],
  ] as const) {
    const edges = bandEdgeFractions(spectrum, input.windowNm);
    const worst = Math.max(edges.lower, edges.upper);
    if (worst <= fraction) continue;
    const side =
      edges.lower >= edges.upper
        ? `${formatSignificant(input.windowNm[0])} nm (lower)`
        : `${formatSignificant(input.windowNm[1])} nm (upper)`;
    const message =
      `the ${role} emission is not back to baseline at ${side}: ${Number.isFinite(worst) ? `${formatSignificant(100 * worst, 3)} %` : 'an undefined fraction'} of its peak, ` +
      `above ${formatSignificant(100 * fraction)} % (${names.fraction}); the scan may be cut short inside its band — measure the whole band or set ${names.window}`;
    if (input.bandEdgeAction !== 'flag') throw new AnalysisFailed('OUT_OF_RANGE', message);
    if (!flags.includes('band-not-at-baseline')) flags.push('band-not-at-baseline');
    edgeWarnings.push(message);
  }
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
    put('referenceIntegral', {
      value: reference.standardUncertainty,
      basis: noiseBasis(reference.noiseSigma, input.windowNm),
    });
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
  if (result.quantumYield > 1) {
    const excess = (result.quantumYield - 1) / result.standardUncertainty;
    if (!(excess <= 3)) {
      throw new AnalysisFailed(
        'OUT_OF_RANGE',
        `the yield ${formatSignificant(result.quantumYield)} exceeds 1 by ${Number.isFinite(excess) ? formatSignificant(excess, 2) : 'infinitely many'} standard uncertainties ` +
          `(u = ${formatSignificant(result.standardUncertainty, 2)}); check the corrections, absorbances and the standard`,
      );
    }
    flags.push('above-one-within-uncertainty');
  }
  return Object.freeze({
    ...result,
    warnings: Object.freeze([...edgeWarnings, ...result.warnings]),
    sampleIntegral: sample.integral,
    referenceIntegral: reference.integral,
    flags: Object.freeze(flags),
  });
}
