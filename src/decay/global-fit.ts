// globalFit: several decays fitted together with linked parameters (by default every lifetime shared,
// amplitudes, shift and background per decay), e.g. a quenching series or several emission wavelengths.
// Linking lowers the variance of the shared lifetimes and resolves components no single decay supports
// (global analysis: Knutson, Beechem & Brand, Chem. Phys. Lett. 102, 501 (1983), from memory).
import type { Decay } from '../model/decay.js';
import { AnalysisFailed, ConfigInvalid } from '../model/errors.js';
import { fitComponents } from './component-fit.js';
import { estimatorResiduals, pearsonChiSquare, poissonDeviance } from './estimators.js';
import {
  amplitudeOf,
  NEGATIVE_BACKGROUND_Z,
  negativeBackgroundWarning,
  parameterCovariance,
  runsTestResiduals,
  type ParameterCovariance,
} from './fit-summary.js';
import { akaikeCriterion, bayesianCriterion } from './information-criteria.js';
import { resolveFitDecayOptions, type FitDecayOptions } from './options.js';
import { localParameterCount, type ParameterName } from './parameters.js';
import { prepareDecay } from './prepare-decay.js';
import { durbinWatson, runsTest } from './residual-tests.js';
import { plainArray, type ComponentResult, type GlobalDecayResult, type GlobalFitResult } from './result.js';
import { itemAt } from '../model/item-at.js';

/**
 * Fits `decays` jointly with the parameters in options.links shared (default: all lifetimes τ in ns) by
 * minimising the summed Poisson deviance or χ²; each decay keeps its own IRF, range, amplitudes, shift and
 * background. Throws ConfigInvalid for components 'auto' or no decays, AnalysisFailed FIT_FAILED when not finite.
 */
export function globalFit(decays: readonly Decay[], options?: FitDecayOptions): GlobalFitResult {
  const resolved = resolveFitDecayOptions(options, 'globalFit');
  const components = resolved.components;
  if (components === 'auto')
    throw new ConfigInvalid('globalFit needs a fixed number of components (1–4)', {
      configPath: 'globalFit.components',
    });
  if (decays.length === 0) throw new ConfigInvalid('globalFit needs at least one decay', { configPath: 'globalFit' });
  const lifetimes = Array.from({ length: components }, (_unused, i) => `tau${i + 1}Ns` as ParameterName);
  const links = resolved.links ?? lifetimes;
  const prepared = decays.map((decay) => prepareDecay(decay, resolved, localParameterCount(components) + 1));
  const fit = fitComponents(prepared, components, resolved, links, true);
  const { problem, layout, outcome } = fit;
  if (!Number.isFinite(outcome.objective)) {
    throw new AnalysisFailed('FIT_FAILED', `the global ${components}-component model is not finite: ${outcome.reason}`);
  }
  const covariance = parameterCovariance(fit);
  const warnings: string[] = prepared.flatMap((item, d) =>
    item.warnings.map((warning) => `decay ${d + 1}: ${warning}`),
  );
  warnings.push(...fit.warnings);
  if (!outcome.converged) warnings.push(`the global fit did not converge: ${outcome.reason}`);
  let pearsonTotal = 0;
  let channelsTotal = 0;
  const decayResults: GlobalDecayResult[] = prepared.map((item, d) => {
    const term = layout.terms[d];
    if (term === undefined) throw new RangeError('missing dataset term');
    const local = problem.localParameters(d, outcome.parameters);
    const model = problem.modelOf(d, outcome.parameters);
    const residuals = new Float64Array(model.length);
    const residualSquares = estimatorResiduals(resolved.estimator, term.counts, model, residuals, undefined);
    const pearson = pearsonChiSquare(term.counts, model);
    pearsonTotal += pearson;
    channelsTotal += model.length;
    const ownFree = term.freeIndex.filter(
      (index, slot) => index >= 0 && !links.includes(layoutName(slot, components)),
    ).length;
    const componentResults = componentsOf(local, components, term.freeIndex, covariance, item.channelWidthNs);
    // With earlier pulses modelled the background may fit below 0 (component-fit.ts): reported, warned beyond 2 SE.
    const background = itemAt(local, 2 * components + 1);
    const backgroundFree = itemAt(term.freeIndex, 2 * components + 1);
    const backgroundStdErr = backgroundFree >= 0 ? covariance.errors[backgroundFree] : undefined;
    if (background < 0 && (backgroundStdErr === undefined || background < -NEGATIVE_BACKGROUND_Z * backgroundStdErr))
      warnings.push(`decay ${d + 1}: ${negativeBackgroundWarning(background, backgroundStdErr)}`);
    let photons = 0;
    for (let k = 0; k < term.counts.length; k++) photons += itemAt(term.counts, k);
    return {
      components: componentResults,
      shiftNs: itemAt(local, 2 * components),
      backgroundPerChannel: background,
      chi2Reduced: pearson / Math.max(model.length - ownFree, 1),
      deviance: resolved.estimator === 'ml' ? residualSquares : poissonDeviance(term.counts, model),
      durbinWatson: durbinWatson(residuals),
      runsTest: runsTest(runsTestResiduals(residuals, model)),
      rangeNs: [itemAt(item.timeNs, item.range.firstChannel), itemAt(item.timeNs, item.range.endChannel - 1)],
      photons,
      weightedResiduals: plainArray(residuals),
      fittedCounts: plainArray(model),
    };
  });
  const first = decayResults[0];
  const shared = first === undefined ? [] : first.components;
  const freeCount = layout.labels.length;
  return {
    estimator: resolved.estimator,
    converged: outcome.converged,
    iterations: outcome.iterations,
    reason: outcome.reason,
    linked: [...links],
    tauNs: shared.map((component) => component.tauNs),
    tauNsStdErr: shared.map((component) => component.tauNsStdErr ?? null),
    decays: decayResults,
    objective: outcome.objective,
    chi2Reduced: pearsonTotal / Math.max(channelsTotal - freeCount, 1),
    aic: akaikeCriterion(outcome.objective, freeCount),
    bic: bayesianCriterion(outcome.objective, freeCount, channelsTotal),
    freeParameters: [...layout.labels],
    warnings,
  };
}

function layoutName(slot: number, components: number): ParameterName {
  if (slot < components) return `tau${slot + 1}Ns` as ParameterName;
  if (slot < 2 * components) return `photons${slot - components + 1}` as ParameterName;
  return slot === 2 * components ? 'shiftNs' : slot === 2 * components + 1 ? 'backgroundPerChannel' : 'scatterCounts';
}

/** Component results of one decay in slot order (shared lifetimes keep the same order in every decay). */
function componentsOf(
  local: Float64Array,
  components: number,
  freeIndex: Int32Array,
  covariance: ParameterCovariance,
  channelWidthNs: number,
): ComponentResult[] {
  const partial = Array.from({ length: components }, (_unused, i) => {
    const tauNs = itemAt(local, i);
    const tauFree = itemAt(freeIndex, i);
    const photons = itemAt(local, components + i);
    const { amplitude, amplitudeStdErr } = amplitudeOf(
      photons,
      tauNs,
      channelWidthNs,
      itemAt(freeIndex, components + i),
      tauFree,
      covariance,
    );
    const tauNsStdErr = tauFree >= 0 ? covariance.errors[tauFree] : undefined;
    return { tauNs, tauNsStdErr, amplitude, amplitudeStdErr, photons, tauFixed: tauFree < 0 };
  });
  const amplitudeSum = partial.reduce((sum, item) => sum + item.amplitude, 0);
  const weightedSum = partial.reduce((sum, item) => sum + item.amplitude * item.tauNs, 0);
  return partial.map((item) => ({
    tauNs: item.tauNs,
    ...(item.tauNsStdErr === undefined ? {} : { tauNsStdErr: item.tauNsStdErr }),
    amplitude: item.amplitude,
    ...(item.amplitudeStdErr === undefined ? {} : { amplitudeStdErr: item.amplitudeStdErr }),
    photons: item.photons,
    amplitudeFraction: amplitudeSum !== 0 ? item.amplitude / amplitudeSum : 0,
    intensityFraction: weightedSum !== 0 ? (item.amplitude * item.tauNs) / weightedSum : 0,
    tauFixed: item.tauFixed,
  }));
}
