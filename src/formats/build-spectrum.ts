// Builds a Spectrum from raw columns: axis to ascending nm (µm × 1000; λ = 10⁷/ν̃; λ = hc/E),
// %T or T to absorbance (A = 2 − log10 %T; A = −log10 T), and for intensity spectra on a wavenumber
// or energy axis the Jacobian I(λ) = I(E)·hc/λ² (Mooney & Kambhampati, J. Phys. Chem. Lett. 4, 3316 (2013)).
import { createSpectrum, type Spectrum, type SpectrumKind } from '../model/spectrum.js';
import type { RawColumn, RawTable } from './raw-table.js';
import type { LayoutConversion } from './types.js';
import { columnRole, kindOfRole, roleSuitsKind, valueUnitOf, type ColumnRole } from './column-roles.js';
import { HC_EV_NM, NM_PER_INVERSE_CM, type AxisUnit } from './units.js';
import { checkMonotonic, reversed } from './axis-checks.js';
import { reject, withFile } from './reject.js';
import { setOwn } from './own-record.js';
import { itemAt } from '../model/item-at.js';

export interface SpectrumBuildInput {
  readonly table: RawTable;
  readonly axis: RawColumn;
  readonly unit: AxisUnit;
  readonly valueIndices: readonly number[];
  readonly requestedIndex: number | undefined;
  readonly metaKind: SpectrumKind | undefined;
  readonly kindHint: SpectrumKind | undefined;
  readonly valueUnit: string | undefined;
  readonly metadata: Record<string, unknown>;
  /** Excitation wavelength in nm (header or profile), needed to convert a Raman-shift axis. */
  readonly excitationNm: number | undefined;
  readonly file: string;
  /** Conversions applied are appended here. */
  readonly conversions: LayoutConversion[];
}

/** Kinds whose values are a spectral density and take the Jacobian on an energy or wavenumber axis. */
const DENSITY_KINDS: readonly SpectrumKind[] = ['emission', 'blank'];

/** Value units that say the numbers are not transmittance (a header naming one of them turns the %T conversion off). */
const NON_TRANSMITTANCE_UNITS: readonly string[] = [
  'absorbance',
  'a.u.',
  'au',
  'counts',
  'cps',
  'factor',
  'arbitrary units',
];

/** Picks the value column: the requested one, else the first whose role suits the expected kind, else the first value column. */
function chooseValueColumn(input: SpectrumBuildInput): number {
  if (input.requestedIndex !== undefined) return input.requestedIndex;
  const expected = input.metaKind ?? input.kindHint;
  const columns = input.table.columns;
  if (expected !== undefined) {
    const suited = input.valueIndices.find((index) => roleSuitsKind(columnRole(itemAt(columns, index).name), expected));
    if (suited !== undefined) return suited;
  }
  return itemAt(input.valueIndices, 0);
}

/** Axis values in nm, in file order; throws NON_FINITE for a wavenumber or energy ≤ 0. */
function axisToNm(input: SpectrumBuildInput): Float64Array {
  const { axis, unit, table, file } = input;
  const raw = axis.values;
  if (unit.quantity === 'raman-shift') return ramanShiftToNm(input);
  if (unit.quantity === 'wavelength') {
    if (unit.toModelFactor === 1) return raw;
    input.conversions.push({
      code: 'micrometre-to-nanometre',
      detail: `${unit.symbol} → nm (× ${unit.toModelFactor})`,
    });
    return raw.map((value) => value * unit.toModelFactor);
  }
  const numerator = unit.quantity === 'wavenumber' ? NM_PER_INVERSE_CM : HC_EV_NM;
  const nm = new Float64Array(raw.length);
  for (let i = 0; i < raw.length; i++) {
    const value = itemAt(raw, i);
    if (!(value > 0))
      reject(
        'NON_FINITE',
        `the ${unit.symbol} axis holds ${value}; it must be positive to convert to nm`,
        file,
        table.lineOfRow(i),
      );
    nm[i] = numerator / value;
  }
  input.conversions.push(
    unit.quantity === 'wavenumber'
      ? { code: 'wavenumber-to-wavelength', detail: 'λ[nm] = 10⁷ / ν̃[cm⁻¹]' }
      : { code: 'energy-to-wavelength', detail: `λ[nm] = ${HC_EV_NM} / E[eV]` },
  );
  return nm;
}

/** A Raman-shift axis to absolute wavelength: λ = 1 / (1/λex − Δν̃·10⁻⁷) nm (Δν̃ in cm⁻¹ from the excitation line); throws EXCITATION_REQUIRED without λex. */
function ramanShiftToNm(input: SpectrumBuildInput): Float64Array {
  const { axis, table, file, excitationNm } = input;
  if (excitationNm === undefined || !(excitationNm > 0)) {
    return reject(
      'EXCITATION_REQUIRED',
      `the axis "${axis.name}" is a Raman shift (relative to the excitation line), and no excitation wavelength is given`,
      file,
      table.unitLine,
    );
  }
  const inverseExcitation = NM_PER_INVERSE_CM / excitationNm;
  const nm = new Float64Array(axis.values.length);
  for (let i = 0; i < nm.length; i++) {
    const absolute = inverseExcitation - itemAt(axis.values, i);
    if (!(absolute > 0))
      reject(
        'NON_FINITE',
        `the Raman shift ${itemAt(axis.values, i)} cm⁻¹ exceeds the excitation wavenumber ${inverseExcitation} cm⁻¹`,
        file,
        table.lineOfRow(i),
      );
    nm[i] = NM_PER_INVERSE_CM / absolute;
  }
  input.conversions.push({
    code: 'raman-shift-to-wavelength',
    detail: `λ[nm] = 10⁷ / (10⁷/${excitationNm} − Δν̃[cm⁻¹]) (excitation ${excitationNm} nm)`,
  });
  return nm;
}

/** Converts a transmittance column to absorbance; throws NON_FINITE (with the line) for T ≤ 0. */
function transmittanceToAbsorbance(input: SpectrumBuildInput, values: Float64Array, percent: boolean): Float64Array {
  const out = new Float64Array(values.length);
  for (let i = 0; i < values.length; i++) {
    const t = itemAt(values, i);
    if (!(t > 0)) {
      reject(
        'NON_FINITE',
        `transmittance ${t} has no finite absorbance`,
        input.file,
        input.table.lineOfRow(i),
        'Transmittance must be above 0; clip or remove points at or below zero.',
      );
    }
    out[i] = percent ? 2 - Math.log10(t) : -Math.log10(t);
  }
  input.conversions.push(
    percent
      ? { code: 'percent-transmittance-to-absorbance', detail: 'A = 2 − log10(%T)' }
      : { code: 'transmittance-to-absorbance', detail: 'A = −log10(T)' },
  );
  return out;
}

/** Builds the Spectrum (see the file header for the conversions); throws InputRejected with file and line. */
export function buildSpectrum(input: SpectrumBuildInput): Spectrum {
  const { table, file } = input;
  const direction = checkMonotonic(input.axis.values, table.lineOfRow, file, 'axis');
  const valueIndex = chooseValueColumn(input);
  const valueColumn = itemAt(table.columns, valueIndex);
  let role: ColumnRole = columnRole(valueColumn.name);
  let values = valueColumn.values;
  const declaredUnit = input.valueUnit?.toLowerCase();
  const declaredTransmittance =
    declaredUnit === 'percent-transmittance' ||
    declaredUnit === 'transmittance' ||
    declaredUnit === '%t' ||
    declaredUnit === '%';
  const transmittanceRole =
    role === 'transmittance' || role === 'percent-transmittance' || input.metaKind === 'transmittance';
  const declaredOther = declaredUnit !== undefined && NON_TRANSMITTANCE_UNITS.includes(declaredUnit);
  if (declaredTransmittance || (transmittanceRole && !declaredOther)) {
    let max = 0;
    for (const value of values) if (value > max) max = value;
    const percent =
      role === 'percent-transmittance' ||
      declaredUnit === 'percent-transmittance' ||
      declaredUnit === '%t' ||
      declaredUnit === '%' ||
      (declaredUnit !== 'transmittance' && max > 1.5);
    values = transmittanceToAbsorbance(input, values, percent);
    role = 'absorbance';
  }
  const kind: SpectrumKind =
    role === 'absorbance' ? 'absorbance' : (input.metaKind ?? kindOfRole(role) ?? input.kindHint ?? 'emission');
  const valueUnit =
    role === 'absorbance' && values !== valueColumn.values
      ? 'absorbance'
      : (input.valueUnit ?? valueUnitOf(valueColumn.name, role));
  let wavelengthNm = axisToNm(input);
  const others: Array<[string, Float64Array]> = input.valueIndices
    .filter((index) => index !== valueIndex)
    .map((index) => [itemAt(table.columns, index).name, itemAt(table.columns, index).values]);
  if (
    input.unit.quantity === 'wavenumber' ||
    input.unit.quantity === 'raman-shift' ||
    input.unit.quantity === 'energy'
  ) {
    if (DENSITY_KINDS.includes(kind)) {
      const numerator = input.unit.quantity === 'energy' ? HC_EV_NM : NM_PER_INVERSE_CM;
      const jacobian = (column: Float64Array): Float64Array =>
        column.map((value, i) => (value * numerator) / itemAt(wavelengthNm, i) ** 2);
      values = jacobian(values);
      for (const entry of others) entry[1] = jacobian(entry[1]);
      input.conversions.push({
        code: 'jacobian-intensity',
        detail: `I(λ) = I(${input.unit.symbol})·${numerator}/λ² on every value column`,
      });
    }
  }
  const ascendingInNm =
    (input.unit.quantity === 'wavelength' || input.unit.quantity === 'raman-shift') === (direction === 1);
  if (!ascendingInNm) {
    wavelengthNm = reversed(wavelengthNm);
    values = reversed(values);
    for (const entry of others) entry[1] = reversed(entry[1]);
    input.conversions.push({ code: 'axis-reversed', detail: 'points reordered to ascending wavelength' });
  }
  const otherColumns: Record<string, Float64Array> = {};
  for (const [name, column] of others) setOwn(otherColumns, name, column);
  return withFile(file, () =>
    createSpectrum({
      kind,
      wavelengthNm,
      values,
      valueUnit,
      valueColumn: valueColumn.name,
      otherColumns,
      metadata: input.metadata,
    }),
  );
}
