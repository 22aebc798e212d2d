// Public entry of the lifetime engine: fitDecay, globalFit, phasorOf, simulation helpers and the types.
export { fitDecay, AUTO_MAX_COMPONENTS } from './fit-decay.js';
export {
  resolveFitDecayOptions,
  type FitDecayOptions,
  type ResolvedFitDecayOptions,
  type ComponentChoice,
} from './options.js';
export { ESTIMATORS, type Estimator, poissonDeviance, pearsonChiSquare } from './estimators.js';
export { PARAMETER_NAMES, type ParameterName } from './parameters.js';
export type {
  ComponentResult,
  DecayFitResult,
  FitStatus,
  GlobalDecayResult,
  GlobalFitResult,
  LifetimeInterval,
  ModelSelection,
  RunsTestResult,
  SelectionCandidate,
} from './result.js';
export { createSeededRandom, samplePoisson, sampleStandardNormal, type UniformSource } from './random.js';
export { expectedDecayCounts, gaussianIrf, simulateDecay, type DecaySimulation } from './simulate.js';
export { fullWidthHalfMaximumNs } from './irf-metrics.js';
export { coatesCorrection, PILE_UP_RATE_FRACTION } from './pile-up.js';
export { durbinWatson, residualAutocorrelation, runsTest } from './residual-tests.js';
export { chiSquareQuantileOneDof, normalCdf, normalQuantile } from './normal-distribution.js';
export { globalFit } from './global-fit.js';
export { phasorOf, resolvePhasorOptions, type PhasorOptions, type PhasorResult } from './phasor.js';
