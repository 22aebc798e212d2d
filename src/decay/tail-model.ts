// Tail model without an IRF (phosphorescence, ms decays, or data recorded without a response):
//   I(t) = b + Σ aᵢ·exp(−(t − t₀)/τᵢ) from the fit start t₀, channel-integrated:
//   expected[k] = b + Σ aᵢ·exp(−(t_k − t₀)/τᵢ)·(τᵢ/Δ)·(1 − exp(−Δ/τᵢ))·P(τᵢ),
// with aᵢ = pᵢΔ/τᵢ (pᵢ = photons parameter) and P(τ) = 1/(1 − exp(−T/τ)) for periodic excitation of period T (earlier pulses add a geometric
// series of the same exponential), else 1. Shift and scatter do not exist here (always fixed at 0).
import type { DatasetModel } from './dataset-model.js';
import { itemAt } from '../model/item-at.js';

export interface TailSetup {
  readonly timeNs: Float64Array;
  readonly channelWidthNs: number;
  readonly periodNs: number | undefined;
  readonly firstChannel: number;
  readonly endChannel: number;
  readonly components: number;
}

/** Builds the tail model (see header); amplitudes are counts per channel at the fit start t₀ for τ ≫ Δ. */
export function createTailModel(setup: TailSetup): DatasetModel {
  const { timeNs, channelWidthNs, periodNs, firstChannel, endChannel, components } = setup;
  const channelCount = endChannel - firstChannel;
  const startNs = itemAt(timeNs, firstChannel);
  return {
    channelCount,
    components,
    evaluate(local, withDerivatives, model, jacobian): void {
      const background = itemAt(local, 2 * components + 1);
      for (let k = 0; k < channelCount; k++) model[k] = background;
      for (let i = 0; i < components; i++) {
        const tauNs = itemAt(local, i);
        // Linear parameter: photons p = a·τ/Δ (see reconvolution-model.ts); ∂m/∂τ is taken at fixed p.
        const amplitude = (itemAt(local, components + i) * channelWidthNs) / tauNs;
        const photonScale = channelWidthNs / tauNs;
        const u = channelWidthNs / tauNs;
        const x = Math.exp(-u);
        const q = -Math.expm1(-u);
        let folded = 1;
        let dFolded = 0;
        if (periodNs !== undefined) {
          const y = Math.exp(-periodNs / tauNs);
          folded = 1 / (1 - y);
          dFolded = ((y * periodNs) / (tauNs * tauNs)) * folded * folded;
        }
        const width = (tauNs / channelWidthNs) * q;
        const dWidth = (q - x * u) / channelWidthNs;
        const responseOffset = (components + i) * channelCount;
        const tauOffset = i * channelCount;
        for (let k = 0; k < channelCount; k++) {
          const elapsedNs = itemAt(timeNs, firstChannel + k) - startNs;
          const decay = Math.exp(-elapsedNs / tauNs);
          const response = decay * width * folded;
          model[k] = itemAt(model, k) + amplitude * response;
          if (withDerivatives) {
            jacobian[responseOffset + k] = response * photonScale;
            const perTau = decay * (((elapsedNs / (tauNs * tauNs)) * width + dWidth) * folded + width * dFolded);
            jacobian[tauOffset + k] = amplitude * (perTau - response / tauNs);
          }
        }
      }
      if (!withDerivatives) return;
      const shiftOffset = 2 * components * channelCount;
      for (let k = 0; k < channelCount; k++) {
        jacobian[shiftOffset + k] = 0;
        jacobian[shiftOffset + channelCount + k] = 1;
        jacobian[shiftOffset + 2 * channelCount + k] = 0;
      }
    },
  };
}
