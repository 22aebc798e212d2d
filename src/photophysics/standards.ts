// Fluorescence quantum-yield standards, selectable by id, with solvent, temperature, n, Φ, u(Φ), valid
// excitation range, the published source a lab cites, and how sure the value in this table is. A value
// whose source cannot be given is not in this table (a test checks every row has one).
import { InputRejected } from '../model/errors.js';
import { formatSignificant } from '../model/format-number.js';
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
  /** How u(Φ) was obtained: 'stated' (published ±), 'range' (half-range/√3, rectangular, GUM 4.3.7), 'assumed' (4 %, the ±3–5 % tolerance usual for values not re-read in their source). */
  readonly uncertaintyBasis: 'stated' | 'range' | 'assumed';
  /** Valid excitation range in nm, or undefined when none is stated (no check). */
  readonly excitationRangeNm: readonly [number, number] | undefined;
  /** Measurement temperature as the source gives it, or what is known of it. */
  readonly temperature: string;
  readonly status: ReferenceStatus;
  /** The publication to cite: authors, journal, volume, first page (year). */
  readonly source: string;
  readonly notes: string;
}

/** The IUPAC technical report that reviews quantum-yield standards in solution (citation confirmed). */
export const BROUWER_2011 = 'Brouwer, Pure Appl. Chem. 83, 2213 (2011), doi:10.1351/PAC-REP-10-09-31';

function standard(row: Omit<QuantumYieldStandard, 'refractiveIndex'>): QuantumYieldStandard {
  return Object.freeze({ ...row, refractiveIndex: refractiveIndexOf(row.solventId).refractiveIndex });
}

/** Half-range over √3: standard uncertainty of a rectangular distribution (GUM, JCGM 100:2008 §4.3.7). */
const rectangular = (low: number, high: number): number => (high - low) / 2 / Math.sqrt(3);

/** The quantum-yield standards table; `status` says whether the value was read in its source ('confirmed') or not yet ('memory'). */
export const STANDARDS: readonly QuantumYieldStandard[] = Object.freeze([
  standard({
    id: 'quinine-h2so4-0.5m',
    compound: 'quinine sulfate',
    solvent: '0.5 M H2SO4',
    solventId: 'h2so4-0.5m',
    quantumYield: 0.546,
    standardUncertainty: 0.546 * 0.04,
    uncertaintyBasis: 'assumed',
    excitationRangeNm: [310, 365],
    temperature: 'room temperature (20–25 °C; from memory); Φ falls as T rises',
    status: 'memory',
    source: 'Melhuish, J. Phys. Chem. 65, 229 (1961)',
    notes: `reviewed in ${BROUWER_2011}`,
  }),
  standard({
    id: 'quinine-hclo4-0.1m',
    compound: 'quinine',
    solvent: '0.1 M HClO4',
    solventId: 'hclo4-0.1m',
    quantumYield: 0.6,
    standardUncertainty: 0.02,
    uncertaintyBasis: 'stated',
    excitationRangeNm: undefined,
    temperature: 'room temperature (20–25 °C); nearly temperature-independent',
    status: 'memory',
    source: BROUWER_2011,
    notes: 'preferred medium for quinine',
  }),
  standard({
    id: 'fluorescein-naoh-0.1m',
    compound: 'fluorescein',
    solvent: '0.1 M NaOH',
    solventId: 'naoh-0.1m',
    quantumYield: 0.925,
    standardUncertainty: 0.015,
    uncertaintyBasis: 'stated',
    excitationRangeNm: [470, 496],
    temperature: 'room temperature (20–25 °C; from memory)',
    status: 'memory',
    source: 'Magde, Wong & Seybold, Photochem. Photobiol. 75, 327 (2002)',
    notes: `${BROUWER_2011} gives 0.95 ± 0.03; absolute 0.90 ± 0.02 by integrating sphere (NIST)`,
  }),
  standard({
    id: 'rhodamine-6g-ethanol',
    compound: 'rhodamine 6G',
    solvent: 'ethanol',
    solventId: 'ethanol',
    quantumYield: 0.95,
    standardUncertainty: 0.95 * 0.04,
    uncertaintyBasis: 'assumed',
    excitationRangeNm: undefined,
    temperature: 'room temperature (20–25 °C; from memory)',
    status: 'memory',
    source: 'Kubin & Fletcher, J. Lumin. 27, 455 (1982)',
    notes: '',
  }),
  standard({
    id: 'rhodamine-101-ethanol',
    compound: 'rhodamine 101',
    solvent: 'ethanol',
    solventId: 'ethanol',
    quantumYield: 0.955,
    standardUncertainty: rectangular(0.91, 1.0),
    uncertaintyBasis: 'range',
    excitationRangeNm: undefined,
    temperature: 'room temperature (20–25 °C; from memory)',
    status: 'memory',
    source: 'Karstens & Kobs, J. Phys. Chem. 84, 1871 (1980)',
    notes: 'published range 0.91–1.0',
  }),
  standard({
    id: 'cresyl-violet-methanol',
    compound: 'cresyl violet',
    solvent: 'methanol',
    solventId: 'methanol',
    quantumYield: 0.54,
    standardUncertainty: 0.03,
    uncertaintyBasis: 'stated',
    excitationRangeNm: undefined,
    temperature: 'room temperature (20–25 °C; from memory)',
    status: 'confirmed',
    source: 'Magde, Brannon, Cremers & Olmsted, J. Phys. Chem. 83, 696 (1979)',
    notes: '',
  }),
  standard({
    id: 'dpa-cyclohexane',
    compound: '9,10-diphenylanthracene',
    solvent: 'cyclohexane',
    solventId: 'cyclohexane',
    quantumYield: 0.935,
    standardUncertainty: rectangular(0.9, 0.97),
    uncertaintyBasis: 'range',
    excitationRangeNm: undefined,
    temperature: 'room temperature (20–25 °C; from memory)',
    status: 'memory',
    source: 'Morris, Mahaney & Huber, J. Phys. Chem. 80, 969 (1976)',
    notes: 'published range 0.90–0.97',
  }),
]);

/** The standard with this id, or throws InputRejected INPUT_INVALID listing the ids. */
export function findStandard(id: string): QuantumYieldStandard {
  const row = STANDARDS.find((s) => s.id === id.trim().toLowerCase());
  if (row === undefined) {
    throw new InputRejected(
      'INPUT_INVALID',
      `unknown quantum-yield standard "${id}"; known: ${STANDARDS.map((s) => s.id).join(', ')}`,
    );
  }
  return row;
}

/** Warnings for using `standard` at excitationNm (nm): outside its valid range, or a memory value. */
export function standardWarnings(standard: QuantumYieldStandard, excitationNm: number | undefined): string[] {
  const warnings: string[] = [];
  const range = standard.excitationRangeNm;
  if (range !== undefined && excitationNm !== undefined && (excitationNm < range[0] || excitationNm > range[1])) {
    warnings.push(
      `excitation at ${excitationNm} nm is outside the range ${range[0]}–${range[1]} nm recommended for ${standard.id}`,
    );
  }
  if (standard.status === 'memory') {
    warnings.push(
      `Φ = ${standard.quantumYield} ± ${formatSignificant(standard.standardUncertainty, 2)} for ${standard.id} (${standard.solvent}, ${standard.temperature}) is cited to ` +
        `${standard.source} but was not yet re-read in that source for this table (from memory): confirm it there, or state your own value ` +
        'and its uncertainty in references[].quantumYield and quantumYieldStdUncertainty',
    );
  }
  return warnings;
}

/** How u(Φ) of a standard was obtained, as a budget-line basis: stated in the source, from a published range, or assumed. */
export function standardUncertaintyBasis(standard: QuantumYieldStandard): string {
  if (standard.uncertaintyBasis === 'stated') return `stated in ${standard.source}`;
  if (standard.uncertaintyBasis === 'range')
    return `estimated from the published range (half-range/√3, GUM 4.3.7), ${standard.source}`;
  return `assumed: 4 % of the value (no uncertainty published in ${standard.source})`;
}
