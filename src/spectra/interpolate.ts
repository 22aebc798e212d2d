// Linear interpolation on a strictly ascending axis, with explicit coverage checks (never extrapolates).
import { DriftlightError, InputRejected } from '../model/errors.js';
import { itemAt } from '../model/item-at.js';

/** Index i with axis[i] ≤ x ≤ axis[i+1] by bisection (O(log n)); axis strictly ascending, x inside its range. */
export function bracketIndex(axis: ArrayLike<number>, x: number): number {
  let low = 0;
  let high = axis.length - 1;
  while (high - low > 1) {
    const middle = (low + high) >> 1;
    if (itemAt(axis, middle) <= x) low = middle;
    else high = middle;
  }
  return low;
}

/** Linearly interpolated value at x, or undefined when x lies outside [axis[0], axis[n−1]] (no extrapolation). */
export function interpolateAt(axis: ArrayLike<number>, values: ArrayLike<number>, x: number): number | undefined {
  const first = itemAt(axis, 0);
  const last = itemAt(axis, axis.length - 1);
  if (!(x >= first && x <= last)) return undefined;
  if (x === last) return itemAt(values, axis.length - 1);
  const i = bracketIndex(axis, x);
  const x0 = itemAt(axis, i);
  const x1 = itemAt(axis, i + 1);
  const t = (x - x0) / (x1 - x0);
  return itemAt(values, i) * (1 - t) + itemAt(values, i + 1) * t;
}

/** True when every point of `target` lies within the range of `source` (both ascending). */
export function axisCovers(source: ArrayLike<number>, target: ArrayLike<number>): boolean {
  return (
    itemAt(target, 0) >= itemAt(source, 0) && itemAt(target, target.length - 1) <= itemAt(source, source.length - 1)
  );
}

/** Values of (sourceAxis, sourceValues) linearly interpolated onto `targetAxis`; throws InputRejected AXIS_NOT_COVERED naming `what` if it would extrapolate. */
export function resampleOnto(
  sourceAxis: ArrayLike<number>,
  sourceValues: ArrayLike<number>,
  targetAxis: ArrayLike<number>,
  what: string,
): Float64Array {
  if (!axisCovers(sourceAxis, targetAxis)) {
    throw new InputRejected(
      'AXIS_NOT_COVERED',
      `${what} covers ${sourceAxis[0]}–${sourceAxis[sourceAxis.length - 1]} nm but the spectrum spans ` +
        `${targetAxis[0]}–${targetAxis[targetAxis.length - 1]} nm; driftlight does not extrapolate`,
    );
  }
  const out = new Float64Array(targetAxis.length);
  for (let i = 0; i < targetAxis.length; i++) {
    const value = interpolateAt(sourceAxis, sourceValues, itemAt(targetAxis, i));
    // The coverage check above keeps every target inside the source axis.
    if (value === undefined)
      throw new DriftlightError('INTERNAL', `${what}: target ${itemAt(targetAxis, i)} nm fell outside`);
    out[i] = value;
  }
  return out;
}
