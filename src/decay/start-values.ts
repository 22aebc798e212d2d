// Automatic start values, so typical data needs no guesses: background from the channels before the
// rise (or the late tail), a lifetime from the log-slope of the tail (weighted linear regression of
// ln(n − b) on t, weights n − b ≈ 1/var(ln n) for Poisson counts; common practice), spreads of that
// lifetime for several components, and component photons by weighted linear least squares at those lifetimes
// (the model is linear in photons and background).
import { logLinearFit } from './log-linear-fit.js';
import type { DatasetModel } from './dataset-model.js';
import { choleskyInPlace, choleskySolveInPlace } from './linear-algebra.js';
import { peakChannel } from './irf-metrics.js';
import { weightedCrossProducts } from './weighted-cross-products.js';
import { itemAt } from '../model/item-at.js';

/** Lifetime multipliers of the tail estimate per number of components; each row is one start (multi-start). */
export const LIFETIME_SPREADS: Readonly<Record<number, readonly (readonly number[])[]>> = {
  1: [[1]],
  2: [
    [0.35, 1.4],
    [0.15, 1.15],
    [0.6, 2.0],
    [0.06, 1.05],
  ],
  3: [
    [0.15, 0.6, 1.6],
    [0.05, 0.4, 1.3],
    [0.3, 1.0, 3.0],
    [0.1, 0.35, 1.1],
  ],
  4: [
    [0.05, 0.2, 0.7, 1.8],
    [0.1, 0.4, 1.2, 3.0],
    [0.03, 0.15, 0.5, 1.4],
    [0.2, 0.6, 1.5, 4.0],
  ],
};

/** Background start (counts per channel): mean before `riseChannel` if ≥ 10 channels there, else the lowest 16-channel mean of the late quarter; O(n). */
export function estimateBackground(counts: Float64Array, riseChannel: number | undefined): number {
  const n = counts.length;
  let lowestTail = Number.POSITIVE_INFINITY;
  const window = Math.min(16, n);
  for (let start = Math.floor((3 * n) / 4); start + window <= n; start += window) {
    let sum = 0;
    for (let k = start; k < start + window; k++) sum += itemAt(counts, k);
    lowestTail = Math.min(lowestTail, sum / window);
  }
  if (!Number.isFinite(lowestTail)) lowestTail = 0;
  if (riseChannel !== undefined && riseChannel >= 10) {
    let sum = 0;
    for (let k = 0; k < riseChannel; k++) sum += itemAt(counts, k);
    return sum / riseChannel;
  }
  return lowestTail;
}

/**
 * Lifetime start in ns from first moments: mean arrival time of the background-subtracted decay minus that
 * of the IRF (for one exponential and a full window this is τ exactly; moment method, Isenberg & Dyson,
 * Biophys. J. 9, 1337 (1969), from memory). Undefined when not positive. O(n).
 */
export function estimateMomentLifetimeNs(
  timeNs: Float64Array,
  counts: Float64Array,
  irfUnit: Float64Array,
  background: number,
  firstChannel: number,
  endChannel: number,
): number | undefined {
  let weight = 0;
  let moment = 0;
  for (let k = firstChannel; k < endChannel; k++) {
    const excess = itemAt(counts, k) - background;
    weight += excess;
    moment += excess * itemAt(timeNs, k);
  }
  let irfMoment = 0;
  for (let k = 0; k < irfUnit.length; k++) irfMoment += itemAt(irfUnit, k) * itemAt(timeNs, k);
  if (!(weight > 0)) return undefined;
  const tauNs = moment / weight - irfMoment;
  return tauNs > 0 ? tauNs : undefined;
}

/** Lifetime start in ns from the weighted log-slope of the tail between the decay peak and where n − b falls below 5 % of its peak; O(n). */
export function estimateTailLifetimeNs(
  timeNs: Float64Array,
  counts: Float64Array,
  background: number,
  firstChannel: number,
  endChannel: number,
  channelWidthNs: number,
): number {
  const windowCounts = counts.subarray(firstChannel, endChannel);
  const peak = firstChannel + peakChannel(windowCounts);
  const peakExcess = itemAt(counts, peak) - background;
  const spanNs = (endChannel - firstChannel) * channelWidthNs;
  if (!(peakExcess > 0)) return spanNs / 4;
  const tailTimesNs: number[] = [];
  const tailExcess: number[] = [];
  for (let k = peak; k < endChannel; k++) {
    const excess = itemAt(counts, k) - background;
    if (excess < 0.05 * peakExcess) {
      if (tailTimesNs.length >= 8) break;
      continue;
    }
    tailTimesNs.push(itemAt(timeNs, k));
    tailExcess.push(excess);
  }
  const slope = logLinearFit(tailTimesNs, tailExcess, 3)?.slopePerNs ?? Number.NaN;
  const tauNs = slope < 0 ? -1 / slope : Number.NaN;
  if (!Number.isFinite(tauNs)) return spanNs / 4;
  return Math.min(Math.max(tauNs, channelWidthNs / 2), spanNs * 10);
}

/** Reusable buffers for solveLinearParameters: Jacobian (slots × channels) followed by the residual column n − m₀ (channels). */
export interface LinearSolveScratch {
  readonly jacobian: Float64Array;
  /** Index of the residual column in `jacobian` (= slots). */
  readonly baseColumn: number;
  /** The residual column, a view into `jacobian`. */
  readonly base: Float64Array;
  readonly weights: Float64Array;
}

/** Allocates the buffers of solveLinearParameters for a model. */
export function linearSolveScratch(model: DatasetModel, slots: number): LinearSolveScratch {
  const channels = model.channelCount;
  const jacobian = new Float64Array((slots + 1) * channels);
  return {
    jacobian,
    baseColumn: slots,
    base: jacobian.subarray(slots * channels),
    weights: new Float64Array(channels),
  };
}

/**
 * Sets the component photons and background of `local` listed in `linearSlots` by Neyman-weighted linear least
 * squares (weights 1/max(n, 1)) with all other parameters held; negative photon counts are raised to 10⁻³ of
 * the largest and a negative background to 0. O(channels·slots²). Returns false when the normal matrix is singular.
 */
export function solveLinearParameters(
  model: DatasetModel,
  counts: Float64Array,
  local: Float64Array,
  linearSlots: readonly number[],
  scratch: LinearSolveScratch,
  backgroundSlot = -1,
): boolean {
  const channels = model.channelCount;
  const { jacobian, base, weights } = scratch;
  const trial = Float64Array.from(local);
  for (const slot of linearSlots) trial[slot] = 0;
  model.evaluate(trial, true, base, jacobian);
  for (let k = 0; k < channels; k++) {
    const n = itemAt(counts, k);
    weights[k] = 1 / (n > 1 ? n : 1);
    base[k] = n - itemAt(base, k);
  }
  // Normal matrix Σ w·∂m∂mᵀ and right-hand side Σ w·∂m·(n − m₀) as the cross products of the columns and the residual column.
  const size = linearSlots.length;
  const products = new Float64Array((size + 1) * (size + 1));
  weightedCrossProducts(jacobian, channels, Int32Array.from([...linearSlots, scratch.baseColumn]), weights, products);
  const normal = new Float64Array(size * size);
  const rhs = new Float64Array(size);
  for (let a = 0; a < size; a++) {
    rhs[a] = itemAt(products, a * (size + 1) + size);
    for (let b = a; b < size; b++) {
      normal[a * size + b] = itemAt(products, a * (size + 1) + b);
      normal[b * size + a] = itemAt(products, a * (size + 1) + b);
    }
  }
  if (!choleskyInPlace(normal, size)) return false;
  choleskySolveInPlace(normal, size, rhs);
  let largest = 0;
  for (let a = 0; a < size; a++) largest = Math.max(largest, itemAt(rhs, a));
  for (let a = 0; a < size; a++) {
    const value = itemAt(rhs, a);
    const slot = itemAt(linearSlots, a);
    const floor = slot === backgroundSlot ? 0 : 1e-3 * Math.max(largest, 1);
    local[slot] = Number.isFinite(value) ? Math.max(value, floor) : floor;
  }
  return true;
}
