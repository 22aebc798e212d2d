// The three estimators as residual transforms: the fit minimises Σ r_k² in every case.
//   ml          Poisson deviance residuals, r = sign(n − m)·√(2[m − n + n·ln(n/m)]) (2m when n = 0);
//               Σ r² is the Poisson deviance, minimised by LM as in Laurence & Chromy, Nat. Methods 7, 338 (2010).
//   lsq-neyman  r = (n − m)/√max(n, 1)  (Neyman weights, the usual TCSPC least squares)
//   lsq-pearson r = (n − m)/√m          (Pearson weights; the weight depends on the model)
// Weighted LS is biased at low counts, ML is not (Maus et al., Anal. Chem. 73, 2078 (2001)).
import { itemAt } from '../model/item-at.js';

export const ESTIMATORS = ['ml', 'lsq-neyman', 'lsq-pearson'] as const;
export type Estimator = (typeof ESTIMATORS)[number];

/** Smallest model value used in a logarithm or a weight (counts); keeps the deviance finite when m → 0. */
export const MODEL_FLOOR_COUNTS = 1e-10;

/**
 * Fills residuals r_k and dr_k/dm_k for `estimator` and returns Σ r_k² (deviance or χ²); for `ml` the sum is the
 * Poisson deviance term by term and in order as poissonDeviance computes it (the same number). O(channels).
 */
export function estimatorResiduals(
  estimator: Estimator,
  counts: Float64Array,
  model: Float64Array,
  residuals: Float64Array,
  residualPerModel: Float64Array | undefined,
): number {
  const length = counts.length;
  let sum = 0;
  if (estimator === 'ml') {
    for (let k = 0; k < length; k++) {
      const n = itemAt(counts, k);
      const m = Math.max(itemAt(model, k), MODEL_FLOOR_COUNTS);
      const unit = n > 0 ? 2 * (m - n + n * Math.log(n / m)) : 2 * m;
      const magnitude = Math.sqrt(unit > 0 ? unit : 0);
      const r = n > m ? magnitude : -magnitude;
      residuals[k] = r;
      sum += unit;
      if (residualPerModel !== undefined) {
        residualPerModel[k] = magnitude > 1e-7 ? (1 - n / m) / r : -1 / Math.sqrt(m);
      }
    }
    return sum;
  }
  if (estimator === 'lsq-neyman') {
    for (let k = 0; k < length; k++) {
      const n = itemAt(counts, k);
      const inverseSigma = 1 / Math.sqrt(n > 1 ? n : 1);
      const r = (n - itemAt(model, k)) * inverseSigma;
      residuals[k] = r;
      sum += r * r;
      if (residualPerModel !== undefined) residualPerModel[k] = -inverseSigma;
    }
    return sum;
  }
  for (let k = 0; k < length; k++) {
    const n = itemAt(counts, k);
    const m = Math.max(itemAt(model, k), MODEL_FLOOR_COUNTS);
    const root = Math.sqrt(m);
    const r = (n - m) / root;
    residuals[k] = r;
    sum += r * r;
    if (residualPerModel !== undefined) residualPerModel[k] = -(n + m) / (2 * m * root);
  }
  return sum;
}

/**
 * Gauss–Newton weights of Σ r² without forming r: curvature_k = (dr_k/dm_k)² and slope_k = r_k·dr_k/dm_k,
 * so that JᵀJ = Σ curvature·∂m∂mᵀ and Jᵀr = Σ slope·∂m (same values as estimatorResiduals, no square
 * roots). Returns Σ r² bit for bit as estimatorObjective does (same terms, same order), so the minimiser
 * may compare values from either path. `countsLog` from countsLogCounts. O(channels).
 */
export function estimatorWeights(
  estimator: Estimator,
  counts: Float64Array,
  countsLog: Float64Array,
  model: Float64Array,
  curvature: Float64Array,
  slope: Float64Array,
): number {
  const length = counts.length;
  let sum = 0;
  if (estimator === 'ml') {
    for (let k = 0; k < length; k++) {
      const n = itemAt(counts, k);
      const m = Math.max(itemAt(model, k), MODEL_FLOOR_COUNTS);
      const half = n > 0 ? m - n + itemAt(countsLog, k) - n * Math.log(m) : m;
      const unit = half > 0 ? 2 * half : 0;
      const ratio = 1 - n / m;
      sum += half;
      slope[k] = ratio;
      curvature[k] = unit > 1e-14 ? (ratio * ratio) / unit : n > 0 ? n / (m * m) : 1 / (2 * m);
    }
    return 2 * sum;
  }
  if (estimator === 'lsq-neyman') {
    for (let k = 0; k < length; k++) {
      const n = itemAt(counts, k);
      const variance = n > 1 ? n : 1;
      const inverseVariance = 1 / variance;
      const difference = n - itemAt(model, k);
      sum += (difference * difference) / variance;
      slope[k] = -difference * inverseVariance;
      curvature[k] = inverseVariance;
    }
    return sum;
  }
  for (let k = 0; k < length; k++) {
    const n = itemAt(counts, k);
    const m = Math.max(itemAt(model, k), MODEL_FLOOR_COUNTS);
    const difference = n - m;
    const total = n + m;
    sum += (difference * difference) / m;
    slope[k] = -(difference * total) / (2 * m * m);
    curvature[k] = (total * total) / (4 * m * m * m);
  }
  return sum;
}

/** Whole counts below this take n·ln(n) from a table. */
const SMALL_COUNTS = 4096;
/** k·ln(k) for k < SMALL_COUNTS, by the same expression as below (so the same values). */
const SMALL_COUNTS_LOG = Float64Array.from({ length: SMALL_COUNTS }, (_unused, k) => (k > 0 ? k * Math.log(k) : 0));

/** n·ln(n) per channel (0 where n = 0), precomputed once per dataset so the ML objective needs one logarithm per channel. */
export function countsLogCounts(counts: Float64Array): Float64Array {
  const table = SMALL_COUNTS_LOG;
  const countsLog = new Float64Array(counts.length);
  for (let k = 0; k < counts.length; k++) {
    const n = itemAt(counts, k);
    // Most channels hold small whole counts: a table lookup instead of a logarithm.
    countsLog[k] = n >= 0 && n < SMALL_COUNTS && Number.isInteger(n) ? itemAt(table, n) : n > 0 ? n * Math.log(n) : 0;
  }
  return countsLog;
}

/** Σ r² only (no residual arrays), the cheap path for trial steps; `countsLog` from countsLogCounts. O(channels). */
export function estimatorObjective(
  estimator: Estimator,
  counts: Float64Array,
  countsLog: Float64Array,
  model: Float64Array,
): number {
  const length = counts.length;
  let sum = 0;
  if (estimator === 'ml') {
    for (let k = 0; k < length; k++) {
      const n = itemAt(counts, k);
      const m = Math.max(itemAt(model, k), MODEL_FLOOR_COUNTS);
      sum += n > 0 ? m - n + itemAt(countsLog, k) - n * Math.log(m) : m;
    }
    return 2 * sum;
  }
  for (let k = 0; k < length; k++) {
    const n = itemAt(counts, k);
    const m = estimator === 'lsq-neyman' ? itemAt(model, k) : Math.max(itemAt(model, k), MODEL_FLOOR_COUNTS);
    const difference = n - m;
    sum += (difference * difference) / (estimator === 'lsq-neyman' ? (n > 1 ? n : 1) : m);
  }
  return sum;
}

/** Poisson deviance 2Σ[m − n + n·ln(n/m)] of counts against a model (counts); O(channels). */
export function poissonDeviance(counts: ArrayLike<number>, model: ArrayLike<number>): number {
  let sum = 0;
  for (let k = 0; k < counts.length; k++) {
    const n = itemAt(counts, k);
    const m = Math.max(itemAt(model, k), MODEL_FLOOR_COUNTS);
    sum += n > 0 ? 2 * (m - n + n * Math.log(n / m)) : 2 * m;
  }
  return sum;
}

/** Pearson χ² Σ(n − m)²/m (counts); O(channels). */
export function pearsonChiSquare(counts: ArrayLike<number>, model: ArrayLike<number>): number {
  let sum = 0;
  for (let k = 0; k < counts.length; k++) {
    const m = Math.max(itemAt(model, k), MODEL_FLOOR_COUNTS);
    const difference = itemAt(counts, k) - m;
    sum += (difference * difference) / m;
  }
  return sum;
}
