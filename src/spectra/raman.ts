// Water Raman test of a fluorometer: expected O–H stretch band position from the excitation wavelength,
// the measured peak, its error, and the Raman signal-to-noise ratio (ASTM E579 practice).
import { z } from 'zod';
import { AnalysisFailed, InputRejected } from '../model/errors.js';
import type { Spectrum } from '../model/spectrum.js';
import { itemAt } from '../model/item-at.js';
import { bracketIndex } from './interpolate.js';
import { findPeak } from './metrics.js';
import { noiseFromSecondDifferences } from './noise.js';
import { resolveWithSchema } from './options.js';

/** Water O–H stretch Raman shift, cm⁻¹ (Bartlett et al., Appl. Opt. 37, 3324 (1998)). */
export const WATER_RAMAN_SHIFT_PER_CM = 3400;
/** Shift of the background point, cm⁻¹: 450 nm at 350 nm excitation (ASTM E579 practice) = 1e7/350 − 1e7/450. */
export const RAMAN_BACKGROUND_SHIFT_PER_CM = 1e7 / 350 - 1e7 / 450;

const ramanOptionsSchema = z
  .object({
    /** Excitation wavelength in nm; default the spectrum's metadata.excitationNm. */
    excitationNm: z.number().positive().optional(),
    /** Raman shift of the band, cm⁻¹ (default 3400, water O–H stretch). */
    ramanShiftPerCm: z.number().positive().default(WATER_RAMAN_SHIFT_PER_CM),
    /** Half-width of the peak search window around the expected position, nm (default 10). */
    searchHalfWidthNm: z.number().positive().default(10),
    /** Background wavelength, nm; default at a shift of 6349 cm⁻¹ (450 nm at 350 nm excitation). */
    backgroundNm: z.number().positive().optional(),
    /** Half-width of the least-squares parabola fitted around the maximum, nm (default 2; noise-robust peak position). */
    peakFitHalfWidthNm: z.number().positive().default(2),
    /** Half-width of the window averaged for the background and used for its noise, nm (default 10). */
    backgroundHalfWidthNm: z.number().positive().default(10),
    /** Accepted |measured − expected| peak position, nm (default 1; Bartlett et al. 1998 band position). */
    positionToleranceNm: z.number().positive().default(1),
  })
  .strict();

/** User-facing options of ramanTest. */
export type RamanOptions = z.input<typeof ramanOptionsSchema>;

/** Validates RamanOptions, fills defaults, freezes. */
export function resolveRamanOptions(options?: RamanOptions): Readonly<z.output<typeof ramanOptionsSchema>> {
  return resolveWithSchema(ramanOptionsSchema, options, 'qc.raman');
}

export interface RamanTestResult {
  readonly excitationNm: number;
  readonly expectedPeakNm: number;
  readonly measuredPeakNm: number;
  /** measured − expected, nm. */
  readonly peakErrorNm: number;
  readonly positionWithinTolerance: boolean;
  /** Signal at the peak, value units. */
  readonly peakSignal: number;
  readonly backgroundNm: number;
  /** Mean signal in the background window, value units. */
  readonly backgroundSignal: number;
  /** (P − B)/√B, meaningful for photon counts (ASTM E579 form). */
  readonly signalToNoisePoisson: number | undefined;
  /** (P − B)/σ with σ the second-difference noise in the background window. */
  readonly signalToNoiseRms: number | undefined;
  readonly warnings: readonly string[];
}

/** Raman band wavelength in nm for excitation λ_ex (nm) and shift Δν̃ (cm⁻¹): 1/λ = 1/λ_ex − Δν̃·1e−7. */
export function ramanPeakNm(excitationNm: number, ramanShiftPerCm: number = WATER_RAMAN_SHIFT_PER_CM): number {
  return 1e7 / (1e7 / excitationNm - ramanShiftPerCm);
}

function indexRange(axis: Float64Array, fromNm: number, toNm: number): [number, number] | undefined {
  const first = itemAt(axis, 0);
  const last = itemAt(axis, axis.length - 1);
  if (fromNm < first || toNm > last) return undefined;
  const from = bracketIndex(axis, fromNm) + (itemAt(axis, bracketIndex(axis, fromNm)) < fromNm ? 1 : 0);
  const to = bracketIndex(axis, toNm);
  return to >= from ? [from, to] : undefined;
}

/** Runs the water Raman test on an emission scan of pure water: expected vs measured peak (nm) and Raman SNR (ASTM E579 practice). */
export function ramanTest(spectrum: Spectrum, options?: RamanOptions): RamanTestResult {
  const resolved = resolveRamanOptions(options);
  const excitationNm = resolved.excitationNm ?? spectrum.metadata.excitationNm;
  if (excitationNm === undefined) {
    throw new InputRejected(
      'MISSING_COLUMN',
      'the excitation wavelength of the Raman scan is unknown; give it in the options or metadata',
    );
  }
  const warnings: string[] = [];
  const expectedPeakNm = ramanPeakNm(excitationNm, resolved.ramanShiftPerCm);
  const axis = spectrum.wavelengthNm;
  const peakRange = indexRange(
    axis,
    expectedPeakNm - resolved.searchHalfWidthNm,
    expectedPeakNm + resolved.searchHalfWidthNm,
  );
  if (peakRange === undefined) {
    throw new InputRejected(
      'AXIS_NOT_COVERED',
      `the scan does not cover ${expectedPeakNm.toFixed(1)} ± ${resolved.searchHalfWidthNm} nm`,
    );
  }
  const stepNm = (itemAt(axis, peakRange[1]) - itemAt(axis, peakRange[0])) / Math.max(1, peakRange[1] - peakRange[0]);
  const halfWindowPoints = Math.max(1, Math.round(resolved.peakFitHalfWidthNm / stepNm));
  const peak = findPeak(axis, spectrum.values, peakRange[0], peakRange[1], halfWindowPoints);
  if (peak.atEdge || peak.wavelengthNm === axis[peakRange[0]] || peak.wavelengthNm === axis[peakRange[1]]) {
    warnings.push('the Raman maximum lies at the edge of the search window; the band may be missing or shifted');
  }
  const backgroundNm = resolved.backgroundNm ?? 1e7 / (1e7 / excitationNm - RAMAN_BACKGROUND_SHIFT_PER_CM);
  const backgroundRange = indexRange(
    axis,
    backgroundNm - resolved.backgroundHalfWidthNm,
    backgroundNm + resolved.backgroundHalfWidthNm,
  );
  if (backgroundRange === undefined) {
    throw new InputRejected(
      'AXIS_NOT_COVERED',
      `the scan does not cover the background window ${backgroundNm.toFixed(1)} ± ${resolved.backgroundHalfWidthNm} nm`,
    );
  }
  let sum = 0;
  for (let i = backgroundRange[0]; i <= backgroundRange[1]; i++) sum += itemAt(spectrum.values, i);
  const backgroundSignal = sum / (backgroundRange[1] - backgroundRange[0] + 1);
  const net = peak.value - backgroundSignal;
  if (!(net > 0)) {
    throw new AnalysisFailed(
      'OUT_OF_RANGE',
      `no Raman band: the peak (${peak.value}) does not exceed the background (${backgroundSignal})`,
    );
  }
  const sigma = noiseFromSecondDifferences(axis, spectrum.values, backgroundRange[0], backgroundRange[1]);
  if (sigma === undefined) warnings.push('too few points in the background window for a noise estimate');
  const peakErrorNm = peak.wavelengthNm - expectedPeakNm;
  return Object.freeze({
    excitationNm,
    expectedPeakNm,
    measuredPeakNm: peak.wavelengthNm,
    peakErrorNm,
    positionWithinTolerance: Math.abs(peakErrorNm) <= resolved.positionToleranceNm,
    peakSignal: peak.value,
    backgroundNm,
    backgroundSignal,
    signalToNoisePoisson: backgroundSignal > 0 ? net / Math.sqrt(backgroundSignal) : undefined,
    signalToNoiseRms: sigma !== undefined && sigma > 0 ? net / sigma : undefined,
    warnings: Object.freeze(warnings),
  });
}
