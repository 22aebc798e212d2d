// Turns a finished single-decay fit into the plain-JSON DecayFitResult: components with standard errors
// (inverse Fisher information) and profile intervals, mean lifetimes, goodness of fit, residual tests,
// information criteria and warnings.
import { datasetModelFor, type ComponentFit } from './component-fit.js';
import { degenerateWithBackground, fitAcceptability } from './acceptability.js';
import { earlierPulseSuspicion, periodicBackgroundWarning } from './earlier-pulses.js';
import { estimatorResiduals, pearsonChiSquare, poissonDeviance } from './estimators.js';
import { akaikeCriterion, bayesianCriterion } from './information-criteria.js';
import { irfNoiseVariances } from './irf-noise.js';
import { invertPositiveDefinite } from './linear-algebra.js';
import { chiSquareQuantileOneDof } from './normal-distribution.js';
import type { ResolvedFitDecayOptions } from './options.js';
import type { PreparedDecay } from './prepare-decay.js';
import { profileInterval } from './profile-interval.js';
import { durbinWatson, residualAutocorrelation, runsTest } from './residual-tests.js';
import { plainArray, type ComponentResult, type DecayFitResult, type LifetimeInterval } from './result.js';
import { itemAt } from '../model/item-at.js';

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
  /** Free parameters that sat on a bound but were counted as free in the inversion (widened errors). */
  readonly boundCountedAsFree: readonly number[];
}

/**
 * Inverse Fisher information (Cramér–Rao covariance) of a finished fit. Parameters on a bound get no error
 * of their own. With `widenForBounds`, they are still counted as free in the inversion, so the errors of
 * the parameters they correlate with are the unconstrained ones instead of those conditional on the
 * bound (which are too small when the bound is active by chance, e.g. a background of 0); when that
 * matrix is singular the interior-only inverse is used.
 */
export function parameterCovariance(fit: ComponentFit, widenForBounds = false): ParameterCovariance {
  const { problem, layout, outcome } = fit;
  const size = layout.labels.length;
  const information = problem.information(outcome.parameters);
  const interior: number[] = [];
  const onBound: number[] = [];
  for (let i = 0; i < size; i++) {
    const value = itemAt(outcome.parameters, i);
    if (value > itemAt(layout.lower, i) && value < itemAt(layout.upper, i)) interior.push(i);
    else if (layout.lower[i] !== layout.upper[i]) onBound.push(i);
  }
  const invert = (set: readonly number[]): Float64Array | undefined => {
    const reduced = new Float64Array(set.length * set.length);
    set.forEach((row, a) =>
      set.forEach((column, b) => {
        reduced[a * set.length + b] = itemAt(information, row * size + column);
      }),
    );
    return invertPositiveDefinite(reduced, set.length);
  };
  let counted = interior;
  let inverse: Float64Array | undefined;
  if (widenForBounds && onBound.length > 0) {
    const all = [...interior, ...onBound].sort((a, b) => a - b);
    inverse = invert(all);
    if (inverse !== undefined) counted = all;
  }
  if (counted === interior) inverse = invert(interior);
  const boundCountedAsFree = counted === interior ? [] : onBound;
  const position = new Map(counted.map((index, a) => [index, a]));
  const onBoundSet = new Set(onBound);
  const covariance = (i: number, j: number): number | undefined => {
    const a = position.get(i);
    const b = position.get(j);
    if (inverse === undefined || a === undefined || b === undefined) return undefined;
    const value = itemAt(inverse, a * counted.length + b);
    return Number.isFinite(value) ? value : undefined;
  };
  const errors = Array.from({ length: size }, (_unused, i) => {
    if (onBoundSet.has(i)) return undefined;
    const variance = covariance(i, i);
    return variance !== undefined && variance > 0 ? Math.sqrt(variance) : undefined;
  });
  return { errors, covariance, boundCountedAsFree };
}

/**
 * Amplitude a = pΔ/τ (counts per channel at t = 0) and its standard error by first-order propagation
 * from the photons p and lifetime τ: var(a) = a²[var(p)/p² + var(τ)/τ² − 2cov(p, τ)/(pτ)].
 */
export function amplitudeOf(
  photons: number,
  tauNs: number,
  channelWidthNs: number,
  photonsIndex: number,
  tauIndex: number,
  covariance: ParameterCovariance,
): { amplitude: number; amplitudeStdErr?: number } {
  const amplitude = (photons * channelWidthNs) / tauNs;
  if (photonsIndex < 0) return { amplitude };
  const varPhotons = covariance.covariance(photonsIndex, photonsIndex);
  if (varPhotons === undefined || photons === 0) return { amplitude };
  const varTau = tauIndex >= 0 ? (covariance.covariance(tauIndex, tauIndex) ?? 0) : 0;
  const cov = tauIndex >= 0 ? (covariance.covariance(photonsIndex, tauIndex) ?? 0) : 0;
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
  for (let k = 0; k < residuals.length; k++) if (itemAt(model, k) >= RUNS_TEST_MIN_MODEL_COUNTS) count++;
  if (count < 20) return residuals;
  const kept = new Float64Array(count);
  let next = 0;
  for (let k = 0; k < residuals.length; k++)
    if (itemAt(model, k) >= RUNS_TEST_MIN_MODEL_COUNTS) kept[next++] = itemAt(residuals, k);
  return kept;
}

/**
 * Extra variance of each free parameter from the IRF's counting noise (irf-noise.ts), or undefined with
 * the reason in `errorNotes` (no IRF, a tail fit, or an IRF that is not whole counts).
 */
function irfNoiseFor(
  fit: ComponentFit,
  prepared: PreparedDecay,
  local: Float64Array,
  covariance: ParameterCovariance,
  errorNotes: string[],
): Float64Array | undefined {
  const { irfUnit, irfTotalCounts } = prepared;
  if (irfUnit === undefined || irfTotalCounts === undefined) return undefined;
  if (!prepared.irfIsCounts) {
    errorNotes.push(
      'the IRF is not whole counts (a model or a normalised IRF): its noise is not propagated and the errors assume it exact',
    );
    return undefined;
  }
  const term = fit.layout.terms[0];
  if (term === undefined) return undefined;
  const { firstChannel, endChannel } = prepared.range;
  const model = datasetModelFor(prepared, fit.components);
  const channels = endChannel - firstChannel;
  const expected = new Float64Array(channels);
  const jacobian = new Float64Array(local.length * channels);
  model.evaluate(local, true, expected, jacobian);
  const variances = irfNoiseVariances({
    irfUnit,
    irfTotalCounts,
    channelWidthNs: prepared.channelWidthNs,
    irfWithinChannel: prepared.irfWithinChannel,
    firstChannel,
    endChannel,
    components: fit.components,
    local,
    model: expected,
    jacobian,
    freeIndex: term.freeIndex,
    freeCount: fit.layout.labels.length,
    covariance: covariance.covariance,
  });
  errorNotes.push(
    `the IRF's counting noise (${irfTotalCounts.toPrecision(4)} counts, multinomial) is propagated to first order and included in the standard errors` +
      (prepared.periodNs === undefined ? '' : ' (earlier pulses neglected in that part)'),
  );
  return variances;
}

/** Correlation of free parameters i and j from the covariance, or undefined when either is fixed or not estimable. */
function correlationOf(covariance: ParameterCovariance, i: number, j: number): number | undefined {
  if (i < 0 || j < 0) return undefined;
  const cross = covariance.covariance(i, j);
  const varianceI = covariance.covariance(i, i);
  const varianceJ = covariance.covariance(j, j);
  if (cross === undefined || varianceI === undefined || varianceJ === undefined) return undefined;
  if (!(varianceI > 0 && varianceJ > 0)) return undefined;
  return Math.max(-1, Math.min(1, cross / Math.sqrt(varianceI * varianceJ)));
}

/**
 * A background below 0 is warned about when it is more than this many standard errors below 0, or when a lifetime
 * is degenerate with it (acceptability.ts, the fit is then not acceptable and the warning explains the value); a
 * background a little below 0 by chance is ordinary noise (this project's choice: false-positive rate < 5 %).
 */
export const NEGATIVE_BACKGROUND_Z = 2;

/** The warning for a fitted background below 0 (allowed with earlier pulses modelled, or by the caller's bounds). */
export function negativeBackgroundWarning(backgroundPerChannel: number, standardError: number | undefined): string {
  const within =
    standardError === undefined
      ? ''
      : ` (${(-backgroundPerChannel / standardError).toPrecision(2)} standard errors of ${standardError.toPrecision(3)} below 0)`;
  return `the fitted background is negative: ${backgroundPerChannel.toPrecision(3)} counts/channel${within}; it is reported as fitted, not clipped: the Poisson likelihood needs only a positive model in every channel, and holding the background at ≥ 0 would bias the lifetimes it trades off against (docs/decay.md, Periodic excitation); more than 3 standard errors below 0 means the model misses something (the range, the IRF, the repetition rate)`;
}

/** Builds the DecayFitResult of a single-decay fit (see header). */
export function summariseFit(
  fit: ComponentFit,
  prepared: PreparedDecay,
  options: ResolvedFitDecayOptions,
): DecayFitResult {
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
  const covariance = parameterCovariance(fit, true);
  const warnings = [...prepared.warnings, ...fit.warnings];
  const errorNotes: string[] = [];
  for (const index of covariance.boundCountedAsFree) {
    const label = layout.labels[index] ?? `parameter ${index + 1}`;
    errorNotes.push(
      `${label} is at its bound (${itemAt(parameters, index).toPrecision(4)}): the other parameters' errors are computed as if it were free (widened, not conditional on the bound)`,
    );
  }
  const irfVariances = irfNoiseFor(fit, prepared, local, covariance, errorNotes);
  const errors = covariance.errors.map((error, index) => {
    const extra = irfVariances?.[index] ?? 0;
    return error === undefined ? undefined : Math.sqrt(error * error + extra);
  });
  if (!outcome.converged) warnings.push(`the fit did not converge: ${outcome.reason}`);
  const errorOf = (slot: number): number | undefined => {
    const free = itemAt(term.freeIndex, slot);
    return free >= 0 ? errors[free] : undefined;
  };
  const irfErrorOf = (slot: number): number | undefined => {
    const free = itemAt(term.freeIndex, slot);
    const variance = free >= 0 ? irfVariances?.[free] : undefined;
    return variance === undefined ? undefined : Math.sqrt(variance);
  };
  const deltaObjective = chiSquareQuantileOneDof(options.confidenceLevel);
  const componentResults: ComponentResult[] = [];
  for (let i = 0; i < components; i++) {
    const tauNs = itemAt(local, i);
    const free = itemAt(term.freeIndex, i);
    const { amplitude, amplitudeStdErr } = amplitudeOf(
      itemAt(local, components + i),
      tauNs,
      prepared.channelWidthNs,
      itemAt(term.freeIndex, components + i),
      free,
      covariance,
    );
    const tauNsStdErr = errorOf(i);
    const tauNsStdErrFromIrf = irfErrorOf(i);
    const tauBackgroundCorrelation = correlationOf(covariance, free, itemAt(term.freeIndex, 2 * components + 1));
    let tauNsInterval: LifetimeInterval | undefined;
    if (free >= 0 && options.profileIntervals && !outcome.converged) {
      tauNsInterval = {
        lowReason: 'the fit did not converge',
        highReason: 'the fit did not converge',
        level: options.confidenceLevel,
        deltaObjective,
      };
    } else if (free >= 0 && options.profileIntervals && tauNsStdErr === undefined) {
      const why = 'the lifetime has no standard error (at a bound or not identifiable)';
      tauNsInterval = { lowReason: why, highReason: why, level: options.confidenceLevel, deltaObjective };
    } else if (free >= 0 && options.profileIntervals && tauNsStdErr !== undefined) {
      const profile = profileInterval(
        problem,
        parameters,
        outcome.objective,
        free,
        layout.lower,
        layout.upper,
        tauNsStdErr,
        deltaObjective,
        options.maxIterations,
      );
      // The profile holds the IRF fixed; its counting noise is added in quadrature to each half-width.
      const irfVariance =
        tauNsStdErrFromIrf === undefined ? 0 : deltaObjective * tauNsStdErrFromIrf * tauNsStdErrFromIrf;
      const widen = (end: number): number =>
        tauNs + Math.sign(end - tauNs) * Math.sqrt((end - tauNs) ** 2 + irfVariance);
      tauNsInterval = {
        ...(profile.low === undefined ? {} : { lowNs: widen(profile.low) }),
        ...(profile.high === undefined ? {} : { highNs: widen(profile.high) }),
        ...(profile.lowReason === undefined ? {} : { lowReason: profile.lowReason }),
        ...(profile.highReason === undefined ? {} : { highReason: profile.highReason }),
        level: options.confidenceLevel,
        deltaObjective,
      };
    }
    if (free >= 0 && tauNsStdErr === undefined)
      warnings.push(`tau${i + 1}Ns has no standard error (at a bound or not identifiable)`);
    componentResults.push({
      tauNs,
      ...(tauNsStdErr === undefined ? {} : { tauNsStdErr }),
      ...(tauNsStdErrFromIrf === undefined || tauNsStdErr === undefined ? {} : { tauNsStdErrFromIrf }),
      ...(tauNsInterval === undefined ? {} : { tauNsInterval }),
      ...(tauBackgroundCorrelation === undefined ? {} : { tauBackgroundCorrelation }),
      amplitude,
      ...(amplitudeStdErr === undefined ? {} : { amplitudeStdErr }),
      photons: itemAt(local, components + i),
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
    const value = itemAt(parameters, i);
    const fixedByBounds = layout.lower[i] === layout.upper[i];
    if (!fixedByBounds && (value <= itemAt(layout.lower, i) || value >= itemAt(layout.upper, i))) {
      const label = layout.labels[i] ?? `parameter ${i + 1}`;
      if (!label.startsWith('background') && !label.startsWith('scatter')) {
        warnings.push(`${label} is at its bound (${value})`);
        atBound.push(`${label} is at its ${value <= itemAt(layout.lower, i) ? 'lower' : 'upper'} bound (${value})`);
      }
    }
  }
  const earlierPulses =
    prepared.repetitionRateHz === undefined
      ? earlierPulseSuspicion({
          counts: prepared.counts,
          model,
          firstChannel: prepared.range.firstChannel,
          backgroundPerChannel: itemAt(local, 2 * components + 1),
        })
      : undefined;
  if (earlierPulses !== undefined) warnings.push(earlierPulses);
  if (prepared.periodNs !== undefined) {
    const longest = withFractions.reduce((most, component) => Math.max(most, component.tauNs), 0);
    const periodic = periodicBackgroundWarning(
      longest,
      prepared.periodNs,
      itemAt(term.freeIndex, 2 * components + 1) >= 0,
    );
    if (periodic !== undefined) warnings.push(periodic);
  }
  const background = itemAt(local, 2 * components + 1);
  const backgroundStdErr = errorOf(2 * components + 1);
  if (
    background < 0 &&
    (withFractions.some(degenerateWithBackground) ||
      backgroundStdErr === undefined ||
      background < -NEGATIVE_BACKGROUND_Z * backgroundStdErr)
  )
    warnings.push(negativeBackgroundWarning(background, backgroundStdErr));
  const unacceptableReasons = [
    ...fitAcceptability({
      converged: outcome.converged,
      channelWidthNs: prepared.channelWidthNs,
      windowNs: prepared.counts.length * prepared.channelWidthNs,
      components: withFractions,
      atBound,
    }),
    ...(earlierPulses === undefined
      ? []
      : ['the repetition rate is unknown and light from earlier pulses is not excluded']),
  ];
  if (unacceptableReasons.length > 0) warnings.push(`the fit is not acceptable: ${unacceptableReasons.join('; ')}`);
  const irfFwhmNs = prepared.irfFwhmNs;
  if (irfFwhmNs !== undefined) {
    for (const component of withFractions) {
      if (component.tauNs < irfFwhmNs / 10) {
        warnings.push(
          `τ = ${component.tauNs.toPrecision(3)} ns is below a tenth of the IRF FWHM (${irfFwhmNs.toPrecision(3)} ns); it depends strongly on the IRF shape`,
        );
      }
    }
  }
  const dw = durbinWatson(residuals);
  const runs = runsTest(runsTestResiduals(residuals, model));
  if (dw < DURBIN_WATSON_WARNING || Math.abs(runs.z) > RUNS_Z_WARNING) {
    warnings.push(
      `residual structure: Durbin–Watson ${dw.toFixed(2)}, runs z ${runs.z.toFixed(1)}; consider another number of components, the range or the IRF`,
    );
  }
  const scatterSlot = 2 * components + 2;
  let scatterFraction = 0;
  if (itemAt(local, scatterSlot) !== 0) {
    const withoutScatter = Float64Array.from(local);
    withoutScatter[scatterSlot] = 0;
    const reduced = new Float64Array(channels);
    term.model.evaluate(withoutScatter, false, reduced, new Float64Array(local.length * channels));
    let scatterSum = 0;
    let modelSum = 0;
    for (let k = 0; k < channels; k++) {
      scatterSum += itemAt(model, k) - itemAt(reduced, k);
      modelSum += itemAt(model, k);
    }
    scatterFraction = modelSum > 0 ? scatterSum / modelSum : 0;
  }
  let photonsInRange = 0;
  for (let k = 0; k < channels; k++) photonsInRange += itemAt(counts, k);
  const { firstChannel, endChannel } = prepared.range;
  const shiftStdErr = errorOf(2 * components);
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
    shiftNs: itemAt(local, 2 * components),
    ...(shiftStdErr === undefined ? {} : { shiftNsStdErr: shiftStdErr }),
    backgroundPerChannel: background,
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
    rangeNs: [itemAt(prepared.timeNs, firstChannel), itemAt(prepared.timeNs, endChannel - 1)],
    rangeChannels: [firstChannel, endChannel],
    weightedResiduals: plainArray(residuals),
    fittedCounts: plainArray(model),
    freeParameters: [...layout.labels],
    pileUpCorrected: prepared.pileUpCorrected,
    starts: fit.starts,
    errorNotes,
    warnings,
  };
}
