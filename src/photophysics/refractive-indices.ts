// Refractive indices of common solvents at the sodium D line, with source and status, found by name.
import { InputRejected } from '../model/errors.js';
import type { ReferenceStatus } from './reference-status.js';

export interface SolventRefractiveIndex {
  readonly id: string;
  readonly names: readonly string[];
  /** n at the sodium D line (589 nm). */
  readonly refractiveIndex: number;
  readonly temperatureC: number | undefined;
  /** Standard uncertainty assumed for n: 0.0005 for confirmed 4-decimal values (covers ±5 K at dn/dT ≈ −1e−4/K), 0.002 for memory values. */
  readonly standardUncertainty: number;
  readonly status: ReferenceStatus;
  readonly source: string;
}

const CRC = 'CRC Handbook of Chemistry and Physics';

/** Solvent refractive-index table (sodium D line; CRC Handbook where confirmed). */
export const SOLVENT_REFRACTIVE_INDICES: readonly SolventRefractiveIndex[] = Object.freeze([
  {
    id: 'water',
    names: ['water', 'h2o'],
    refractiveIndex: 1.333,
    temperatureC: 20,
    standardUncertainty: 0.0005,
    status: 'confirmed',
    source: `${CRC}: 1.33336`,
  },
  {
    id: 'methanol',
    names: ['methanol', 'meoh'],
    refractiveIndex: 1.329,
    temperatureC: 20,
    standardUncertainty: 0.0005,
    status: 'confirmed',
    source: CRC,
  },
  {
    id: 'ethanol',
    names: ['ethanol', 'etoh'],
    refractiveIndex: 1.3618,
    temperatureC: 20,
    standardUncertainty: 0.0005,
    status: 'confirmed',
    source: CRC,
  },
  {
    id: 'cyclohexane',
    names: ['cyclohexane'],
    refractiveIndex: 1.4262,
    temperatureC: 20,
    standardUncertainty: 0.0005,
    status: 'confirmed',
    source: CRC,
  },
  {
    id: 'toluene',
    names: ['toluene'],
    refractiveIndex: 1.4969,
    temperatureC: 20,
    standardUncertainty: 0.0005,
    status: 'confirmed',
    source: CRC,
  },
  {
    id: 'acetonitrile',
    names: ['acetonitrile', 'mecn', 'ch3cn'],
    refractiveIndex: 1.3442,
    temperatureC: 20,
    standardUncertainty: 0.0005,
    status: 'confirmed',
    source: CRC,
  },
  {
    id: 'dmso',
    names: ['dmso', 'dimethyl sulfoxide', 'dimethylsulfoxide'],
    refractiveIndex: 1.4768,
    temperatureC: 25,
    standardUncertainty: 0.0005,
    status: 'confirmed',
    source: CRC,
  },
  {
    id: 'h2so4-0.5m',
    names: ['0.5 m h2so4', 'h2so4 0.5 m', '0.5m h2so4', 'sulfuric acid 0.5 m'],
    refractiveIndex: 1.339,
    temperatureC: undefined,
    standardUncertainty: 0.002,
    status: 'memory',
    source: 'from memory (no published source confirmed)',
  },
  {
    id: 'hclo4-0.1m',
    names: ['0.1 m hclo4', 'hclo4 0.1 m', '0.1m hclo4', 'perchloric acid 0.1 m'],
    refractiveIndex: 1.334,
    temperatureC: undefined,
    standardUncertainty: 0.002,
    status: 'memory',
    source: 'from memory (no published source confirmed)',
  },
  {
    id: 'naoh-0.1m',
    names: ['0.1 m naoh', 'naoh 0.1 m', '0.1m naoh', 'sodium hydroxide 0.1 m'],
    refractiveIndex: 1.334,
    temperatureC: undefined,
    standardUncertainty: 0.002,
    status: 'memory',
    source: 'from memory (no published source confirmed)',
  },
]);

function normalizeName(name: string): string {
  return name
    .trim()
    .toLowerCase()
    .replace(/[_\s]+/g, ' ')
    .replace(/(\d)\s*m\b/g, '$1 m');
}

/** The table row for a solvent id or common name (case- and spacing-insensitive), or undefined. */
export function findSolvent(nameOrId: string): SolventRefractiveIndex | undefined {
  const wanted = normalizeName(nameOrId);
  const id = nameOrId.trim().toLowerCase();
  return SOLVENT_REFRACTIVE_INDICES.find(
    (row) => row.id === id || row.names.some((name) => normalizeName(name) === wanted),
  );
}

/** Refractive index (sodium D) of a solvent by id or name; throws InputRejected INPUT_INVALID listing the known ids. */
export function refractiveIndexOf(nameOrId: string): SolventRefractiveIndex {
  const row = findSolvent(nameOrId);
  if (row === undefined) {
    throw new InputRejected(
      'INPUT_INVALID',
      `no refractive index is tabulated for the solvent "${nameOrId}"; give it explicitly or use one of ` +
        SOLVENT_REFRACTIVE_INDICES.map((r) => r.id).join(', '),
    );
  }
  return row;
}
