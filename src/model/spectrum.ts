// The normalized spectrum: one value column on an ascending wavelength axis (nm), plus metadata.
// Every reader produces this; every correction consumes and returns it. Invariants are enforced here.
import { InputRejected } from './errors.js';
import { assertAllFinite, assertStrictlyAscending } from './invariants.js';

export const SPECTRUM_KINDS = [
  'emission',
  'excitation',
  'absorbance',
  'transmittance',
  'blank',
  'detector-correction',
] as const;
export type SpectrumKind = (typeof SPECTRUM_KINDS)[number];

/** What the measurement was taken for in the lab's workflow (set assembly uses this). */
export const MEASUREMENT_ROLES = [
  'sample',
  'control',
  'reference',
  'blank',
  'irf',
  'absorbance',
  'detector-curve',
  'raman',
] as const;
export type MeasurementRole = (typeof MEASUREMENT_ROLES)[number];

export interface SpectrumMetadata {
  /** Excitation wavelength in nm (emission spectra, Raman). */
  readonly excitationNm?: number;
  /** Fixed emission wavelength in nm (excitation spectra). */
  readonly emissionNm?: number;
  /** Excitation monochromator band-pass in nm. */
  readonly excitationSlitNm?: number;
  /** Emission monochromator band-pass in nm. */
  readonly emissionSlitNm?: number;
  /** Integration time per point in s. */
  readonly integrationTimeS?: number;
  /** Cuvette path length in cm (absorbance). */
  readonly pathLengthCm?: number;
  /** Sample temperature in °C. */
  readonly temperatureC?: number;
  readonly solvent?: string;
  readonly sampleId?: string;
  readonly role?: MeasurementRole;
  /** Acquisition time as an ISO 8601 string, as written by the instrument. */
  readonly acquiredAt?: string;
  /** Every other header entry, verbatim (key → value). */
  readonly extra: Readonly<Record<string, string>>;
}

export interface Spectrum {
  readonly kind: SpectrumKind;
  /** Strictly ascending wavelengths in nm. */
  readonly wavelengthNm: Float64Array;
  /** The chosen value column, same length as `wavelengthNm`. */
  readonly values: Float64Array;
  /** Unit of `values`: 'counts', 'cps', 'a.u.', 'absorbance', 'percent-transmittance', 'factor', … */
  readonly valueUnit: string;
  /** Name of the column the values came from. */
  readonly valueColumn: string;
  /** Other value columns of the same export (e.g. a reference-detector channel), by column name. */
  readonly otherColumns: Readonly<Record<string, Float64Array>>;
  readonly metadata: SpectrumMetadata;
}

export interface SpectrumInput {
  readonly kind: SpectrumKind;
  readonly wavelengthNm: ArrayLike<number>;
  readonly values: ArrayLike<number>;
  readonly valueUnit?: string;
  readonly valueColumn?: string;
  readonly otherColumns?: Readonly<Record<string, ArrayLike<number>>>;
  readonly metadata?: Partial<SpectrumMetadata>;
}

/** Builds a Spectrum and enforces its invariants (≥ 2 points, finite values, strictly ascending nm axis, equal lengths); throws InputRejected. */
export function createSpectrum(input: SpectrumInput): Spectrum {
  const wavelengthNm = ownedArray(input.wavelengthNm);
  const values = ownedArray(input.values);
  if (wavelengthNm.length < 2) {
    throw new InputRejected('TOO_FEW_POINTS', `a spectrum needs at least 2 points, got ${wavelengthNm.length}`);
  }
  if (values.length !== wavelengthNm.length) {
    throw new InputRejected(
      'LENGTH_MISMATCH',
      `the value column has ${values.length} points but the wavelength axis has ${wavelengthNm.length}`,
    );
  }
  assertAllFinite(wavelengthNm, 'wavelength axis');
  assertAllFinite(values, 'values');
  assertStrictlyAscending(wavelengthNm, 'wavelength axis');
  const otherEntries: [string, Float64Array][] = [];
  for (const [name, column] of Object.entries(input.otherColumns ?? {})) {
    const copy = ownedArray(column);
    if (copy.length !== wavelengthNm.length) {
      throw new InputRejected(
        'LENGTH_MISMATCH',
        `column "${name}" has ${copy.length} points but the wavelength axis has ${wavelengthNm.length}`,
      );
    }
    assertAllFinite(copy, `column "${name}"`);
    otherEntries.push([name, copy]);
  }
  // Object.fromEntries defines own properties, so a column named "__proto__" stays a plain column.
  const otherColumns: Record<string, Float64Array> = Object.fromEntries(otherEntries);
  return Object.freeze({
    kind: input.kind,
    wavelengthNm,
    values,
    valueUnit: input.valueUnit ?? 'a.u.',
    valueColumn: input.valueColumn ?? 'value',
    otherColumns: Object.freeze(otherColumns),
    metadata: Object.freeze({ ...input.metadata, extra: Object.freeze({ ...(input.metadata?.extra ?? {}) }) }),
  });
}

/**
 * A Float64Array passed in is taken over without a copy (readers hand over freshly parsed columns,
 * which keeps peak memory near one copy of the data); callers must not mutate it afterwards.
 * Any other array-like is copied.
 */
function ownedArray(values: ArrayLike<number>): Float64Array {
  return values instanceof Float64Array ? values : Float64Array.from(values);
}

/** A copy of `spectrum` with new values (same axis), keeping metadata; used by corrections. */
export function withValues(spectrum: Spectrum, values: ArrayLike<number>, valueUnit?: string): Spectrum {
  return createSpectrum({
    kind: spectrum.kind,
    wavelengthNm: spectrum.wavelengthNm,
    values,
    valueUnit: valueUnit ?? spectrum.valueUnit,
    valueColumn: spectrum.valueColumn,
    otherColumns: spectrum.otherColumns,
    metadata: spectrum.metadata,
  });
}
