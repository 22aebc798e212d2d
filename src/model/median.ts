// The one median of the code base (spectral noise estimates, QC rolling references).

/** Median (mean of the two middle values for an even count) of a sorted copy; throws RangeError when empty. O(n log n). */
export function medianOf(values: readonly number[]): number {
  if (values.length === 0) throw new RangeError('medianOf needs at least one value');
  const sorted = [...values].sort((a, b) => a - b);
  const middle = Math.floor(sorted.length / 2);
  const upper = sorted[middle] as number;
  return sorted.length % 2 === 1 ? upper : ((sorted[middle - 1] as number) + upper) / 2;
}
