// Propagation of the IRF's counting noise into the fitted parameters (issue 17 item 3).
//
// The IRF histogram is itself a Poisson sample: normalised to unit sum, its channel fractions ĝ have the
// multinomial covariance (diag g − g gᵀ)/N for N recorded IRF counts. The fitted parameters depend on ĝ
// through the model m(θ; g), which is linear in g. To first order (implicit-function theorem on the
// Gauss–Newton normal equations; Seber & Wild, Nonlinear Regression, Wiley 1989, §2.1 and §12.4):
//   dθ̂/dg = −(JᵀWJ)⁻¹ JᵀW (∂m/∂g),   Var_IRF(θ̂) = B (diag g − g gᵀ) Bᵀ / N,   B = (JᵀWJ)⁻¹ JᵀW ∂m/∂g,
// with J = ∂m/∂θ on the fit range and W = 1/m (Poisson). ∂m/∂g is the response to an IRF impulse: apart
// from the clamp of negative shifted-IRF values and earlier pulses (both neglected here), the model is
// translation invariant, so ∂m_k/∂g_j = h[k − j] with h the model of a unit impulse, and JᵀW∂m/∂g is a
// cross-correlation, O(IRF channels × range channels × free parameters).
import { convolveExponentialWithIrf } from './exponential-convolution.js';
import { shiftIrfSecondOrder } from './irf-second-order.js';
import { shiftIrf } from './irf-shift.js';
import type { IrfWithinChannel } from './reconvolution-model.js';
import { itemAt } from '../model/item-at.js';

export interface IrfNoiseInput {
  /** Unit-sum IRF over the whole histogram. */
  readonly irfUnit: Float64Array;
  /** Recorded IRF counts N (its sum before normalisation). */
  readonly irfTotalCounts: number;
  readonly channelWidthNs: number;
  readonly irfWithinChannel: IrfWithinChannel;
  readonly firstChannel: number;
  readonly endChannel: number;
  readonly components: number;
  /** Local parameters [τ1..τc, p1..pc, shiftNs, background, scatter] at the fit. */
  readonly local: Float64Array;
  /** Expected counts on the range and the Jacobian columns of the local slots (column-major, slot·channels). */
  readonly model: Float64Array;
  readonly jacobian: Float64Array;
  /** Free index of each local slot (−1 when fixed), and the number of free parameters. */
  readonly freeIndex: Int32Array;
  readonly freeCount: number;
  /** Covariance (JᵀWJ)⁻¹ of free parameters i, j (undefined when not estimable). */
  covariance(i: number, j: number): number | undefined;
}

/** Extra variance of each free parameter from the IRF's multinomial counting noise (see header); O(n_irf·n_range·p). */
export function irfNoiseVariances(input: IrfNoiseInput): Float64Array {
  const {
    irfUnit,
    channelWidthNs,
    firstChannel,
    endChannel,
    components,
    local,
    model,
    jacobian,
    freeIndex,
    freeCount,
  } = input;
  const channels = irfUnit.length;
  const rangeChannels = endChannel - firstChannel;
  const shiftNs = itemAt(local, 2 * components);
  const scatter = itemAt(local, 2 * components + 2);
  // Impulse at `origin`, far enough from 0 that a negative shift keeps it inside the kernel array.
  const origin = Math.max(0, -Math.floor(shiftNs / channelWidthNs)) + 4;
  const length = channels + origin + 4;
  const impulse = new Float64Array(length);
  impulse[origin] = 1;
  const shiftedImpulse = new Float64Array(length);
  if (input.irfWithinChannel === 'flat') shiftIrf(impulse, shiftNs, channelWidthNs, shiftedImpulse, undefined, length);
  else shiftIrfSecondOrder(impulse, shiftNs, channelWidthNs, shiftedImpulse, undefined, length, false);
  const kernel = Float64Array.from(shiftedImpulse, (value) => scatter * value);
  const response = new Float64Array(length);
  const none = new Float64Array(0);
  for (let i = 0; i < components; i++) {
    const tauNs = itemAt(local, i);
    const amplitude = (itemAt(local, components + i) * channelWidthNs) / tauNs;
    convolveExponentialWithIrf(shiftedImpulse, undefined, tauNs, channelWidthNs, undefined, 0, length, false, {
      response,
      responsePerTauNs: none,
      responsePerShiftNs: none,
    });
    for (let q = 0; q < length; q++) kernel[q] = itemAt(kernel, q) + amplitude * itemAt(response, q);
  }
  // y_l[k] = J_kl·W_k for each free parameter l (k on the range).
  const slots: number[] = [];
  const freeOfSlot: number[] = [];
  for (let slot = 0; slot < freeIndex.length; slot++) {
    const free = itemAt(freeIndex, slot);
    if (free >= 0) {
      slots.push(slot);
      freeOfSlot.push(free);
    }
  }
  const weighted = slots.map((slot) => {
    const column = new Float64Array(rangeChannels);
    for (let k = 0; k < rangeChannels; k++)
      column[k] = itemAt(jacobian, slot * rangeChannels + k) / Math.max(itemAt(model, k), 1e-10);
    return column;
  });
  // Covariance rows of the free parameters (undefined entries count as 0: not estimable, not propagated).
  const cov = new Float64Array(freeCount * freeCount);
  for (let a = 0; a < freeCount; a++)
    for (let b = 0; b < freeCount; b++) cov[a * freeCount + b] = input.covariance(a, b) ?? 0;
  const sumSquares = new Float64Array(freeCount);
  const sumFirst = new Float64Array(freeCount);
  const z = new Float64Array(freeCount);
  const b = new Float64Array(freeCount);
  for (let j = 0; j < channels; j++) {
    const g = itemAt(irfUnit, j);
    if (!(g > 0)) continue;
    z.fill(0);
    // ∂m_k/∂g_j = kernel[k − j + origin] for absolute channel k = firstChannel + r; causal part only.
    const startR = Math.max(0, j - origin - firstChannel);
    for (let s = 0; s < slots.length; s++) {
      const column = weighted[s] as Float64Array;
      let total = 0;
      for (let r = startR; r < rangeChannels; r++) {
        const q = firstChannel + r - j + origin;
        if (q >= length) break;
        total += itemAt(column, r) * itemAt(kernel, q);
      }
      z[itemAt(freeOfSlot, s)] = total;
    }
    for (let a = 0; a < freeCount; a++) {
      let value = 0;
      for (let c = 0; c < freeCount; c++) value += itemAt(cov, a * freeCount + c) * itemAt(z, c);
      b[a] = value;
      sumSquares[a] = itemAt(sumSquares, a) + g * value * value;
      sumFirst[a] = itemAt(sumFirst, a) + g * value;
    }
  }
  return Float64Array.from(
    sumSquares,
    (squares, a) => Math.max(0, squares - itemAt(sumFirst, a) ** 2) / input.irfTotalCounts,
  );
}
