// Turns a finished single-decay fit into the plain-JSON DecayFitResult: components with standard errors
// (inverse Fisher information) and profile intervals, mean lifetimes, goodness of fit, residual tests,
// information criteria and warnings.
import type { ComponentFit } from './component-fit.js';
import { fitAcceptability } from './acceptability.js';
import { estimatorResiduals, pearsonChiSquare, poissonDeviance } from './estimators.js';
import { akaikeCriterion, bayesianCriterion } from './information-criteria.js';
import { invertPositiveDefinite } from './linear-algebra.js';
import { chiSquareQuantileOneDof } from './normal-distribution.js';
import type { ResolvedFitDecayOptions } from './options.js';
import type { PreparedDecay } from './prepare-decay.js';
import { profileInterval } from './profile-interval.js';
import { durbinWatson, residualAutocorrelation, runsTest } from './residual-tests.js';
import { plainArray, type ComponentResult, type DecayFitResult, type LifetimeInterval } from './result.js';

/** Durbin–Watson value below which residuals count as correlated (common practice, ~1.7 for TCSPC fits). */
export const DURBIN_WATSON_WARNING = 1.7;
/** |runs z| above which residual signs count as structured. */
export const RUNS_Z_WARNING = 3;

/** Covariance of the free parameters: inverse Fisher information over those not on a bound (undefined elsewhere). */
export interface ParameterCovariance {
  /** Standard error of free parameter i, or undefined when on a bound or not estimable. */
  readonly errors: readonly (number | undefined)[];
  /** Covariance of free parameters i and j, or undefined. */
  covariance(i: number, j: number): number | undefined;
}

/** Inverse Fisher information (Cramér–Rao covariance) of a finished fit, over the free parameters not on a bound. */
export function parameterCovariance(fit: ComponentFit): ParameterCovariance {
  const { problem, layout, outcome } = fit;
  const size = layout.labels.length;
  const information = problem.information(outcome.parameters);
  const interior: number[] = [];
  for (let i = 0; i < size; i++) {
    const value = outcome.parameters[i] as number;
    if (value > (layout.lower[i] as number) && value < (layout.upper[i] as number)) interior.push(i);
  }
  const reduced = new Float64Array(interior.length * interior.length);
  interior.forEach((row, a) => interior.forEach((column, b) => {
    reduced[a * interior.length + b] = information[row * size + column] as number;
  }));
  const inverse = invertPositiveDefinite(reduced, interior.length);
  const position = new Map(interior.map((index, a) => [index, a]));
  const covariance = (i: number, j: number): number | undefined => {
    const a = position.get(i);
    const b = position.get(j);
    if (inverse === undefined || a === undefined || b === undefined) return undefined;
    const value = inverse[a * interior.length + b] as number;
    return Number.isFinite(value) ? value : undefined;
  };
  const errors = Array.from({ length: size }, (_unused, i) => {
    const variance = covariance(i, i);
    return variance !== undefined && variance > 0 ? Math.sqrt(variance) : undefined;
  });
  return { errors, covariance };
}

/**
 * Amplitude a = pΔ/τ (counts per channel at t = 0) and its standard error by first-order propagation
 * from the photons p and lifetime τ: var(a) = a²[var(p)/p² + var(τ)/τ² − 2cov(p, τ)/(pτ)].
 */
export function amplitudeOf(
  photons: number, tauNs: number, channelWidthNs: number, photonsIndex: number, tauIndex: number, covariance: ParameterCovariance,
): { amplitude: number; amplitudeStdErr?: number } {
  const amplitude = (photons * channelWidthNs) / tauNs;
  if (photonsIndex < 0) return { amplitude };
  const varPhotons = covariance.covariance(photonsIndex, photonsIndex);
  if (varPhotons === undefined || photons === 0) return { amplitude };
  const varTau = tauIndex >= 0 ? covariance.covariance(tauIndex, tauIndex) ?? 0 : 0;
  const cov = tauIndex >= 0 ? covariance.covariance(photonsIndex, tauIndex) ?? 0 : 0;
  const relative = varPhotons / (photons * photons) + varTau / (tauNs * tauNs) - (2 * cov) / (photons * tauNs);
  return relative > 0 ? { amplitude, amplitudeStdErr: Math.abs(amplitude) * Math.sqrt(relative) } : { amplitude };
}

/** Channels with fewer expected counts than this are left out of the runs test (their residual signs are skewed). */
export const RUNS_TEST_MIN_MODEL_COUNTS = 5;

/**
 * Residuals used by the runs test: those where the model expects ≥ RUNS_TEST_MIN_MODEL_COUNTS (the sign of a
 * Poisson residual is not symmetric at low means, which fakes long runs in empty tails), or all of them
 * when fewer than 20 channels qualify.
 */
export function runsTestResiduals(residuals: Float64Array, model: Float64Array): Float64Array {
  let count = 0;
  for (let k = 0; k < residuals.length; k++) if ((model[k] as number) >= RUNS_TEST_MIN_MODEL_COUNTS) count++;
  if (count < 20) return residuals;
  const kept = new Float64Array(count);
  let next = 0;
  for (let k = 0; k < residuals.length; k++) if ((model[k] as number) >= RUNS_TEST_MIN_MODEL_COUNTS) kept[next++] = residuals[k] as number;
  return kept;
}

/** Builds the DecayFitResult of a single-decay fit (see header). */
export function summariseFit(fit: ComponentFit, prepared: PreparedDecay, options: ResolvedFitDecayOptions): DecayFitResult {
  const { problem, layout, outcome, components } = fit;
  const term = layout.terms[0];
  if (term === undefined) throw new RangeError('a single-decay summary needs one dataset');
  const parameters = outcome.parameters;
  const local = problem.localParameters(0, parameters);
  const model = problem.modelOf(0, parameters);
  const counts = term.counts;
  const channels = counts.length;
  const residuals = new Float64Array(channels);
  const residualSquares = estimatorResiduals(options.estimator, counts, model, residuals, undefined);
  const freeCount = layout.labels.length;
  const degreesOfFreedom = Math.max(channels - freeCount, 1);
  const covariance = parameterCovariance(fit);
  const errors = covariance.errors;
  const warnings = [...prepared.warnings];
  if (!outcome.converged) warnings.push(`the fit did not converge: ${outcome.reason}`);
  const errorOf = (slot: number): number | undefined => {
    const free = term.freeIndex[slot] as number;
    return free >= 0 ? errors[free] : undefined;
  };
  const deltaObjective = chiSquareQuantileOneDof(options.confidenceLevel);
  const componentResults: ComponentResult[] = [];
  for (let i = 0; i < components; i++) {
    const tauNs = local[i] as number;
    const free = term.freeIndex[i] as number;
    const { amplitude, amplitudeStdErr } = amplitudeOf(
      local[components + i] as number, tauNs, prepared.channelWidthNs, term.freeIndex[components + i] as number, free, covariance,
    );
    const tauNsStdErr = errorOf(i);
    let tauNsInterval: LifetimeInterval | undefined;
    if (free >= 0 && options.profileIntervals && outcome.converged && tauNsStdErr !== undefined) {
      const { low, high } = profileInterval(
        problem, parameters, outcome.objective, free, layout.lower, layout.upper, tauNsStdErr, deltaObjective, options.maxIterations,
      );
      tauNsInterval = { ...(low === undefined ? {} : { lowNs: low }), ...(high === undefined ? {} : { highNs: high }), level: options.confidenceLevel, deltaObjective };
    }
    if (free >= 0 && tauNsStdErr === undefined) warnings.push(`tau${i + 1}Ns has no standard error (at a bound or not identifiable)`);
    componentResults.push({
      tauNs,
      ...(tauNsStdErr === undefined ? {} : { tauNsStdErr }),
      ...(tauNsInterval === undefined ? {} : { tauNsInterval }),
      amplitude,
      ...(amplitudeStdErr === undefined ? {} : { amplitudeStdErr }),
      photons: local[components + i] as number,
      amplitudeFraction: 0,
      intensityFraction: 0,
      tauFixed: free < 0,
    });
  }
  componentResults.sort((a, b) => a.tauNs - b.tauNs);
  let amplitudeSum = 0;
  let weightedSum = 0;
  let squaredSum = 0;
  for (const component of componentResults) {
    amplitudeSum += component.amplitude;
    weightedSum += component.amplitude * component.tauNs;
    squaredSum += component.amplitude * component.tauNs * component.tauNs;
  }
  const withFractions = componentResults.map((component) => ({
    ...component,
    amplitudeFraction: amplitudeSum !== 0 ? component.amplitude / amplitudeSum : 0,
    intensityFraction: weightedSum !== 0 ? (component.amplitude * component.tauNs) / weightedSum : 0,
  }));
  const atBound: string[] = [];
  for (let i = 0; i < freeCount; i++) {
    const value = parameters[i] as number;
    const fixedByBounds = layout.lower[i] === layout.upper[i];
    if (!fixedByBounds && (value <= (layout.lower[i] as number) || value >= (layout.upper[i] as number))) {
      const label = layout.labels[i] ?? `parameter ${i + 1}`;
      if (!label.startsWith('background') && !label.startsWith('scatter')) {
        warnings.push(`${label} is at its bound (${value})`);
        atBound.push(`${label} is at its ${value <= (layout.lower[i] as number) ? 'lower' : 'upper'} bound (${value})`);
      }
    }
  }
  const unacceptableReasons = fitAcceptability({
    converged: outcome.converged, channelWidthNs: prepared.channelWidthNs, windowNs: prepared.counts.length * prepared.channelWidthNs,
    components: withFractions, atBound,
  });
  if (unacceptableReasons.length > 0) warnings.push(`the fit is not acceptable: ${unacceptableReasons.join('; ')}`);
  const irfFwhmNs = prepared.irfFwhmNs;
  if (irfFwhmNs !== undefined) {
    for (const component of withFractions) {
      if (component.tauNs < irfFwhmNs / 10) {
        warnings.push(`τ = ${component.tauNs.toPrecision(3)} ns is below a tenth of the IRF FWHM (${irfFwhmNs.toPrecision(3)} ns); it depends strongly on the IRF shape`);
      }
    }
  }
  const dw = durbinWatson(residuals);
  const runs = runsTest(runsTestResiduals(residuals, model));
  if (dw < DURBIN_WATSON_WARNING || Math.abs(runs.z) > RUNS_Z_WARNING) {
    warnings.push(`residual structure: Durbin–Watson ${dw.toFixed(2)}, runs z ${runs.z.toFixed(1)}; consider another number of components, the range or the IRF`);
  }
  const scatterSlot = 2 * components + 2;
  let scatterFraction = 0;
  if ((local[scatterSlot] as number) !== 0) {
    const withoutScatter = Float64Array.from(local);
    withoutScatter[scatterSlot] = 0;
    const reduced = new Float64Array(channels);
    term.model.evaluate(withoutScatter, false, reduced, new Float64Array(local.length * channels));
    let scatterSum = 0;
    let modelSum = 0;
    for (let k = 0; k < channels; k++) {
      scatterSum += (model[k] as number) - (reduced[k] as number);
      modelSum += model[k] as number;
    }
    scatterFraction = modelSum > 0 ? scatterSum / modelSum : 0;
  }
  let photonsInRange = 0;
  for (let k = 0; k < channels; k++) photonsInRange += counts[k] as number;
  const { firstChannel, endChannel } = prepared.range;
  const shiftStdErr = errorOf(2 * components);
  const backgroundStdErr = errorOf(2 * components + 1);
  return {
    model: prepared.irfUnit === undefined ? 'tail' : 'reconvolution',
    estimator: options.estimator,
    converged: outcome.converged,
    acceptable: unacceptableReasons.length === 0,
    unacceptableReasons,
    iterations: outcome.iterations,
    reason: outcome.reason,
    components: withFractions,
    tauMeanAmplitudeNs: amplitudeSum !== 0 ? weightedSum / amplitudeSum : 0,
    tauMeanIntensityNs: weightedSum !== 0 ? squaredSum / weightedSum : 0,
    shiftNs: local[2 * components] as number,
    ...(shiftStdErr === undefined ? {} : { shiftNsStdErr: shiftStdErr }),
    backgroundPerChannel: local[2 * components + 1] as number,
    ...(backgroundStdErr === undefined ? {} : { backgroundPerChannelStdErr: backgroundStdErr }),
    scatterFraction,
    chi2Reduced: pearsonChiSquare(counts, model) / degreesOfFreedom,
    deviance: options.estimator === 'ml' ? residualSquares : poissonDeviance(counts, model),
    degreesOfFreedom,
    durbinWatson: dw,
    residualAutocorrelation: residualAutocorrelation(residuals, Math.min(32, Math.floor(channels / 4))),
    runsTest: { runs: runs.runs, expectedRuns: runs.expectedRuns, z: runs.z },
    aic: akaikeCriterion(outcome.objective, freeCount),
    bic: bayesianCriterion(outcome.objective, freeCount, channels),
    photons: prepared.photons,
    photonsInRange,
    rangeNs: [prepared.timeNs[firstChannel] as number, prepared.timeNs[endChannel - 1] as number],
    rangeChannels: [firstChannel, endChannel],
    weightedResiduals: plainArray(residuals),
    fittedCounts: plainArray(model),
    freeParameters: [...layout.labels],
    pileUpCorrected: prepared.pileUpCorrected,
    starts: fit.starts,
    warnings,
  };
}
