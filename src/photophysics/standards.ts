// Fluorescence quantum-yield standards (REFERENCES.md), selectable by id, with solvent, n, Φ, u(Φ),
// valid excitation range and how sure the value is.
import { InputRejected } from '../model/errors.js';
import type { ReferenceStatus } from './reference-status.js';
import { refractiveIndexOf } from './refractive-indices.js';

export interface QuantumYieldStandard {
  readonly id: string;
  readonly compound: string;
  readonly solvent: string;
  /** Solvent id in the refractive-index table. */
  readonly solventId: string;
  readonly refractiveIndex: number;
  readonly quantumYield: number;
  readonly standardUncertainty: number;
  /** How u(Φ) was obtained: 'stated' (published ±), 'range' (half-range/√3, rectangular, GUM 4.3.7), 'assumed' (4 %, REFERENCES.md tolerance note). */
  readonly uncertaintyBasis: 'stated' | 'range' | 'assumed';
  /** Valid excitation range in nm, or undefined when REFERENCES.md states none (no check). */
  readonly excitationRangeNm: readonly [number, number] | undefined;
  readonly status: ReferenceStatus;
  readonly source: string;
  readonly notes: string;
}

function standard(row: Omit<QuantumYieldStandard, 'refractiveIndex'>): QuantumYieldStandard {
  return Object.freeze({ ...row, refractiveIndex: refractiveIndexOf(row.solventId).refractiveIndex });
}

/** Half-range over √3: standard uncertainty of a rectangular distribution (GUM, JCGM 100:2008 §4.3.7). */
const rectangular = (low: number, high: number): number => (high - low) / 2 / Math.sqrt(3);

/** The quantum-yield standards table (values from REFERENCES.md "Quantum-yield standards"). */
export const STANDARDS: readonly QuantumYieldStandard[] = Object.freeze([
  standard({
    id: 'quinine-h2so4-0.5m', compound: 'quinine sulfate', solvent: '0.5 M H2SO4', solventId: 'h2so4-0.5m',
    quantumYield: 0.546, standardUncertainty: 0.546 * 0.04, uncertaintyBasis: 'assumed', excitationRangeNm: [310, 365],
    status: 'memory', source: 'Melhuish, J. Phys. Chem. 65, 229 (1961)', notes: 'temperature-dependent (falls with T)',
  }),
  standard({
    id: 'quinine-hclo4-0.1m', compound: 'quinine', solvent: '0.1 M HClO4', solventId: 'hclo4-0.1m',
    quantumYield: 0.6, standardUncertainty: 0.02, uncertaintyBasis: 'stated', excitationRangeNm: undefined,
    status: 'memory', source: 'Brouwer, Pure Appl. Chem. 83, 2213 (2011)', notes: 'nearly temperature-independent; preferred medium',
  }),
  standard({
    id: 'fluorescein-naoh-0.1m', compound: 'fluorescein', solvent: '0.1 M NaOH', solventId: 'naoh-0.1m',
    quantumYield: 0.925, standardUncertainty: 0.015, uncertaintyBasis: 'stated', excitationRangeNm: [470, 496],
    status: 'memory', source: 'Magde, Wong & Seybold, Photochem. Photobiol. 75, 327 (2002)',
    notes: 'Brouwer table gives 0.95 ± 0.03; absolute 0.90 ± 0.02 by integrating sphere (NIST)',
  }),
  standard({
    id: 'rhodamine-6g-ethanol', compound: 'rhodamine 6G', solvent: 'ethanol', solventId: 'ethanol',
    quantumYield: 0.95, standardUncertainty: 0.95 * 0.04, uncertaintyBasis: 'assumed', excitationRangeNm: undefined,
    status: 'memory', source: 'Kubin & Fletcher, J. Lumin. 27, 455 (1982)', notes: '',
  }),
  standard({
    id: 'rhodamine-101-ethanol', compound: 'rhodamine 101', solvent: 'ethanol', solventId: 'ethanol',
    quantumYield: 0.955, standardUncertainty: rectangular(0.91, 1.0), uncertaintyBasis: 'range', excitationRangeNm: undefined,
    status: 'memory', source: 'Karstens & Kobs, J. Phys. Chem. 84, 1871 (1980)', notes: 'published range 0.91–1.0',
  }),
  standard({
    id: 'cresyl-violet-methanol', compound: 'cresyl violet', solvent: 'methanol', solventId: 'methanol',
    quantumYield: 0.54, standardUncertainty: 0.03, uncertaintyBasis: 'stated', excitationRangeNm: undefined,
    status: 'confirmed', source: 'Magde, Brannon, Cremers & Olmsted, J. Phys. Chem. 83, 696 (1979)', notes: '',
  }),
  standard({
    id: 'dpa-cyclohexane', compound: '9,10-diphenylanthracene', solvent: 'cyclohexane', solventId: 'cyclohexane',
    quantumYield: 0.935, standardUncertainty: rectangular(0.9, 0.97), uncertaintyBasis: 'range', excitationRangeNm: undefined,
    status: 'memory', source: 'Morris, Mahaney & Huber, J. Phys. Chem. 80, 969 (1976)', notes: 'published range 0.90–0.97',
  }),
]);

/** The standard with this id, or throws InputRejected INPUT_INVALID listing the ids. */
export function findStandard(id: string): QuantumYieldStandard {
  const row = STANDARDS.find((s) => s.id === id.trim().toLowerCase());
  if (row === undefined) {
    throw new InputRejected('INPUT_INVALID', `unknown quantum-yield standard "${id}"; known: ${STANDARDS.map((s) => s.id).join(', ')}`);
  }
  return row;
}

/** Warnings for using `standard` at excitationNm (nm): outside its valid range, or a memory value. */
export function standardWarnings(standard: QuantumYieldStandard, excitationNm: number | undefined): string[] {
  const warnings: string[] = [];
  const range = standard.excitationRangeNm;
  if (range !== undefined && excitationNm !== undefined && (excitationNm < range[0] || excitationNm > range[1])) {
    warnings.push(`excitation at ${excitationNm} nm is outside the range ${range[0]}–${range[1]} nm recommended for ${standard.id}`);
  }
  if (standard.status === 'memory') warnings.push(`the yield of ${standard.id} (${standard.quantumYield}) is from memory, not yet confirmed in its source`);
  return warnings;
}
