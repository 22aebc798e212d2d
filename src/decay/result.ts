// The plain-JSON result of a lifetime fit (DecayFitResult) and of a global fit; no typed arrays.
import type { Estimator } from './estimators.js';
import { itemAt } from '../model/item-at.js';

export interface FitStatus {
  /** True only when the minimiser's convergence test passed with finite values. */
  readonly converged: boolean;
  /** Levenberg–Marquardt iterations (Jacobian evaluations) of the kept run. */
  readonly iterations: number;
  /** Why the minimiser stopped, in words. */
  readonly reason: string;
}

export interface LifetimeInterval {
  /** Lower end in ns; absent when the profile reaches a bound or does not converge before it. */
  readonly lowNs?: number;
  /** Upper end in ns; absent as for lowNs. */
  readonly highNs?: number;
  /** Why lowNs / highNs is absent (the bound was reached first, or a constrained refit failed). */
  readonly lowReason?: string;
  readonly highReason?: string;
  /** Confidence level, e.g. 0.6827. */
  readonly level: number;
  /** Objective rise that defines the interval (chi-square quantile with one degree of freedom). */
  readonly deltaObjective: number;
}

export interface ComponentResult {
  readonly tauNs: number;
  /** Standard error: inverse Fisher information (parameters at a bound counted as free, see `errorNotes`) plus the IRF's counting noise when propagated; absent when fixed, at a bound or not estimable. */
  readonly tauNsStdErr?: number;
  /** The part of tauNsStdErr due to the IRF's counting noise (added in quadrature), when propagated. */
  readonly tauNsStdErrFromIrf?: number;
  /** Correlation of τ with the background (inverse Fisher information); absent when either is fixed or not estimable. Near ±1: they trade off. */
  readonly tauBackgroundCorrelation?: number;
  /** Profile (support-plane) interval; absent when not computed or the lifetime is fixed. */
  readonly tauNsInterval?: LifetimeInterval;
  /** Counts per channel at t = 0 (reconvolution) or at the fit start (tail fit), for τ ≫ channel width. */
  readonly amplitude: number;
  readonly amplitudeStdErr?: number;
  /** Expected photons of the component over an unbounded window, aᵢτᵢ/Δ (the fitted linear parameter). */
  readonly photons: number;
  /** aᵢ / Σa. */
  readonly amplitudeFraction: number;
  /** aᵢτᵢ / Σaτ (fraction of the decay photons). */
  readonly intensityFraction: number;
  /** True when τ was fixed by the caller. */
  readonly tauFixed: boolean;
}

export interface RunsTestResult {
  readonly runs: number;
  readonly expectedRuns: number;
  readonly z: number;
}

export interface SelectionCandidate {
  readonly components: number;
  readonly bic: number;
  readonly aic: number;
  readonly deviance: number;
  readonly chi2Reduced: number;
  readonly runsZ: number;
  readonly durbinWatson: number;
  readonly converged: boolean;
  readonly acceptable: boolean;
}

export interface ModelSelection {
  readonly chosenComponents: number;
  readonly candidates: readonly SelectionCandidate[];
  /** One sentence saying why this number of components was chosen. */
  readonly reason: string;
}

export interface DecayFitResult extends FitStatus {
  /**
   * False when the fit is not believable (src/decay/acceptability.ts): not converged, a parameter at a bound,
   * τ below half a channel or above ten windows, or cancelling amplitudes. QC and rate constants skip it.
   */
  readonly acceptable: boolean;
  /** Why the fit is not acceptable, one sentence each; empty when acceptable. */
  readonly unacceptableReasons: readonly string[];
  /** 'reconvolution' (with an IRF) or 'tail' (no IRF: fitted from the range start). */
  readonly model: 'reconvolution' | 'tail';
  readonly estimator: Estimator;
  /** Components in ascending τ. */
  readonly components: readonly ComponentResult[];
  /** Σaτ / Σa in ns. */
  readonly tauMeanAmplitudeNs: number;
  /** Σaτ² / Σaτ in ns. */
  readonly tauMeanIntensityNs: number;
  readonly shiftNs: number;
  readonly shiftNsStdErr?: number;
  readonly backgroundPerChannel: number;
  readonly backgroundPerChannelStdErr?: number;
  /** Scatter photons / model photons on the fit range (0 unless scatter was fitted). */
  readonly scatterFraction: number;
  /** Pearson χ² / (channels − free parameters). */
  readonly chi2Reduced: number;
  /** Poisson deviance 2Σ[m − n + n ln(n/m)] on the fit range. */
  readonly deviance: number;
  readonly degreesOfFreedom: number;
  readonly durbinWatson: number;
  /** Autocorrelation of the weighted residuals at lags 0…L. */
  readonly residualAutocorrelation: readonly number[];
  /** Wald–Wolfowitz runs test on residual signs over channels with model ≥ 5 counts. */
  readonly runsTest: RunsTestResult;
  /** AIC = objective + 2p (objective = deviance for ML, χ² for LS; constants dropped). */
  readonly aic: number;
  /** BIC = objective + p·ln(channels). */
  readonly bic: number;
  /** Total recorded counts of the histogram. */
  readonly photons: number;
  /** Counts on the fit range (after pile-up correction when applied). */
  readonly photonsInRange: number;
  readonly rangeNs: readonly [number, number];
  /** [first, end) channel indices (0-based, end exclusive). */
  readonly rangeChannels: readonly [number, number];
  /** Estimator residuals on the fit range (deviance residuals for ML, (n − m)/σ for LS), sign of n − m. */
  readonly weightedResiduals: readonly number[];
  /** Model counts on the fit range. */
  readonly fittedCounts: readonly number[];
  readonly freeParameters: readonly string[];
  readonly pileUpCorrected: boolean;
  /** Start-value sets tried. */
  readonly starts: number;
  /** How the standard errors were formed: parameters at a bound counted as free, IRF noise propagated or why not. */
  readonly errorNotes: readonly string[];
  readonly warnings: readonly string[];
  /** Present when components was 'auto'. */
  readonly selection?: ModelSelection;
}

export interface GlobalDecayResult {
  readonly components: readonly ComponentResult[];
  readonly shiftNs: number;
  readonly backgroundPerChannel: number;
  readonly chi2Reduced: number;
  readonly deviance: number;
  readonly durbinWatson: number;
  readonly runsTest: RunsTestResult;
  readonly rangeNs: readonly [number, number];
  readonly photons: number;
  readonly weightedResiduals: readonly number[];
  readonly fittedCounts: readonly number[];
}

export interface GlobalFitResult extends FitStatus {
  readonly estimator: Estimator;
  /** Names of parameters shared by all decays. */
  readonly linked: readonly string[];
  /** Shared lifetimes (ns, ascending) with standard errors from the joint Fisher information. */
  readonly tauNs: readonly number[];
  readonly tauNsStdErr: readonly (number | null)[];
  readonly decays: readonly GlobalDecayResult[];
  /** Σ objective over all decays. */
  readonly objective: number;
  readonly chi2Reduced: number;
  readonly aic: number;
  readonly bic: number;
  readonly freeParameters: readonly string[];
  readonly warnings: readonly string[];
}

/** Plain number[] copy of a typed array for the JSON result (a loop: Array.from on a typed array is several times slower); O(n). */
export function plainArray(values: Float64Array): number[] {
  const copy = new Array<number>(values.length);
  for (let k = 0; k < values.length; k++) copy[k] = itemAt(values, k);
  return copy;
}
