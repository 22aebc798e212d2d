// Primary and secondary inner-filter correction from the sample's absorbance spectrum, in the centred
// right-angle form or the geometric (viewed-zone) form. Validity limits are documented in docs/spectra.md.
import { z } from 'zod';
import { AnalysisFailed, InputRejected } from '../model/errors.js';
import { withValues, type Spectrum } from '../model/spectrum.js';
import { makeCorrectionRecord, type CorrectionResult } from './correction-record.js';
import { interpolateAt, resampleOnto } from './interpolate.js';
import { resolveWithSchema } from './options.js';
import { itemAt } from '../model/item-at.js';

const zone = z
  .tuple([z.number().nonnegative(), z.number().positive()])
  .refine(([from, to]) => to > from, { message: 'a viewed zone needs from < to (cm)' });

const innerFilterOptionsSchema = z
  .object({
    /** 'centred' F·10^((A_ex+A_em)/2) (Lakowicz) or 'geometric' viewed-zone form (Parker & Rees 1962). Default 'centred'. */
    method: z.enum(['centred', 'geometric']).default('centred'),
    /** Excitation wavelength in nm; default the spectrum's metadata.excitationNm. */
    excitationNm: z.number().positive().optional(),
    /** Path length of the absorbance measurement in cm; default the absorbance spectrum's metadata.pathLengthCm, else 1. */
    absorbancePathLengthCm: z.number().positive().optional(),
    /** Inner width of the fluorescence cell along each beam, cm (default 1). */
    cellPathCm: z.number().positive().default(1),
    /** Viewed zone along the excitation beam, cm from the entrance window (default [0.4, 0.6]; geometric only). */
    excitationZoneCm: zone.default([0.4, 0.6]),
    /** Viewed zone along the emission path, cm from the exit window (default [0.4, 0.6]; geometric only). */
    emissionZoneCm: zone.default([0.4, 0.6]),
    /** Warn when the cell absorbance at excitation exceeds this (default 0.05; Brouwer 2011 / practice). */
    warnAbsorbance: z.number().positive().default(0.05),
    /** Refuse when the cell absorbance at excitation or at any emission point exceeds this (default 1.5; see docs/spectra.md). */
    maxAbsorbance: z.number().positive().default(1.5),
  })
  .strict();

/** User-facing options of correctInnerFilter. */
export type InnerFilterOptions = z.input<typeof innerFilterOptionsSchema>;
export type ResolvedInnerFilterOptions = Readonly<z.output<typeof innerFilterOptionsSchema>>;

/** Validates InnerFilterOptions, fills defaults, freezes. */
export function resolveInnerFilterOptions(options?: InnerFilterOptions): ResolvedInnerFilterOptions {
  return resolveWithSchema(innerFilterOptionsSchema, options, 'corrections.innerFilter');
}

/** Geometric factor ln10·a·(x2−x1)/(10^(−a·x1) − 10^(−a·x2)) for absorbance a per cm over the zone x1..x2 cm (Parker & Rees 1962; Lutz & Luisi 1983); 1 at a = 0. */
export function geometricInnerFilterFactor(absorbancePerCm: number, fromCm: number, toCm: number): number {
  const widthCm = toCm - fromCm;
  const exponent = Math.LN10 * absorbancePerCm * widthCm;
  if (Math.abs(exponent) < 1e-12) return 1;
  // 10^(−a·x1) − 10^(−a·x2) = 10^(−a·x1)·(1 − e^(−ln10·a·Δx)), written with expm1 for small a.
  return exponent / (Math.pow(10, -absorbancePerCm * fromCm) * -Math.expm1(-exponent));
}

/** Centred right-angle factor 10^((A_ex + A_em)/2), absorbances of the fluorescence cell (Lakowicz, 3rd ed., ch. 2). */
export function centredInnerFilterFactor(absorbanceAtExcitation: number, absorbanceAtEmission: number): number {
  return Math.pow(10, (absorbanceAtExcitation + absorbanceAtEmission) / 2);
}

/** Absorbance values of an absorbance or transmittance spectrum (percent or fraction). */
function absorbanceValues(spectrum: Spectrum): Float64Array {
  if (spectrum.kind === 'absorbance') return spectrum.values;
  if (spectrum.kind === 'transmittance') {
    const percent = spectrum.valueUnit.toLowerCase().includes('percent') || spectrum.valueUnit.includes('%');
    return spectrum.values.map((t) => -Math.log10(percent ? t / 100 : t));
  }
  throw new InputRejected(
    'INPUT_INVALID',
    `the inner-filter correction needs an absorbance spectrum, got a ${spectrum.kind} spectrum`,
  );
}

/** Corrects an emission spectrum for inner-filter effects using the sample's absorbance spectrum (per-cm scaling from its path length); refuses above maxAbsorbance. */
export function correctInnerFilter(
  spectrum: Spectrum,
  absorbance: Spectrum,
  options?: InnerFilterOptions,
): CorrectionResult {
  const resolved = resolveInnerFilterOptions(options);
  const excitationNm = resolved.excitationNm ?? spectrum.metadata.excitationNm;
  if (excitationNm === undefined) {
    throw new InputRejected(
      'MISSING_COLUMN',
      'the excitation wavelength is unknown; give it in the options or the file metadata',
    );
  }
  const absorbancePathCm = resolved.absorbancePathLengthCm ?? absorbance.metadata.pathLengthCm ?? 1;
  const absorbanceRaw = absorbanceValues(absorbance);
  const toCell = resolved.cellPathCm / absorbancePathCm;
  const rawAtExcitation = interpolateAt(absorbance.wavelengthNm, absorbanceRaw, excitationNm);
  if (rawAtExcitation === undefined) {
    throw new InputRejected(
      'AXIS_NOT_COVERED',
      `the absorbance spectrum (${absorbance.wavelengthNm[0]}–${absorbance.wavelengthNm[absorbance.wavelengthNm.length - 1]} nm) ` +
        `does not include the excitation wavelength ${excitationNm} nm`,
    );
  }
  const absorbanceAtExcitation = Math.max(0, rawAtExcitation * toCell);
  const warnings: string[] = [];
  if (absorbanceAtExcitation > resolved.maxAbsorbance) {
    throw new AnalysisFailed(
      'OUT_OF_RANGE',
      `the cell absorbance at ${excitationNm} nm is ${absorbanceAtExcitation.toFixed(3)}, above the validity limit ` +
        `${resolved.maxAbsorbance} of the inner-filter correction; dilute the sample`,
    );
  }
  if (absorbanceAtExcitation > resolved.warnAbsorbance) {
    warnings.push(
      `the cell absorbance at excitation is ${absorbanceAtExcitation.toFixed(3)} (> ${resolved.warnAbsorbance}); ` +
        'the inner-filter correction is large and depends on the assumed geometry',
    );
  }
  const emissionAbsorbance = resampleOnto(
    absorbance.wavelengthNm,
    absorbanceRaw,
    spectrum.wavelengthNm,
    'the absorbance spectrum',
  );
  const [x1, x2] = resolved.excitationZoneCm;
  const [y1, y2] = resolved.emissionZoneCm;
  const perCmExcitation = absorbanceAtExcitation / resolved.cellPathCm;
  const excitationFactor =
    resolved.method === 'geometric' ? geometricInnerFilterFactor(perCmExcitation, x1, x2) : Number.NaN;
  let largestEmissionAbsorbance = 0;
  const out = new Float64Array(spectrum.values.length);
  for (let i = 0; i < out.length; i++) {
    const absorbanceAtEmission = Math.max(0, itemAt(emissionAbsorbance, i) * toCell);
    if (absorbanceAtEmission > resolved.maxAbsorbance) {
      throw new AnalysisFailed(
        'OUT_OF_RANGE',
        `the cell absorbance at the emission wavelength ${spectrum.wavelengthNm[i]} nm is ${absorbanceAtEmission.toFixed(3)}, ` +
          `above the validity limit ${resolved.maxAbsorbance}; trim the emission range or dilute the sample`,
      );
    }
    largestEmissionAbsorbance = Math.max(largestEmissionAbsorbance, absorbanceAtEmission);
    const factor =
      resolved.method === 'geometric'
        ? excitationFactor * geometricInnerFilterFactor(absorbanceAtEmission / resolved.cellPathCm, y1, y2)
        : centredInnerFilterFactor(absorbanceAtExcitation, absorbanceAtEmission);
    out[i] = itemAt(spectrum.values, i) * factor;
  }
  if (largestEmissionAbsorbance > resolved.warnAbsorbance) {
    warnings.push(
      `the cell absorbance reaches ${largestEmissionAbsorbance.toFixed(3)} inside the emission range (re-absorption corrected)`,
    );
  }
  return {
    spectrum: withValues(spectrum, out),
    record: makeCorrectionRecord(
      'correctInnerFilter',
      { absorbance },
      {
        method: resolved.method,
        excitationNm,
        absorbanceAtExcitation,
        maxAbsorbanceAtEmission: largestEmissionAbsorbance,
        absorbancePathLengthCm: absorbancePathCm,
        cellPathCm: resolved.cellPathCm,
        ...(resolved.method === 'geometric'
          ? { excitationZoneFromCm: x1, excitationZoneToCm: x2, emissionZoneFromCm: y1, emissionZoneToCm: y2 }
          : {}),
        warnAbsorbance: resolved.warnAbsorbance,
        maxAbsorbance: resolved.maxAbsorbance,
      },
      warnings,
    ),
  };
}
