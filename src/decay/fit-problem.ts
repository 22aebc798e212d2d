// The objective of one fit: one or more decays (datasets), each with its own model and counts, whose
// local parameters map onto one shared vector of free parameters (links) or onto fixed values.
// Accumulates JᵀJ and Jᵀr block by block, so linked (global) fits cost no more than separate ones.
import type { DatasetModel } from './dataset-model.js';
import { countsLogCounts, estimatorObjective, estimatorWeights, MODEL_FLOOR_COUNTS, type Estimator } from './estimators.js';
import type { SumOfSquaresObjective } from './levenberg-marquardt.js';

export interface DatasetTerm {
  readonly model: DatasetModel;
  /** Counts on the fit range (same length as model.channelCount). */
  readonly counts: Float64Array;
  /** Per local slot: index of its free parameter, or −1 when fixed. */
  readonly freeIndex: Int32Array;
  /** Per local slot: the value used when the slot is fixed. */
  readonly fixedValues: Float64Array;
}

interface DatasetScratch {
  readonly local: Float64Array;
  readonly model: Float64Array;
  readonly jacobian: Float64Array;
  readonly residuals: Float64Array;
  readonly residualPerModel: Float64Array;
  readonly freeSlots: Int32Array;
  readonly countsLog: Float64Array;
  readonly weighted: Float64Array;
}

/** Σ r² over all datasets for an estimator, with the block-accumulated normal matrix; allocation happens once here. */
export class FitProblem implements SumOfSquaresObjective {
  readonly parameterCount: number;
  readonly terms: readonly DatasetTerm[];
  readonly estimator: Estimator;
  private readonly scratch: DatasetScratch[];

  constructor(terms: readonly DatasetTerm[], estimator: Estimator, parameterCount: number) {
    this.terms = terms;
    this.estimator = estimator;
    this.parameterCount = parameterCount;
    this.scratch = terms.map((term) => {
      const slots = term.freeIndex.length;
      const channels = term.model.channelCount;
      const freeSlots: number[] = [];
      for (let j = 0; j < slots; j++) if ((term.freeIndex[j] as number) >= 0) freeSlots.push(j);
      return {
        local: Float64Array.from(term.fixedValues),
        model: new Float64Array(channels),
        jacobian: new Float64Array(slots * channels),
        residuals: new Float64Array(channels),
        residualPerModel: new Float64Array(channels),
        freeSlots: Int32Array.from(freeSlots),
        countsLog: countsLogCounts(term.counts),
        weighted: new Float64Array(channels),
      };
    });
  }

  /** Local parameter vector of dataset `index` for the free vector `parameters` (new array). */
  localParameters(index: number, parameters: Float64Array): Float64Array {
    const term = this.terms[index] as DatasetTerm;
    const local = Float64Array.from(term.fixedValues);
    for (let j = 0; j < local.length; j++) {
      const free = term.freeIndex[j] as number;
      if (free >= 0) local[j] = parameters[free] as number;
    }
    return local;
  }

  /** Expected counts of dataset `index` on its fit range for `parameters` (new array). */
  modelOf(index: number, parameters: Float64Array): Float64Array {
    const term = this.terms[index] as DatasetTerm;
    const scratch = this.scratch[index] as DatasetScratch;
    const model = new Float64Array(term.model.channelCount);
    term.model.evaluate(this.localParameters(index, parameters), false, model, scratch.jacobian);
    return model;
  }

  evaluate(parameters: Float64Array, withDerivatives: boolean, normal: Float64Array, gradient: Float64Array): number {
    const size = this.parameterCount;
    if (withDerivatives) {
      normal.fill(0);
      gradient.fill(0);
    }
    let total = 0;
    for (let d = 0; d < this.terms.length; d++) {
      const term = this.terms[d] as DatasetTerm;
      const scratch = this.scratch[d] as DatasetScratch;
      this.fillLocal(term, scratch.local, parameters);
      term.model.evaluate(scratch.local, withDerivatives, scratch.model, scratch.jacobian);
      if (!withDerivatives) {
        total += estimatorObjective(this.estimator, term.counts, scratch.countsLog, scratch.model);
        continue;
      }
      // residuals ← slope (r·dr/dm), residualPerModel ← curvature ((dr/dm)²): JᵀJ and Jᵀr without forming r.
      total += estimatorWeights(this.estimator, term.counts, scratch.countsLog, scratch.model, scratch.residualPerModel, scratch.residuals);
      const channels = term.model.channelCount;
      const { jacobian, residuals: slope, residualPerModel: curvature, weighted, freeSlots } = scratch;
      const count = freeSlots.length;
      for (let a = 0; a < count; a++) {
        const slotA = freeSlots[a] as number;
        const freeA = term.freeIndex[slotA] as number;
        const offsetA = slotA * channels;
        let dotSlope = 0;
        for (let k = 0; k < channels; k++) {
          const valueA = jacobian[offsetA + k] as number;
          dotSlope += valueA * (slope[k] as number);
          weighted[k] = valueA * (curvature[k] as number);
        }
        gradient[freeA] = (gradient[freeA] as number) + dotSlope;
        // Three dot products per pass over the weighted column a.
        for (let b = a; b < count; b += 3) {
          const offsetB0 = (freeSlots[b] as number) * channels;
          const hasB1 = b + 1 < count;
          const hasB2 = b + 2 < count;
          const offsetB1 = hasB1 ? (freeSlots[b + 1] as number) * channels : offsetB0;
          const offsetB2 = hasB2 ? (freeSlots[b + 2] as number) * channels : offsetB0;
          let dot0 = 0;
          let dot1 = 0;
          let dot2 = 0;
          for (let k = 0; k < channels; k++) {
            const valueA = weighted[k] as number;
            dot0 += valueA * (jacobian[offsetB0 + k] as number);
            dot1 += valueA * (jacobian[offsetB1 + k] as number);
            dot2 += valueA * (jacobian[offsetB2 + k] as number);
          }
          this.accumulate(normal, size, freeA, term.freeIndex[freeSlots[b] as number] as number, dot0, a === b);
          if (hasB1) this.accumulate(normal, size, freeA, term.freeIndex[freeSlots[b + 1] as number] as number, dot1, false);
          if (hasB2) this.accumulate(normal, size, freeA, term.freeIndex[freeSlots[b + 2] as number] as number, dot2, false);
        }
      }
    }
    return Number.isFinite(total) ? total : Number.NaN;
  }

  /**
   * Fisher information of the free parameters, Σ w_k·(∂m_k/∂θ)(∂m_k/∂θ)ᵀ with w = 1/m (Poisson: ML and
   * Pearson) or 1/max(n, 1) (Neyman), at `parameters` (row-major p×p, new array).
   */
  information(parameters: Float64Array): Float64Array {
    const size = this.parameterCount;
    const information = new Float64Array(size * size);
    for (let d = 0; d < this.terms.length; d++) {
      const term = this.terms[d] as DatasetTerm;
      const scratch = this.scratch[d] as DatasetScratch;
      this.fillLocal(term, scratch.local, parameters);
      term.model.evaluate(scratch.local, true, scratch.model, scratch.jacobian);
      const channels = term.model.channelCount;
      const weights = scratch.residualPerModel;
      for (let k = 0; k < channels; k++) {
        const n = term.counts[k] as number;
        weights[k] = this.estimator === 'lsq-neyman' ? 1 / Math.max(n, 1) : 1 / Math.max(scratch.model[k] as number, MODEL_FLOOR_COUNTS);
      }
      const { jacobian, freeSlots } = scratch;
      for (let a = 0; a < freeSlots.length; a++) {
        const slotA = freeSlots[a] as number;
        const freeA = term.freeIndex[slotA] as number;
        for (let b = a; b < freeSlots.length; b++) {
          const slotB = freeSlots[b] as number;
          const freeB = term.freeIndex[slotB] as number;
          let dot = 0;
          for (let k = 0; k < channels; k++) {
            dot += (jacobian[slotA * channels + k] as number) * (jacobian[slotB * channels + k] as number) * (weights[k] as number);
          }
          information[freeA * size + freeB] = (information[freeA * size + freeB] as number) + dot;
          if (freeA !== freeB || a !== b) information[freeB * size + freeA] = (information[freeB * size + freeA] as number) + dot;
        }
      }
    }
    return information;
  }

  /** Adds a JᵀJ entry for free parameters (i, j) and its mirror (once on the diagonal of the same slot). */
  private accumulate(normal: Float64Array, size: number, freeA: number, freeB: number, dot: number, sameSlot: boolean): void {
    normal[freeA * size + freeB] = (normal[freeA * size + freeB] as number) + dot;
    if (freeA !== freeB || !sameSlot) normal[freeB * size + freeA] = (normal[freeB * size + freeA] as number) + dot;
  }

  private fillLocal(term: DatasetTerm, local: Float64Array, parameters: Float64Array): void {
    for (let j = 0; j < local.length; j++) {
      const free = term.freeIndex[j] as number;
      if (free >= 0) local[j] = parameters[free] as number;
    }
  }
}
