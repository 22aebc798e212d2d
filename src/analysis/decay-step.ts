// Fits the set's decay by reconvolution with its IRF (a column of the decay file, or a separate IRF
// measurement placed on the decay's channels by its own time axis), or by a tail fit when no IRF is available.
import { totalCounts, type Decay } from '../model/decay.js';
import { fitDecay, fullWidthHalfMaximumNs, type DecayFitResult } from '../decay/index.js';
import { alignIrfToDecay } from '../decay/irf-axis.js';
import { InputRejected } from '../model/errors.js';
import type { AnalysisSettings } from './payload.js';
import type { DecayFitSummary } from './result.js';
import { markMissing, type StepContext } from './step-context.js';

export interface DecayStepOutcome {
  readonly summary: DecayFitSummary;
  readonly fit: DecayFitResult;
}

/** Chooses the IRF, fits, and summarises; throws what fitDecay throws. */
export function fitSetDecay(
  decay: Decay,
  irf: Decay | undefined,
  settings: AnalysisSettings,
  context: StepContext,
): DecayStepOutcome {
  let irfCounts: ArrayLike<number> | undefined;
  let irfSource: DecayFitSummary['irfSource'] = 'none';
  if (decay.irfCounts !== undefined) {
    irfCounts = decay.irfCounts;
    irfSource = 'decay-column';
  } else if (irf !== undefined) {
    // The IRF file's own time axis places it on the decay's channels (resampled, offset applied) or refuses it.
    try {
      const aligned = alignIrfToDecay(
        { timeNs: irf.timeNs, counts: irf.irfCounts ?? irf.counts, channelWidthNs: irf.channelWidthNs },
        decay,
      );
      irfCounts = aligned.counts;
      irfSource = 'irf-file';
      if (aligned.note !== undefined) context.warnings.push(aligned.note);
    } catch (error) {
      if (!(error instanceof InputRejected)) throw error;
      markMissing(context, 'irf', `${error.code}: ${error.message}; ${error.hint}`);
    }
  }
  if (irfCounts === undefined) context.warnings.push('no usable IRF: the lifetime comes from a tail fit');
  const repetitionRateHz = decay.metadata.repetitionRateHz ?? settings.repetitionRateHz;
  const fit = fitDecay(decay, {
    components: settings.components,
    estimator: settings.estimator,
    ...(irfCounts === undefined ? {} : { irfCounts }),
    ...(settings.scatter === undefined ? {} : { scatter: settings.scatter }),
    ...(settings.pileUpCorrection === undefined ? {} : { pileUpCorrection: settings.pileUpCorrection }),
    // The file's own repetition rate wins over the instrument's configured one.
    ...(repetitionRateHz === undefined ? {} : { repetitionRateHz }),
  });
  if (!fit.converged) context.warnings.push('the lifetime fit did not converge; treat τ with caution');
  return {
    fit,
    summary: {
      components: fit.components.map((c) => ({
        tauNs: c.tauNs,
        ...(c.tauNsStdErr === undefined || !Number.isFinite(c.tauNsStdErr) ? {} : { tauNsStdErr: c.tauNsStdErr }),
        ...(c.tauNsStdErrFromIrf === undefined || !Number.isFinite(c.tauNsStdErrFromIrf)
          ? {}
          : { tauNsStdErrFromIrf: c.tauNsStdErrFromIrf }),
        amplitude: c.amplitude,
        amplitudeFraction: c.amplitudeFraction,
        intensityFraction: c.intensityFraction,
      })),
      tauMeanIntensityNs: fit.tauMeanIntensityNs,
      tauMeanAmplitudeNs: fit.tauMeanAmplitudeNs,
      shiftNs: fit.shiftNs,
      backgroundPerChannel: fit.backgroundPerChannel,
      rangeNs: [fit.rangeNs[0], fit.rangeNs[1]],
      degreesOfFreedom: fit.degreesOfFreedom,
      chi2Reduced: fit.chi2Reduced,
      converged: fit.converged,
      acceptable: fit.acceptable,
      unacceptableReasons: [...fit.unacceptableReasons],
      pileUpCorrected: fit.pileUpCorrected,
      ...(repetitionRateHz === undefined ? {} : { repetitionRateHz }),
      estimator: settings.estimator,
      totalCounts: totalCounts(decay.counts),
      irfSource,
      ...(irfCounts === undefined ? {} : { irfFwhmNs: fullWidthHalfMaximumNs(irfCounts, decay.channelWidthNs) }),
      errorNotes: [...fit.errorNotes],
      warnings: [...fit.warnings],
    },
  };
}
