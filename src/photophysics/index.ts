// Public entry of the photophysics core: quantum yields, standards, rate constants, kinetic schemes,
// Strickler–Berg and Stern–Volmer.
export type { ReferenceStatus } from './reference-status.js';
export {
  SOLVENT_REFRACTIVE_INDICES,
  findSolvent,
  refractiveIndexOf,
  type SolventRefractiveIndex,
} from './refractive-indices.js';
export {
  BROUWER_2011,
  STANDARDS,
  findStandard,
  standardUncertaintyBasis,
  standardWarnings,
  type QuantumYieldStandard,
} from './standards.js';
export { combineUncertainty, type BudgetInput, type BudgetLine, type UncertaintyBudget } from './uncertainty-budget.js';
export { absorptanceFromAbsorbance } from './absorptance.js';
export {
  relativeQuantumYield,
  resolveRelativeYieldOptions,
  type RelativeYieldInput,
  type RelativeYieldOptions,
  type RelativeYieldUncertainties,
  type QuantumYieldResult,
} from './relative-yield.js';
export {
  gradientQuantumYield,
  resolveGradientYieldOptions,
  type GradientYieldInput,
  type GradientYieldOptions,
  type GradientYieldResult,
  type DilutionSeries,
} from './gradient-yield.js';
export { fitThroughOrigin, type OriginLineFit } from './linear-fit.js';
export {
  rateConstantsFromYield,
  yieldsFromRateConstants,
  rateFromTimeScale,
  type RateConstants,
} from './rate-constants.js';
export { PROCESS_KINDS, PROCESS_TIME_SCALES, timeScalePlausibility, type ProcessKind } from './time-scales.js';
export { expm } from './expm.js';
export type { SquareMatrix } from './matrix.js';
export {
  solveKineticScheme,
  rateMatrix,
  DEFAULT_STATES,
  type KineticProcess,
  type KineticSchemeInput,
  type KineticSchemeResult,
  type ProcessYield,
} from './kinetic-scheme.js';
export {
  stricklerBergRate,
  resolveStricklerBergOptions,
  STRICKLER_BERG_CONSTANT,
  type StricklerBergOptions,
  type StricklerBergResult,
} from './strickler-berg.js';
export { SOLVENT_VISCOSITIES, viscosityOf, diffusionLimitPerMPerS, type SolventViscosity } from './viscosities.js';
export {
  sternVolmer,
  resolveSternVolmerOptions,
  type QuenchSeriesInput,
  type SternVolmerOptions,
  type SternVolmerResult,
  type QuenchingMechanism,
} from './stern-volmer.js';
export {
  quantumYieldFromSpectra,
  type LabelledUncertainty,
  type SpectraYieldInput,
  type SpectraYieldResult,
} from './yield-from-spectra.js';
