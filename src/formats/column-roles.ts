// What a value column holds, judged from its name ("Absorbance", "%T", "IRF", "counts", …), and
// what a free-text kind ("UV/VIS SPECTRUM", "Emission scan", "TCSPC decay") names.
import type { SpectrumKind } from '../model/spectrum.js';
import { normaliseUnitText, splitNameAndUnit } from './units.js';

/** The role of a value column. */
export type ColumnRole =
  | 'irf'
  | 'counts'
  | 'absorbance'
  | 'percent-transmittance'
  | 'transmittance'
  | 'emission'
  | 'excitation'
  | 'blank'
  | 'correction'
  | 'intensity';

const ROLE_PATTERNS: ReadonlyArray<readonly [RegExp, ColumnRole]> = [
  [/\birf\b|instrument response|instrument function|\bprompt\b/, 'irf'],
  [/^%\s*t$|^t\s*%$|%\s*t\b|percent trans|^%$/, 'percent-transmittance'],
  [/transmittance|transmission|^t$/, 'transmittance'],
  [/absorbance|absorption|optical density|^abs\b|^od$|^a$/, 'absorbance'],
  [/correction|sensitivity|\bfactor\b/, 'correction'],
  [/blank|background|solvent/, 'blank'],
  [/excitation|^ex$/, 'excitation'],
  [/emission|fluorescence|photoluminescence|^em$|^pl$/, 'emission'],
  [/counts?\b|^cts$|photons|decay/, 'counts'],
];

/** The role of a column from its name; a unit label of "%" on a transmittance column makes it percent. */
export function columnRole(name: string): ColumnRole {
  const { base, unitLabel } = splitNameAndUnit(name);
  const text = normaliseUnitText(base);
  for (const [pattern, role] of ROLE_PATTERNS) {
    if (pattern.test(text)) {
      if (role === 'transmittance' && unitLabel !== null && unitLabel.trim() === '%') return 'percent-transmittance';
      return role;
    }
  }
  if (unitLabel !== null && /^(?:counts?|cts)$/i.test(unitLabel.trim())) return 'counts';
  return 'intensity';
}

/** The spectrum kind a role implies, when it implies one. */
export function kindOfRole(role: ColumnRole): SpectrumKind | undefined {
  switch (role) {
    case 'absorbance':
      return 'absorbance';
    case 'percent-transmittance':
    case 'transmittance':
      return 'transmittance';
    case 'emission':
      return 'emission';
    case 'excitation':
      return 'excitation';
    case 'blank':
      return 'blank';
    case 'correction':
      return 'detector-correction';
    default:
      return undefined;
  }
}

const KIND_PATTERNS: ReadonlyArray<readonly [RegExp, SpectrumKind | 'decay']> = [
  [/decay|tcspc|lifetime|histogram|time.?resolved|trpl/, 'decay'],
  [/blank|solvent|background/, 'blank'],
  [/correction|sensitivity|detector/, 'detector-correction'],
  [/transmi|%t/, 'transmittance'],
  [/absorb|uv.?vis|optical density/, 'absorbance'],
  [/excitation/, 'excitation'],
  [/emission|fluorescence|photoluminescence|^pl$/, 'emission'],
];

/** Reads a free-text kind ("emission", "UV/VIS SPECTRUM", "TCSPC decay"); undefined when it names none. */
export function parseKindWords(text: string): SpectrumKind | 'decay' | undefined {
  const lower = text.toLowerCase().trim();
  for (const [pattern, kind] of KIND_PATTERNS) if (pattern.test(lower)) return kind;
  return undefined;
}

/** True when a column of `role` suits a spectrum of `kind` (used to pick the value column). */
export function roleSuitsKind(role: ColumnRole, kind: SpectrumKind): boolean {
  const implied = kindOfRole(role);
  return implied === kind || (implied === 'transmittance' && kind === 'absorbance');
}

/** The value unit of a column: its written unit label, else the role's usual unit. */
export function valueUnitOf(name: string, role: ColumnRole): string {
  const { unitLabel } = splitNameAndUnit(name);
  if (unitLabel !== null && unitLabel.trim() !== '' && role !== 'percent-transmittance') return unitLabel.trim();
  switch (role) {
    case 'absorbance':
      return 'absorbance';
    case 'percent-transmittance':
      return 'percent-transmittance';
    case 'transmittance':
      return 'transmittance';
    case 'counts':
    case 'irf':
      return 'counts';
    case 'correction':
      return 'factor';
    default:
      return 'a.u.';
  }
}
