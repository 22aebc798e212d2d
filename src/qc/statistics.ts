// Small descriptive statistics used by baselines and rule kinds (mean, sample SD, median, quantile).
import { itemAt } from '../model/item-at.js';
export { medianOf } from '../model/median.js';

/** Arithmetic mean; NaN-free input assumed, throws RangeError on an empty list. O(n). */
export function meanOf(values: readonly number[]): number {
  if (values.length === 0) throw new RangeError('meanOf needs at least one value');
  let sum = 0;
  for (const value of values) sum += value;
  return sum / values.length;
}

/** Sample standard deviation (n − 1 denominator); throws RangeError below two values. O(n). */
export function sampleStandardDeviation(values: readonly number[]): number {
  if (values.length < 2) throw new RangeError('sampleStandardDeviation needs at least two values');
  const mean = meanOf(values);
  let sumOfSquares = 0;
  for (const value of values) sumOfSquares += (value - mean) ** 2;
  return Math.sqrt(sumOfSquares / (values.length - 1));
}

/** The q-quantile (0 ≤ q ≤ 1) by linear interpolation between order statistics (R type 7). O(n log n). */
export function quantileOf(values: readonly number[], q: number): number {
  if (values.length === 0) throw new RangeError('quantileOf needs at least one value');
  const sorted = [...values].sort((a, b) => a - b);
  const position = (sorted.length - 1) * q;
  const below = Math.floor(position);
  const above = Math.min(below + 1, sorted.length - 1);
  const lower = itemAt(sorted, below);
  return lower + (itemAt(sorted, above) - lower) * (position - below);
}
