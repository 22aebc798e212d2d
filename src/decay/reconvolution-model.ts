// Reconvolution model: I(t) = b + s·IRF + Σ aᵢ·exp(−t/τᵢ) ⊗ IRF(t − shift), channel-integrated, with
// optional periodic excitation; the linear parameters are the component photon counts pᵢ = aᵢτᵢ/Δ. Uses the exact recursion of exponential-convolution.ts; O(c·channels).
import type { DatasetModel } from './dataset-model.js';
import { convolveExponentialWithIrf, type ConvolutionBuffers } from './exponential-convolution.js';
import { shiftIrf } from './irf-shift.js';

export interface ReconvolutionSetup {
  /** IRF per channel over the whole histogram, normalised to unit sum. */
  readonly irfUnit: Float64Array;
  readonly channelWidthNs: number;
  /** Excitation period in ns (1 / repetition rate) when earlier pulses are modelled. */
  readonly periodNs: number | undefined;
  /** First channel of the fit range (inclusive). */
  readonly firstChannel: number;
  /** End of the fit range (exclusive). */
  readonly endChannel: number;
  readonly components: number;
}

/** Builds the reconvolution model with its scratch buffers allocated once (see header for the formula). */
export function createReconvolutionModel(setup: ReconvolutionSetup): DatasetModel {
  const { irfUnit, channelWidthNs, periodNs, firstChannel, endChannel, components } = setup;
  const channelCount = endChannel - firstChannel;
  const shifted = new Float64Array(irfUnit.length);
  const slope = new Float64Array(irfUnit.length);
  const shiftScratch = new Float64Array(channelCount * components);
  const scratchTau = new Float64Array(channelCount);
  const buffers: ConvolutionBuffers[] = [];
  const valueBuffers: ConvolutionBuffers[] = [];
  let boundJacobian: Float64Array | undefined;
  const bind = (jacobian: Float64Array): void => {
    if (boundJacobian === jacobian) return;
    buffers.length = 0;
    valueBuffers.length = 0;
    for (let i = 0; i < components; i++) {
      const response = jacobian.subarray((components + i) * channelCount, (components + i + 1) * channelCount);
      buffers.push({
        response,
        responsePerTauNs: jacobian.subarray(i * channelCount, (i + 1) * channelCount),
        responsePerShiftNs: shiftScratch.subarray(i * channelCount, (i + 1) * channelCount),
      });
      valueBuffers.push({ response, responsePerTauNs: scratchTau, responsePerShiftNs: scratchTau });
    }
    boundJacobian = jacobian;
  };
  return {
    channelCount,
    components,
    evaluate(local, withDerivatives, model, jacobian): void {
      bind(jacobian);
      const shiftNs = local[2 * components] as number;
      const background = local[2 * components + 1] as number;
      const scatter = local[2 * components + 2] as number;
      shiftIrf(irfUnit, shiftNs, channelWidthNs, shifted, withDerivatives ? slope : undefined);
      for (let k = 0; k < channelCount; k++) model[k] = background + scatter * (shifted[firstChannel + k] as number);
      for (let i = 0; i < components; i++) {
        const buffer = buffers[i] as ConvolutionBuffers;
        const tauNs = local[i] as number;
        // The linear parameter is the component's photon count p = a·τ/Δ (a = amplitude): p and τ are
        // nearly uncorrelated, which keeps LM well conditioned when τ is short against the IRF.
        const amplitude = ((local[components + i] as number) * channelWidthNs) / tauNs;
        const photonScale = channelWidthNs / tauNs;
        const target = withDerivatives ? buffer : (valueBuffers[i] as ConvolutionBuffers);
        convolveExponentialWithIrf(
          shifted, withDerivatives ? slope : undefined, tauNs, channelWidthNs, periodNs,
          firstChannel, endChannel, withDerivatives, target,
        );
        const response = buffer.response;
        for (let k = 0; k < channelCount; k++) model[k] = (model[k] as number) + amplitude * (response[k] as number);
        if (withDerivatives) {
          // ∂m/∂τ at fixed p = a·(∂R/∂τ − R/τ); ∂m/∂p = R·Δ/τ.
          const perTau = buffer.responsePerTauNs;
          const inverseTau = 1 / tauNs;
          for (let k = 0; k < channelCount; k++) {
            perTau[k] = amplitude * ((perTau[k] as number) - (response[k] as number) * inverseTau);
            response[k] = (response[k] as number) * photonScale;
          }
        }
      }
      if (!withDerivatives) return;
      const shiftOffset = 2 * components * channelCount;
      const backgroundOffset = shiftOffset + channelCount;
      const scatterOffset = backgroundOffset + channelCount;
      for (let k = 0; k < channelCount; k++) {
        jacobian[shiftOffset + k] = scatter * (slope[firstChannel + k] as number);
        jacobian[backgroundOffset + k] = 1;
        jacobian[scatterOffset + k] = shifted[firstChannel + k] as number;
      }
      for (let i = 0; i < components; i++) {
        const amplitude = ((local[components + i] as number) * channelWidthNs) / (local[i] as number);
        const offset = i * channelCount;
        for (let k = 0; k < channelCount; k++) {
          jacobian[shiftOffset + k] = (jacobian[shiftOffset + k] as number) + amplitude * (shiftScratch[offset + k] as number);
        }
      }
    },
  };
}
