// Axis-unit vocabulary: recognises the unit of an axis column from its name or a unit label
// (nm, µm, cm⁻¹, eV; ps … s; channel numbers) and gives the factor to the model's unit.
import { itemAt } from '../model/item-at.js';

/** The physical quantity an axis carries. */
export type AxisQuantity = 'wavelength' | 'wavenumber' | 'raman-shift' | 'energy' | 'time' | 'channel';

/** A recognised axis unit: its quantity, a canonical symbol and the factor to the model unit (nm for wavelength, ns for time). */
export interface AxisUnit {
  readonly quantity: AxisQuantity;
  readonly symbol: string;
  /** Multiply by this to reach nm (wavelength) or ns (time); 1 for wavenumber, energy and channel. */
  readonly toModelFactor: number;
}

const UNIT_TABLE: ReadonlyArray<readonly [readonly string[], AxisUnit]> = [
  [
    ['nm', 'nanometer', 'nanometers', 'nanometre', 'nanometres'],
    { quantity: 'wavelength', symbol: 'nm', toModelFactor: 1 },
  ],
  [
    ['um', 'micrometer', 'micrometers', 'micrometre', 'micrometres', 'micron', 'microns'],
    { quantity: 'wavelength', symbol: 'µm', toModelFactor: 1000 },
  ],
  [
    ['cm-1', '1/cm', 'cm^-1', 'cm**-1', '/cm', 'cm-¹', 'kayser'],
    { quantity: 'wavenumber', symbol: 'cm-1', toModelFactor: 1 },
  ],
  [
    ['ev', 'electronvolt', 'electronvolts', 'electron volt', 'electron volts'],
    { quantity: 'energy', symbol: 'eV', toModelFactor: 1 },
  ],
  [['ps', 'picosecond', 'picoseconds'], { quantity: 'time', symbol: 'ps', toModelFactor: 1e-3 }],
  [['ns', 'nanosecond', 'nanoseconds'], { quantity: 'time', symbol: 'ns', toModelFactor: 1 }],
  [['us', 'microsecond', 'microseconds', 'usec'], { quantity: 'time', symbol: 'µs', toModelFactor: 1e3 }],
  [['ms', 'millisecond', 'milliseconds', 'msec'], { quantity: 'time', symbol: 'ms', toModelFactor: 1e6 }],
  [['s', 'sec', 'second', 'seconds'], { quantity: 'time', symbol: 's', toModelFactor: 1e9 }],
  [
    ['channel', 'channels', 'ch', 'chan', 'channel number', 'channel no', 'channel index', 'bin', 'bins', 'index'],
    { quantity: 'channel', symbol: 'channel', toModelFactor: 1 },
  ],
];

const UNIT_BY_NAME = new Map<string, AxisUnit>(
  UNIT_TABLE.flatMap(([names, unit]) => names.map((name) => [name, unit] as const)),
);

/** Axis names that imply a unit when no unit is written (the trade's default). */
const NAME_DEFAULTS: ReadonlyArray<readonly [RegExp, AxisUnit]> = [
  [/^(wavelength|wave length|lambda|λ|wl)$/, { quantity: 'wavelength', symbol: 'nm', toModelFactor: 1 }],
  [/^(wavenumber|wavenumbers|wave number)$/, { quantity: 'wavenumber', symbol: 'cm-1', toModelFactor: 1 }],
  [/^(energy|photon energy)$/, { quantity: 'energy', symbol: 'eV', toModelFactor: 1 }],
];

/** Words that name an axis quantity without a unit. */
const AXIS_WORDS =
  /^(wavelength|wave length|lambda|λ|wl|wavenumber|wavenumbers|wave number|energy|photon energy|time|delay|t|x|channel|channels|ch|chan|bin|index|raman shift|shift|raman|wavenumber shift|stokes shift)$/;

/** Axis names of a relative wavenumber: a shift from the excitation line (Raman), not an absolute wavenumber. */
const SHIFT_WORDS = /\b(raman|shift|stokes)\b|^(δ|delta|Δ)/;

/** The relative-wavenumber axis unit (cm⁻¹ from the excitation line). */
export const RAMAN_SHIFT_UNIT: AxisUnit = Object.freeze({
  quantity: 'raman-shift',
  symbol: 'cm-1 shift',
  toModelFactor: 1,
});

/** An axis base name as lower-case words: camel case and _ . separators split ("Raman_Shift" → "raman shift"). */
export function axisBaseWords(base: string): string {
  return normaliseUnitText(splitCamelCase(base).replace(/[_.]+/g, ' '));
}

/** Canonical lower-case form of a unit label: micro signs → u, superscripts → ASCII, spaces trimmed. */
export function normaliseUnitText(text: string): string {
  return text
    .toLowerCase()
    .replace(/[µμ]/g, 'u')
    .replace(/⁻¹/g, '-1')
    .replace(/⁻/g, '-')
    .replace(/¹/g, '1')
    .replace(/\s+/g, ' ')
    .trim();
}

/** Looks up one unit label (e.g. "nm", "1/cm", "µs", "NANOMETERS"); undefined when unknown. */
export function lookupAxisUnit(label: string): AxisUnit | undefined {
  const key = normaliseUnitText(label);
  return UNIT_BY_NAME.get(key) ?? UNIT_BY_NAME.get(key.replace(/ /g, ''));
}

/** Unit labels that may end a name without brackets ("time_ns", "timeNs", "wl_nm"); channel words only count as a whole name. */
function isTrailingUnit(label: string): boolean {
  const unit = lookupAxisUnit(label);
  return unit !== undefined && unit.quantity !== 'channel';
}

/** Splits camel case into words: "timeNs" → "time Ns", "IRFCounts" → "IRF Counts", "lambdaNM" → "lambda NM". */
export function splitCamelCase(text: string): string {
  return text.replace(/([a-z0-9])([A-Z])/g, '$1 $2').replace(/([A-Z]+)([A-Z][a-z])/g, '$1 $2');
}

/**
 * Splits a column name into a base name and a trailing unit, whatever the separator or case:
 * "Wavelength (nm)", "time [ps]", "t/ns", "time in ns", "time_ns", "TIME_PS", "timeNs", "time-ps",
 * "wavenumber_cm-1" or a bare "nm". `isUnit` decides what counts as a unit label (default: the axis units).
 */
export function splitNameAndUnit(
  name: string,
  isUnit: (label: string) => boolean = isTrailingUnit,
): { base: string; unitLabel: string | null } {
  const trimmed = name.trim();
  const bracket = /^(.*?)[\s_]*[([{]\s*([^()[\]{}]+?)\s*[)\]}]\s*$/.exec(trimmed);
  if (bracket !== null && (bracket[1] ?? '').trim() !== '')
    return { base: (bracket[1] ?? '').trim(), unitLabel: bracket[2] ?? null };
  if (bracket !== null && lookupAxisUnit(bracket[2] ?? '') !== undefined)
    return { base: '', unitLabel: bracket[2] ?? null };
  const slash = /^(.*?[^\s/])\s*\/\s*([^/]+)$/.exec(trimmed);
  if (slash !== null && (slash[1] ?? '') !== '1' && isUnit(slash[2] ?? '')) {
    return { base: (slash[1] ?? '').trim(), unitLabel: (slash[2] ?? '').trim() };
  }
  const inWord = /^(.*\S)\s+in\s+(\S+)$/i.exec(trimmed);
  if (inWord !== null && isUnit(inWord[2] ?? ''))
    return { base: (inWord[1] ?? '').trim(), unitLabel: (inWord[2] ?? '').trim() };
  const words = /^(.*?[^\s_])[\s_]+([^\s_]+)$/.exec(trimmed);
  if (words !== null && isUnit(words[2] ?? '')) {
    return { base: (words[1] ?? '').trim(), unitLabel: (words[2] ?? '').trim() };
  }
  const dashed = /^(.*?[A-Za-z])-([A-Za-zµμ]+)$/.exec(trimmed);
  if (dashed !== null && isUnit(dashed[2] ?? ''))
    return { base: (dashed[1] ?? '').trim(), unitLabel: dashed[2] ?? null };
  if (!/[\s_]/.test(trimmed)) {
    const glued = gluedUnit(trimmed, isUnit);
    if (glued !== undefined) return glued;
  }
  return { base: trimmed, unitLabel: null };
}

/** A unit glued on in camel case ("timeNs", "repRateMHz", "lambdaNM"): tried at each lower-to-upper case step from the right. */
export function gluedUnit(
  text: string,
  isUnit: (label: string) => boolean,
): { base: string; unitLabel: string } | undefined {
  for (let at = text.length - 1; at > 0; at--) {
    if (!/[A-Z]/.test(itemAt(text, at)) || !/[a-z]/.test(itemAt(text, at - 1))) continue;
    const unit = text.slice(at);
    if (isUnit(unit)) return { base: text.slice(0, at), unitLabel: unit };
  }
  return undefined;
}

/** Result of reading an axis column name: the unit (if known), the label as written, and whether the name looks like an axis at all. */
export interface AxisNameReading {
  readonly unit: AxisUnit | undefined;
  readonly unitLabel: string | null;
  readonly looksLikeAxis: boolean;
  /** True when the unit came from the name's default (e.g. "wavelength" → nm), not a written unit. */
  readonly assumed: boolean;
}

/** Reads the axis unit from a column name: written unit first, then the whole name as a unit, then name defaults. */
export function readAxisName(name: string): AxisNameReading {
  const { base, unitLabel } = splitNameAndUnit(name);
  const baseKey = axisBaseWords(base);
  const shift = SHIFT_WORDS.test(baseKey);
  if (unitLabel !== null) {
    const written = lookupAxisUnit(unitLabel);
    const unit = shift && written?.quantity === 'wavenumber' ? RAMAN_SHIFT_UNIT : written;
    return { unit, unitLabel, looksLikeAxis: unit !== undefined || AXIS_WORDS.test(baseKey), assumed: false };
  }
  if (shift && AXIS_WORDS.test(baseKey))
    return { unit: RAMAN_SHIFT_UNIT, unitLabel: null, looksLikeAxis: true, assumed: true };
  const whole = lookupAxisUnit(base);
  if (whole !== undefined) return { unit: whole, unitLabel: base, looksLikeAxis: true, assumed: false };
  for (const [pattern, unit] of NAME_DEFAULTS) {
    if (pattern.test(baseKey)) return { unit, unitLabel: null, looksLikeAxis: true, assumed: true };
  }
  return { unit: undefined, unitLabel: null, looksLikeAxis: AXIS_WORDS.test(baseKey), assumed: false };
}

/** hc in eV·nm (CODATA 2018: 1239.84198…), for E[eV] = hc / λ[nm]. */
export const HC_EV_NM = 1239.84198;
/** 10^7 nm·cm⁻¹, for λ[nm] = 10^7 / ν̃[cm⁻¹]. */
export const NM_PER_INVERSE_CM = 1e7;
