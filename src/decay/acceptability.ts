// Whether a finished lifetime fit is believable (issue 15.6). A fit can converge and still describe no
// physics: a parameter pinned at a bound, a component that decays within a fraction of one channel (it is
// indistinguishable from scattered light, i.e. the IRF itself), a lifetime many times the window (it is
// indistinguishable from the background), or amplitudes of opposite sign that cancel. Such a fit is
// reported with `acceptable: false` and these reasons; QC, rate constants and model selection skip it.
// The limits are this project's stated choices (common practice: a lifetime must be resolvable within
// the time window and above the time resolution), not published constants.

/** A free lifetime below this fraction of the channel width is not resolvable from the IRF shape. */
export const MIN_TAU_CHANNEL_FRACTION = 0.5;
/** A free lifetime above this multiple of the histogram window is not resolvable from the background. */
export const MAX_TAU_WINDOW_MULTIPLE = 10;
/** Amplitudes cancel when |Σa| is below this fraction of Σ|a| (more than half of the magnitudes cancel). */
export const CANCELLING_AMPLITUDE_FRACTION = 0.5;

export interface AcceptabilityInput {
  readonly converged: boolean;
  readonly channelWidthNs: number;
  /** Histogram window in ns (channels × channel width). */
  readonly windowNs: number;
  /** Components with τ (ns), amplitude (counts per channel at t = 0) and whether τ was fixed by the caller. */
  readonly components: readonly { readonly tauNs: number; readonly amplitude: number; readonly tauFixed: boolean }[];
  /** One sentence per free parameter that ended on a bound (background and scatter at 0 excluded: both are physical). */
  readonly atBound: readonly string[];
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
