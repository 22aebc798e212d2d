// Reconvolution model: I(t) = b + s·IRF + Σ aᵢ·exp(−t/τᵢ) ⊗ IRF(t − shift), channel-integrated, with
// optional periodic excitation; the linear parameters are the component photon counts pᵢ = aᵢτᵢ/Δ. Uses the exact
// recursion of exponential-convolution.ts, with derivatives in one pass per component (reconvolution-component.ts);
// the shifted IRF is kept while the shift does not change. O(c·channels); buffers are allocated once.
import type { DatasetModel } from './dataset-model.js';
import { convolveExponentialWithIrf, type ConvolutionBuffers } from './exponential-convolution.js';
import { shiftIrfSecondOrder } from './irf-second-order.js';
import { shiftIrf } from './irf-shift.js';
import { addComponentWithDerivatives } from './reconvolution-component.js';
import { itemAt } from '../model/item-at.js';

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
  /** 'flat' (IRF flat within a channel, linear sub-channel shift) or 'second-order' (irf-second-order.ts). Default 'second-order'. */
  readonly irfWithinChannel?: IrfWithinChannel;
}

/** How the IRF is treated within a channel (see irf-second-order.ts). */
export type IrfWithinChannel = 'flat' | 'second-order';

/** Builds the reconvolution model with its scratch buffers allocated once (see header for the formula). */
export function createReconvolutionModel(setup: ReconvolutionSetup): DatasetModel {
  const { irfUnit, channelWidthNs, periodNs, firstChannel, endChannel, components } = setup;
  const shiftInto = (setup.irfWithinChannel ?? 'second-order') === 'flat' ? shiftIrf : shiftIrfSecondOrder;
  const channelCount = endChannel - firstChannel;
  const shifted = new Float64Array(irfUnit.length);
  const slope = new Float64Array(irfUnit.length);
  // The recursion reads the shifted IRF up to the range end, or over the whole histogram with earlier pulses.
  const shiftedChannels = periodNs === undefined ? Math.min(endChannel, irfUnit.length) : irfUnit.length;
  // The shifted IRF (and its slope) of the last evaluation: reused while the shift is unchanged.
  let shiftedForNs = Number.NaN;
  let slopeForNs = Number.NaN;
  // Per-component ∂R/∂shift, only for the two-pass path with earlier pulses (the single pass adds it directly).
  const shiftScratch = new Float64Array(periodNs === undefined ? 0 : channelCount * components);
  // The value-only path writes no derivatives: its buffers need no room for them.
  const noDerivatives = new Float64Array(0);
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
      valueBuffers.push({ response, responsePerTauNs: noDerivatives, responsePerShiftNs: noDerivatives });
    }
    boundJacobian = jacobian;
  };
  const prepareShiftedIrf = (shiftNs: number, withSlope: boolean): void => {
    if (shiftNs === shiftedForNs && (!withSlope || shiftNs === slopeForNs)) return;
    shiftInto(irfUnit, shiftNs, channelWidthNs, shifted, withSlope ? slope : undefined, shiftedChannels);
    shiftedForNs = shiftNs;
    slopeForNs = withSlope ? shiftNs : Number.NaN;
  };
  return {
    channelCount,
    components,
    evaluate(local, withDerivatives, model, jacobian): void {
      bind(jacobian);
      const shiftNs = itemAt(local, 2 * components);
      const background = itemAt(local, 2 * components + 1);
      const scatter = itemAt(local, 2 * components + 2);
      prepareShiftedIrf(shiftNs, withDerivatives);
      const shiftColumn = jacobian.subarray(2 * components * channelCount, (2 * components + 1) * channelCount);
      if (withDerivatives) {
        const backgroundColumn = jacobian.subarray(
          (2 * components + 1) * channelCount,
          (2 * components + 2) * channelCount,
        );
        const scatterColumn = jacobian.subarray(
          (2 * components + 2) * channelCount,
          (2 * components + 3) * channelCount,
        );
        startWithDerivatives(
          model,
          channelCount,
          shifted,
          slope,
          firstChannel,
          background,
          scatter,
          shiftColumn,
          backgroundColumn,
          scatterColumn,
        );
      } else {
        startModel(model, channelCount, shifted, firstChannel, background, scatter);
      }
      for (let i = 0; i < components; i++) {
        const buffer = itemAt(buffers, i);
        const tauNs = itemAt(local, i);
        // The linear parameter is the component's photon count p = a·τ/Δ (a = amplitude): p and τ are
        // nearly uncorrelated, which keeps LM well conditioned when τ is short against the IRF.
        const amplitude = (itemAt(local, components + i) * channelWidthNs) / tauNs;
        if (withDerivatives && periodNs === undefined) {
          // The common case in one pass (reconvolution-component.ts); the same values as the two passes below.
          addComponentWithDerivatives(shifted, slope, tauNs, channelWidthNs, amplitude, firstChannel, channelCount, {
            model,
            perTauNs: buffer.responsePerTauNs,
            perPhoton: buffer.response,
            perShiftNs: shiftColumn,
          });
          continue;
        }
        const target = withDerivatives ? buffer : itemAt(valueBuffers, i);
        convolveExponentialWithIrf(
          shifted,
          withDerivatives ? slope : undefined,
          tauNs,
          channelWidthNs,
          periodNs,
          firstChannel,
          endChannel,
          withDerivatives,
          target,
        );
        if (withDerivatives)
          addConvolvedComponent(model, channelCount, buffer, shiftColumn, amplitude, tauNs, channelWidthNs);
        else addComponent(model, channelCount, buffer.response, amplitude);
      }
    },
  };
}

// The passes below take every array as an argument (no captured variables), so the compiled loops keep them in registers.

/** model[k] = b + s·g_shift[firstChannel + k] on the channelCount range channels: background and scatter. */
function startModel(
  model: Float64Array,
  channelCount: number,
  shifted: Float64Array,
  firstChannel: number,
  background: number,
  scatter: number,
): void {
  for (let k = 0; k < channelCount; k++) model[k] = background + scatter * itemAt(shifted, firstChannel + k);
}

/** startModel plus the shift (scatter part), background and scatter columns of the Jacobian. */
function startWithDerivatives(
  model: Float64Array,
  channelCount: number,
  shifted: Float64Array,
  slope: Float64Array,
  firstChannel: number,
  background: number,
  scatter: number,
  shiftColumn: Float64Array,
  backgroundColumn: Float64Array,
  scatterColumn: Float64Array,
): void {
  for (let k = 0; k < channelCount; k++) {
    const irf = itemAt(shifted, firstChannel + k);
    model[k] = background + scatter * irf;
    shiftColumn[k] = scatter * itemAt(slope, firstChannel + k);
    backgroundColumn[k] = 1;
    scatterColumn[k] = irf;
  }
}

/** model += a·R (a = amplitude in counts per channel, R = response per unit amplitude). */
function addComponent(model: Float64Array, channelCount: number, response: Float64Array, amplitude: number): void {
  for (let k = 0; k < channelCount; k++) model[k] = itemAt(model, k) + amplitude * itemAt(response, k);
}

/**
 * One pass over a component's convolution outputs (used with earlier pulses): m += a·R; ∂m/∂τ at fixed p = a·(∂R/∂τ − R/τ) (in place
 * of ∂R/∂τ); ∂m/∂p = R·Δ/τ (in place of R); ∂m/∂shift += a·∂R/∂shift.
 */
function addConvolvedComponent(
  model: Float64Array,
  channelCount: number,
  buffer: ConvolutionBuffers,
  shiftColumn: Float64Array,
  amplitude: number,
  tauNs: number,
  channelWidthNs: number,
): void {
  const { response, responsePerTauNs: perTau, responsePerShiftNs: perShift } = buffer;
  const inverseTau = 1 / tauNs;
  const photonScale = channelWidthNs / tauNs;
  for (let k = 0; k < channelCount; k++) {
    const value = itemAt(response, k);
    model[k] = itemAt(model, k) + amplitude * value;
    perTau[k] = amplitude * (itemAt(perTau, k) - value * inverseTau);
    response[k] = value * photonScale;
    shiftColumn[k] = itemAt(shiftColumn, k) + amplitude * itemAt(perShift, k);
  }
}
