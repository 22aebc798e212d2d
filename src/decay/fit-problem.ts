// The objective of one fit: one or more decays (datasets), each with its own model and counts, whose
// local parameters map onto one shared vector of free parameters (links) or onto fixed values.
// Accumulates JᵀJ and Jᵀr block by block, so linked (global) fits cost no more than separate ones. The
// model and Jacobian of the last evaluation with derivatives are kept, so the fitted counts and the Fisher
// information at the optimum (where the minimiser evaluated last) cost no further model evaluation.
import type { DatasetModel } from './dataset-model.js';
import {
  countsLogCounts,
  estimatorObjective,
  estimatorWeights,
  MODEL_FLOOR_COUNTS,
  type Estimator,
} from './estimators.js';
import type { SumOfSquaresObjective } from './levenberg-marquardt.js';
import { weightedCrossProducts } from './weighted-cross-products.js';
import { itemAt } from '../model/item-at.js';

export interface DatasetTerm {
  readonly model: DatasetModel;
  /** Counts on the fit range (same length as model.channelCount). */
  readonly counts: Float64Array;
  /** Per local slot: index of its free parameter, or −1 when fixed. */
  readonly freeIndex: Int32Array;
  /** Per local slot: the value used when the slot is fixed. */
  readonly fixedValues: Float64Array;
  /** Local slot of the background: while it is below 0, every channel of the model must stay ≥ POSITIVITY_FLOOR_COUNTS. */
  readonly backgroundSlot: number;
}

/**
 * Smallest expected count per fitted channel (counts) once the background is below 0: the Poisson likelihood
 * needs m > 0 in every channel, not b ≥ 0 (issue 17.1); a step below this is rejected like a non-finite one.
 */
export const POSITIVITY_FLOOR_COUNTS = 1e-6;

interface DatasetScratch {
  readonly local: Float64Array;
  readonly model: Float64Array;
  readonly jacobian: Float64Array;
  /** Per channel: r·dr/dm (Gauss–Newton) — Jᵀr = Σ slope·∂m. */
  readonly slope: Float64Array;
  /** Per channel: (dr/dm)² (Gauss–Newton) or 1/variance (Fisher information). */
  readonly weights: Float64Array;
  readonly freeSlots: Int32Array;
  readonly countsLog: Float64Array;
  /** Cross products and gradient over this dataset's free slots (freeSlots.length² and freeSlots.length). */
  readonly products: Float64Array;
  readonly slotGradient: Float64Array;
}

/** Σ r² over all datasets for an estimator, with the block-accumulated normal matrix; allocation happens once here. */
export class FitProblem implements SumOfSquaresObjective {
  readonly parameterCount: number;
  readonly terms: readonly DatasetTerm[];
  readonly estimator: Estimator;
  private readonly scratch: DatasetScratch[];
  /** Parameters of the last evaluation with derivatives, while every dataset's model and Jacobian still hold it. */
  private readonly derivativesParameters: Float64Array;
  private derivativesCurrent = false;

  constructor(terms: readonly DatasetTerm[], estimator: Estimator, parameterCount: number) {
    this.terms = terms;
    this.estimator = estimator;
    this.parameterCount = parameterCount;
    this.derivativesParameters = new Float64Array(parameterCount);
    this.scratch = terms.map((term) => {
      const slots = term.freeIndex.length;
      const channels = term.model.channelCount;
      const freeSlots: number[] = [];
      for (let j = 0; j < slots; j++) if (itemAt(term.freeIndex, j) >= 0) freeSlots.push(j);
      return {
        local: Float64Array.from(term.fixedValues),
        model: new Float64Array(channels),
        jacobian: new Float64Array(slots * channels),
        slope: new Float64Array(channels),
        weights: new Float64Array(channels),
        freeSlots: Int32Array.from(freeSlots),
        countsLog: countsLogCounts(term.counts),
        products: new Float64Array(freeSlots.length * freeSlots.length),
        slotGradient: new Float64Array(freeSlots.length),
      };
    });
  }

  /** Local parameter vector of dataset `index` for the free vector `parameters` (new array). */
  localParameters(index: number, parameters: Float64Array): Float64Array {
    const term = itemAt(this.terms, index);
    const local = Float64Array.from(term.fixedValues);
    for (let j = 0; j < local.length; j++) {
      const free = itemAt(term.freeIndex, j);
      if (free >= 0) local[j] = itemAt(parameters, free);
    }
    return local;
  }

  /** Expected counts of dataset `index` on its fit range for `parameters` (new array; reuses the last evaluation at the same parameters). */
  modelOf(index: number, parameters: Float64Array): Float64Array {
    this.ensureDerivatives(parameters);
    return Float64Array.from(itemAt(this.scratch, index).model);
  }

  evaluate(parameters: Float64Array, withDerivatives: boolean, normal: Float64Array, gradient: Float64Array): number {
    if (withDerivatives) {
      normal.fill(0);
      gradient.fill(0);
    }
    let total = 0;
    for (let d = 0; d < this.terms.length; d++) {
      const term = itemAt(this.terms, d);
      const scratch = itemAt(this.scratch, d);
      this.fillLocal(term, scratch.local, parameters);
      term.model.evaluate(scratch.local, withDerivatives, scratch.model, scratch.jacobian);
      if (belowPositivityFloor(term, scratch.local, scratch.model)) {
        total = Number.NaN;
        continue;
      }
      if (!withDerivatives) {
        total += estimatorObjective(this.estimator, term.counts, scratch.countsLog, scratch.model);
        continue;
      }
      // JᵀJ = Σ curvature·∂m∂mᵀ and Jᵀr = Σ slope·∂m without forming r; Σ r² as on the objective-only path.
      total += estimatorWeights(
        this.estimator,
        term.counts,
        scratch.countsLog,
        scratch.model,
        scratch.weights,
        scratch.slope,
      );
      weightedCrossProducts(
        scratch.jacobian,
        term.model.channelCount,
        scratch.freeSlots,
        scratch.weights,
        scratch.products,
        scratch.slope,
        scratch.slotGradient,
      );
      this.addBlock(term, scratch, normal, gradient);
    }
    this.derivativesCurrent = withDerivatives;
    if (withDerivatives) this.derivativesParameters.set(parameters);
    return Number.isFinite(total) ? total : Number.NaN;
  }

  /**
   * Fisher information of the free parameters, Σ w_k·(∂m_k/∂θ)(∂m_k/∂θ)ᵀ with w = 1/m (Poisson: ML and
   * Pearson) or 1/max(n, 1) (Neyman), at `parameters` (row-major p×p, new array).
   */
  information(parameters: Float64Array): Float64Array {
    const size = this.parameterCount;
    const information = new Float64Array(size * size);
    this.ensureDerivatives(parameters);
    for (let d = 0; d < this.terms.length; d++) {
      const term = itemAt(this.terms, d);
      const scratch = itemAt(this.scratch, d);
      const channels = term.model.channelCount;
      const weights = scratch.weights;
      for (let k = 0; k < channels; k++) {
        const n = itemAt(term.counts, k);
        weights[k] =
          this.estimator === 'lsq-neyman'
            ? 1 / Math.max(n, 1)
            : 1 / Math.max(itemAt(scratch.model, k), MODEL_FLOOR_COUNTS);
      }
      weightedCrossProducts(scratch.jacobian, channels, scratch.freeSlots, weights, scratch.products);
      this.addBlock(term, scratch, information, undefined);
    }
    return information;
  }

  /** Adds one dataset's cross products (upper triangle over its free slots) into the p×p matrix and its gradient into `gradient`. */
  private addBlock(
    term: DatasetTerm,
    scratch: DatasetScratch,
    matrix: Float64Array,
    gradient: Float64Array | undefined,
  ): void {
    const size = this.parameterCount;
    const { freeSlots, products, slotGradient } = scratch;
    const count = freeSlots.length;
    for (let a = 0; a < count; a++) {
      const freeA = itemAt(term.freeIndex, itemAt(freeSlots, a));
      if (gradient !== undefined) gradient[freeA] = itemAt(gradient, freeA) + itemAt(slotGradient, a);
      for (let b = a; b < count; b++) {
        const freeB = itemAt(term.freeIndex, itemAt(freeSlots, b));
        const value = itemAt(products, a * count + b);
        matrix[freeA * size + freeB] = itemAt(matrix, freeA * size + freeB) + value;
        if (a !== b) matrix[freeB * size + freeA] = itemAt(matrix, freeB * size + freeA) + value;
      }
    }
  }

  /** Brings every dataset's model and Jacobian to `parameters`, unless the last evaluation with derivatives was there. */
  private ensureDerivatives(parameters: Float64Array): void {
    if (this.derivativesCurrent && sameValues(this.derivativesParameters, parameters)) return;
    for (let d = 0; d < this.terms.length; d++) {
      const term = itemAt(this.terms, d);
      const scratch = itemAt(this.scratch, d);
      this.fillLocal(term, scratch.local, parameters);
      term.model.evaluate(scratch.local, true, scratch.model, scratch.jacobian);
    }
    this.derivativesParameters.set(parameters);
    this.derivativesCurrent = true;
  }

  private fillLocal(term: DatasetTerm, local: Float64Array, parameters: Float64Array): void {
    for (let j = 0; j < local.length; j++) {
      const free = itemAt(term.freeIndex, j);
      if (free >= 0) local[j] = itemAt(parameters, free);
    }
  }
}

/** True when the background is below 0 and the model falls below POSITIVITY_FLOOR_COUNTS in some channel (outside the likelihood's domain). */
function belowPositivityFloor(term: DatasetTerm, local: Float64Array, model: Float64Array): boolean {
  if (!(itemAt(local, term.backgroundSlot) < 0)) return false;
  for (let k = 0; k < model.length; k++) if (!(itemAt(model, k) >= POSITIVITY_FLOOR_COUNTS)) return true;
  return false;
}

/** True when both vectors hold the same numbers (bit-level equality of finite values). */
function sameValues(a: Float64Array, b: Float64Array): boolean {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return false;
  return true;
}
