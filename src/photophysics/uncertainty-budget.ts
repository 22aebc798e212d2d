// First-order (GUM) uncertainty propagation for a product-form measurement model, as a budget table.
import { itemAt } from '../model/item-at.js';

export interface BudgetInput {
  /** Name of the input quantity with its unit, e.g. 'sampleAbsorbance'. */
  readonly quantity: string;
  readonly value: number;
  readonly standardUncertainty: number;
  /** ∂y/∂x_i at the input values. */
  readonly sensitivityCoefficient: number;
  /** Where u(x_i) came from (stated, noise estimate, table, practice default). */
  readonly basis: string;
}

export interface BudgetLine extends BudgetInput {
  /** |c_i|·u(x_i), in the unit of the output. */
  readonly contribution: number;
  /** Fraction of the combined variance, (c_i·u_i)² / u_c². */
  readonly varianceShare: number;
}

export interface UncertaintyBudget {
  readonly lines: readonly BudgetLine[];
  /** u_c = √Σ(c_i·u_i)² (uncorrelated inputs; JCGM 100:2008 eq. 10). */
  readonly combinedStandardUncertainty: number;
  /** quantity of the largest contribution. */
  readonly dominantContribution: string;
}

/** Combines uncorrelated inputs: u_c² = Σ (c_i u_i)² (JCGM 100:2008, eq. 10); O(n). */
export function combineUncertainty(inputs: readonly BudgetInput[]): UncertaintyBudget {
  const contributions = inputs.map((input) => Math.abs(input.sensitivityCoefficient) * input.standardUncertainty);
  const variance = contributions.reduce((sum, c) => sum + c * c, 0);
  const lines = inputs.map((input, i) => {
    const contribution = itemAt(contributions, i);
    return Object.freeze({
      ...input,
      contribution,
      varianceShare: variance > 0 ? (contribution * contribution) / variance : 0,
    });
  });
  let dominant = lines[0];
  for (const line of lines) if (dominant === undefined || line.contribution > dominant.contribution) dominant = line;
  return Object.freeze({
    lines: Object.freeze(lines),
    combinedStandardUncertainty: Math.sqrt(variance),
    dominantContribution: dominant?.quantity ?? 'none',
  });
}
