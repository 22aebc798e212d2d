// Dynamic viscosities of common solvents near room temperature, and the Smoluchowski–Debye diffusion limit.
import { InputRejected } from '../model/errors.js';
import type { ReferenceStatus } from './reference-status.js';

export interface SolventViscosity {
  readonly id: string;
  readonly names: readonly string[];
  readonly viscosityPaS: number;
  readonly temperatureC: number;
  readonly status: ReferenceStatus;
  readonly source: string;
}

const CRC_MEMORY = 'CRC Handbook of Chemistry and Physics, "Viscosity of liquids" (from memory)';

/** Viscosities at 25 °C (all from memory, CRC Handbook; use for order-of-magnitude diffusion limits only). */
export const SOLVENT_VISCOSITIES: readonly SolventViscosity[] = Object.freeze([
  {
    id: 'water',
    names: ['water', 'h2o', '0.5 m h2so4', '0.1 m hclo4', '0.1 m naoh'],
    viscosityPaS: 0.89e-3,
    temperatureC: 25,
    status: 'memory',
    source: CRC_MEMORY,
  },
  {
    id: 'methanol',
    names: ['methanol', 'meoh'],
    viscosityPaS: 0.544e-3,
    temperatureC: 25,
    status: 'memory',
    source: CRC_MEMORY,
  },
  {
    id: 'ethanol',
    names: ['ethanol', 'etoh'],
    viscosityPaS: 1.074e-3,
    temperatureC: 25,
    status: 'memory',
    source: CRC_MEMORY,
  },
  {
    id: 'cyclohexane',
    names: ['cyclohexane'],
    viscosityPaS: 0.894e-3,
    temperatureC: 25,
    status: 'memory',
    source: CRC_MEMORY,
  },
  { id: 'toluene', names: ['toluene'], viscosityPaS: 0.56e-3, temperatureC: 25, status: 'memory', source: CRC_MEMORY },
  {
    id: 'acetonitrile',
    names: ['acetonitrile', 'mecn', 'ch3cn'],
    viscosityPaS: 0.369e-3,
    temperatureC: 25,
    status: 'memory',
    source: CRC_MEMORY,
  },
  {
    id: 'dmso',
    names: ['dmso', 'dimethyl sulfoxide'],
    viscosityPaS: 1.987e-3,
    temperatureC: 25,
    status: 'memory',
    source: CRC_MEMORY,
  },
  {
    id: 'hexane',
    names: ['hexane', 'n-hexane'],
    viscosityPaS: 0.3e-3,
    temperatureC: 25,
    status: 'memory',
    source: CRC_MEMORY,
  },
  { id: 'acetone', names: ['acetone'], viscosityPaS: 0.306e-3, temperatureC: 25, status: 'memory', source: CRC_MEMORY },
  { id: 'benzene', names: ['benzene'], viscosityPaS: 0.604e-3, temperatureC: 25, status: 'memory', source: CRC_MEMORY },
]);

/** Gas constant R in J·mol⁻¹·K⁻¹ (CODATA, exact since 2019: N_A·k_B). */
export const GAS_CONSTANT_J_PER_MOL_K = 8.314462618;

/** The viscosity row for a solvent id or name (case-insensitive), or throws InputRejected INPUT_INVALID. */
export function viscosityOf(nameOrId: string): SolventViscosity {
  const wanted = nameOrId.trim().toLowerCase().replace(/\s+/g, ' ');
  const row = SOLVENT_VISCOSITIES.find((r) => r.id === wanted || r.names.includes(wanted));
  if (row === undefined) {
    throw new InputRejected(
      'INPUT_INVALID',
      `no viscosity tabulated for "${nameOrId}"; give it in Pa·s or use ${SOLVENT_VISCOSITIES.map((r) => r.id).join(', ')}`,
    );
  }
  return row;
}

/** k_diff = 8RT/(3η) in M⁻¹s⁻¹ (Smoluchowski–Debye; REFERENCES.md), T in K, η in Pa·s (×1000 L/m³). */
export function diffusionLimitPerMPerS(temperatureK: number, viscosityPaS: number): number {
  if (!(temperatureK > 0) || !(viscosityPaS > 0))
    throw new InputRejected(
      'INPUT_INVALID',
      `temperature ${temperatureK} K and viscosity ${viscosityPaS} Pa·s must be positive`,
    );
  return ((8 * GAS_CONSTANT_J_PER_MOL_K * temperatureK) / (3 * viscosityPaS)) * 1000;
}
