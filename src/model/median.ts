// The one median of the code base (spectral noise estimates, QC rolling references).
import { itemAt } from './item-at.js';

/** Median (mean of the two middle values for an even count) of a sorted copy; throws RangeError when empty. O(n log n). */
export function medianOf(values: readonly number[]): number {
  if (values.length === 0) throw new RangeError('medianOf needs at least one value');
  const sorted = [...values].sort((a, b) => a - b);
  const middle = Math.floor(sorted.length / 2);
  const upper = itemAt(sorted, middle);
  return sorted.length % 2 === 1 ? upper : (itemAt(sorted, middle - 1) + upper) / 2;
}
