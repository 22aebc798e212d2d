// fitDecay: the public lifetime fit of one decay. Reconvolution with the IRF (options.irfCounts or
// decay.irfCounts), or a tail fit without one; 1–4 components or 'auto'; Poisson ML or weighted LS.
import type { Decay } from '../model/decay.js';
import { AnalysisFailed } from '../model/errors.js';
import { fitComponents, type ComponentFit } from './component-fit.js';
import { summariseFit } from './fit-summary.js';
import { selectComponents } from './model-selection.js';
import { resolveFitDecayOptions, type FitDecayOptions, type ResolvedFitDecayOptions } from './options.js';
import { localParameterCount } from './parameters.js';
import { prepareDecay, type PreparedDecay } from './prepare-decay.js';
import type { DecayFitResult } from './result.js';

/** Largest number of components tried by components: 'auto'. */
export const AUTO_MAX_COMPONENTS = 3;

/**
 * Fits a multi-exponential decay (τ in ns) by iterative reconvolution with the channel-integrated IRF, or a
 * tail fit without one, minimising the Poisson deviance (Laurence & Chromy, Nat. Methods 7, 338 (2010)) or
 * Neyman/Pearson-weighted χ² with Levenberg–Marquardt. Throws ConfigInvalid (options), InputRejected
 * (unusable IRF), AnalysisFailed OUT_OF_RANGE (range too short) or FIT_FAILED (model not finite).
 */
export function fitDecay(decay: Decay, options?: FitDecayOptions): DecayFitResult {
  const resolved = resolveFitDecayOptions(options);
  if (resolved.components === 'auto') {
    const prepared = prepareDecay(decay, resolved, localParameterCount(AUTO_MAX_COMPONENTS) + 1);
    // Candidates without profile intervals; the chosen one is summarised again with them.
    const quick: ResolvedFitDecayOptions = Object.freeze({ ...resolved, profileIntervals: false });
    const candidates: ComponentFit[] = [];
    const summaries: DecayFitResult[] = [];
    for (let c = 1; c <= AUTO_MAX_COMPONENTS; c++) {
      const fit = fitPrepared(prepared, c, quick, false);
      candidates.push(fit);
      summaries.push(summariseFit(fit, prepared, quick));
    }
    const { chosen, selection } = selectComponents(summaries);
    const chosenFit = candidates[summaries.indexOf(chosen)];
    const detailed =
      resolved.profileIntervals && chosenFit !== undefined ? summariseFit(chosenFit, prepared, resolved) : chosen;
    return { ...detailed, selection };
  }
  const prepared = prepareDecay(decay, resolved, localParameterCount(resolved.components) + 1);
  return summariseFit(fitPrepared(prepared, resolved.components, resolved, true), prepared, resolved);
}

function fitPrepared(
  prepared: PreparedDecay,
  components: number,
  options: ResolvedFitDecayOptions,
  strictNames: boolean,
): ComponentFit {
  const fit = fitComponents([prepared], components, options, [], strictNames);
  if (!Number.isFinite(fit.outcome.objective)) {
    throw new AnalysisFailed(
      'FIT_FAILED',
      `the ${components}-component model is not finite on the fit range: ${fit.outcome.reason}`,
    );
  }
  return fit;
}
