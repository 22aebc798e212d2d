// Whether a finished lifetime fit is believable (issue 15.6). A fit can converge and still describe no
// physics: a parameter pinned at a bound, a component that decays within a fraction of one channel (it is
// indistinguishable from scattered light, i.e. the IRF itself), a lifetime many times the window (it is
// indistinguishable from the background), a lifetime that trades off against the background and is poorly
// determined (issue 17.1: a long τ with earlier pulses), or amplitudes of opposite sign that cancel. Such a fit is
// reported with `acceptable: false` and these reasons; QC, rate constants and model selection skip it.
// The limits are this project's stated choices (common practice: a lifetime must be resolvable within
// the time window and above the time resolution), not published constants.

/** A free lifetime below this fraction of the channel width is not resolvable from the IRF shape. */
export const MIN_TAU_CHANNEL_FRACTION = 0.5;
/** A free lifetime above this multiple of the histogram window is not resolvable from the background. */
export const MAX_TAU_WINDOW_MULTIPLE = 10;
/** Amplitudes cancel when |Σa| is below this fraction of Σ|a| (more than half of the magnitudes cancel). */
export const CANCELLING_AMPLITUDE_FRACTION = 0.5;
/** |correlation| of a free τ with the free background above which the two trade off (issue 17.1; this project's choice). */
export const DEGENERATE_TAU_BACKGROUND_CORRELATION = 0.95;
/**
 * Relative standard error of such a τ above which the fit is not acceptable (this project's choice): τ̂ = 1/k̂ with
 * k̂ roughly normal is biased high by about (SE/τ)², i.e. ≈ 1 % at 10 %; the correlation alone does not depend on
 * the photon count, so a degenerate shape measured with enough photons stays acceptable.
 */
export const DEGENERATE_TAU_RELATIVE_ERROR = 0.1;

export interface AcceptabilityInput {
  readonly converged: boolean;
  readonly channelWidthNs: number;
  /** Histogram window in ns (channels × channel width). */
  readonly windowNs: number;
  /**
   * Components with τ (ns), amplitude (counts per channel at t = 0), whether τ was fixed by the caller, and
   * when known τ's standard error (ns) and its correlation with the free background.
   */
  readonly components: readonly {
    readonly tauNs: number;
    readonly amplitude: number;
    readonly tauFixed: boolean;
    readonly tauNsStdErr?: number;
    readonly tauBackgroundCorrelation?: number;
  }[];
  /** One sentence per free parameter that ended on a bound (background and scatter at 0 excluded: both are physical). */
  readonly atBound: readonly string[];
}

/** True when a free τ trades off against the background (|correlation| > 0.95) and is poorly determined (SE > 10 % of τ). */
export function degenerateWithBackground(component: AcceptabilityInput['components'][number]): boolean {
  const { tauBackgroundCorrelation: correlation, tauNsStdErr: error } = component;
  return (
    !component.tauFixed &&
    correlation !== undefined &&
    error !== undefined &&
    Math.abs(correlation) > DEGENERATE_TAU_BACKGROUND_CORRELATION &&
    error > DEGENERATE_TAU_RELATIVE_ERROR * component.tauNs
  );
}

/** Reasons a fit is not believable (empty = acceptable), by the limits above; O(components). */
export function fitAcceptability(input: AcceptabilityInput): string[] {
  const reasons: string[] = [];
  if (!input.converged) reasons.push('the fit did not converge');
  reasons.push(...input.atBound);
  const shortestNs = MIN_TAU_CHANNEL_FRACTION * input.channelWidthNs;
  const longestNs = MAX_TAU_WINDOW_MULTIPLE * input.windowNs;
  input.components.forEach((component, index) => {
    if (component.tauFixed) return;
    const name = `τ${index + 1} = ${component.tauNs.toPrecision(3)} ns`;
    if (component.tauNs < shortestNs) {
      reasons.push(
        `${name} is below ${MIN_TAU_CHANNEL_FRACTION} × the channel width (${input.channelWidthNs.toPrecision(3)} ns): it cannot be told from scattered light`,
      );
    }
    if (component.tauNs > longestNs) {
      reasons.push(
        `${name} is above ${MAX_TAU_WINDOW_MULTIPLE} × the window (${input.windowNs.toPrecision(3)} ns): it cannot be told from the background`,
      );
    }
    const correlation = component.tauBackgroundCorrelation;
    const error = component.tauNsStdErr;
    if (correlation !== undefined && error !== undefined && degenerateWithBackground(component)) {
      reasons.push(
        `τ${index + 1} = ${component.tauNs.toPrecision(3)} ± ${error.toPrecision(2)} ns (${((100 * error) / component.tauNs).toPrecision(2)} %) trades off against the background (correlation ${correlation.toFixed(3)}, above ${DEGENERATE_TAU_BACKGROUND_CORRELATION}): the data do not fix τ without the background; its mean over repeats is biased high by about (SE/τ)² and ±SE is not a 68 % interval (use the profile interval); fix the background from a dark measurement (fit-decay --fix background=N) or lower the repetition rate`,
      );
    }
  });
  let sum = 0;
  let magnitude = 0;
  for (const component of input.components) {
    sum += component.amplitude;
    magnitude += Math.abs(component.amplitude);
  }
  const mixedSigns = input.components.some((c) => c.amplitude < 0) && input.components.some((c) => c.amplitude > 0);
  if (mixedSigns && Math.abs(sum) < CANCELLING_AMPLITUDE_FRACTION * magnitude) {
    reasons.push(
      `the amplitudes cancel: |Σa| = ${Math.abs(sum).toPrecision(3)} is below ${CANCELLING_AMPLITUDE_FRACTION} × Σ|a| = ${magnitude.toPrecision(3)}`,
    );
  }
  return reasons;
}
