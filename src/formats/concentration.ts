// Quencher (or any solute) concentration columns: "[KI] (mM)", "acrylamide (µM)", "quencher_M",
// "c [mol/L]" are one name with a unit, read by their parts like every other name; the unit gives
// the factor to mol/L (M). Case matters here: "mM" is millimolar, "mm" would be millimetres.
import { splitNameAndUnit } from './units.js';

/** Factors from a concentration unit to mol/L (SI prefixes; M = mol/L = mol dm⁻³). */
const TO_MOLAR: Readonly<Record<string, number>> = {
  M: 1,
  mM: 1e-3,
  uM: 1e-6,
  µM: 1e-6,
  μM: 1e-6,
  nM: 1e-9,
  'mol/L': 1,
  'mol/l': 1,
  'mmol/L': 1e-3,
  'mmol/l': 1e-3,
  'umol/L': 1e-6,
  'µmol/L': 1e-6,
  'μmol/L': 1e-6,
  'umol/l': 1e-6,
  'µmol/l': 1e-6,
  'mol dm-3': 1,
  'mol/dm3': 1,
};

function isConcentrationUnit(label: string): boolean {
  return TO_MOLAR[label.trim()] !== undefined;
}

/** Reads a column name as a concentration with its unit ("[KI] (mM)" → KI, 0.001); undefined when the name carries no concentration unit. */
export function readConcentrationName(
  name: string,
): { readonly species: string; readonly unit: string; readonly toMolar: number } | undefined {
  const { base, unitLabel } = splitNameAndUnit(name, isConcentrationUnit);
  if (unitLabel === null) return undefined;
  const factor = TO_MOLAR[unitLabel.trim()];
  if (factor === undefined) return undefined;
  const species = base
    .trim()
    .replace(/^\[(.*)\]$/, '$1')
    .trim();
  return { species: species === '' ? 'quencher' : species, unit: unitLabel.trim(), toMolar: factor };
}
