// Linear interpolation on a strictly ascending axis, with explicit coverage checks (never extrapolates).
import { InputRejected } from '../model/errors.js';

/** Index i with axis[i] ≤ x ≤ axis[i+1] by bisection (O(log n)); axis strictly ascending, x inside its range. */
export function bracketIndex(axis: ArrayLike<number>, x: number): number {
  let low = 0;
  let high = axis.length - 1;
  while (high - low > 1) {
    const middle = (low + high) >> 1;
    if ((axis[middle] as number) <= x) low = middle;
    else high = middle;
  }
  return low;
}

/** Linearly interpolated value at x, or undefined when x lies outside [axis[0], axis[n−1]] (no extrapolation). */
export function interpolateAt(axis: ArrayLike<number>, values: ArrayLike<number>, x: number): number | undefined {
  const first = axis[0] as number;
  const last = axis[axis.length - 1] as number;
  if (!(x >= first && x <= last)) return undefined;
  if (x === last) return values[axis.length - 1] as number;
  const i = bracketIndex(axis, x);
  const x0 = axis[i] as number;
  const x1 = axis[i + 1] as number;
  const t = (x - x0) / (x1 - x0);
  return (values[i] as number) * (1 - t) + (values[i + 1] as number) * t;
}

/** True when every point of `target` lies within the range of `source` (both ascending). */
export function axisCovers(source: ArrayLike<number>, target: ArrayLike<number>): boolean {
  return (
    (target[0] as number) >= (source[0] as number) &&
    (target[target.length - 1] as number) <= (source[source.length - 1] as number)
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
    out[i] = interpolateAt(sourceAxis, sourceValues, targetAxis[i] as number) as number;
  }
  return out;
}
