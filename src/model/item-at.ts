// Checked element access at a computed index. With noUncheckedIndexedAccess an indexed read is `T | undefined`;
// where the index is in range by construction (loop bounds, matrix shapes), a read outside the array is a bug,
// reported here with the index and length rather than carried on as undefined (NaN in arithmetic).
import { DriftlightError } from './errors.js';

/** The element of `values` at `index`; throws DriftlightError INTERNAL when `index` is outside 0…length−1 (no published method: a bounds check). */
export function itemAt<T extends NonNullable<unknown> | null>(values: ArrayLike<T>, index: number): T {
  const value = values[index];
  if (value === undefined) {
    throw new DriftlightError('INTERNAL', `index ${index} is outside an array of length ${values.length}`);
  }
  return value;
}
