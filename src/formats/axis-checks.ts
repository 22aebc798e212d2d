// Axis checks on the numbers as they appear in the file, so errors name the file line:
// monotonic (either direction), no repeated value, equal spacing for decay histograms.
import { reject } from './reject.js';
import { itemAt } from '../model/item-at.js';

/** +1 for an ascending axis, −1 for descending; throws AXIS_DUPLICATE or AXIS_NOT_ASCENDING (with the line) otherwise. */
export function checkMonotonic(
  axis: Float64Array,
  lineOfRow: (row: number) => number | undefined,
  file: string,
  what: string,
): 1 | -1 {
  if (axis.length < 2) return 1;
  const direction = itemAt(axis, 1) > itemAt(axis, 0) ? 1 : -1;
  for (let i = 1; i < axis.length; i++) {
    const previous = itemAt(axis, i - 1);
    const current = itemAt(axis, i);
    if (current === previous) {
      reject('AXIS_DUPLICATE', `the ${what} repeats the value ${current} (rows ${i} and ${i + 1})`, file, lineOfRow(i));
    }
    if ((current - previous) * direction < 0) {
      reject('AXIS_NOT_ASCENDING', `the ${what} turns back: ${previous} is followed by ${current}`, file, lineOfRow(i));
    }
  }
  return direction;
}

/** Relative tolerance on channel spacing, the same as the model's (src/model/decay.ts). */
const UNIFORM_TOLERANCE = 1e-3;

/** Throws AXIS_NOT_UNIFORM (with the line) when the time axis is not equally spaced. */
export function checkUniform(axis: Float64Array, lineOfRow: (row: number) => number | undefined, file: string): void {
  const n = axis.length;
  if (n < 3) return;
  const mean = (itemAt(axis, n - 1) - itemAt(axis, 0)) / (n - 1);
  for (let i = 1; i < n; i++) {
    const width = itemAt(axis, i) - itemAt(axis, i - 1);
    if (Math.abs(width - mean) > UNIFORM_TOLERANCE * Math.abs(mean)) {
      reject(
        'AXIS_NOT_UNIFORM',
        `the channel ending here is ${width} wide but the mean width is ${mean}`,
        file,
        lineOfRow(i),
      );
    }
  }
}

/** Throws NEGATIVE_COUNTS (with the line) at the first negative value. */
export function checkNonNegative(
  values: Float64Array,
  lineOfRow: (row: number) => number | undefined,
  file: string,
  what: string,
): void {
  for (let i = 0; i < values.length; i++) {
    if (itemAt(values, i) < 0) {
      reject('NEGATIVE_COUNTS', `the ${what} column holds the negative count ${itemAt(values, i)}`, file, lineOfRow(i));
    }
  }
}

/** A reversed copy of an array. */
export function reversed(values: Float64Array): Float64Array {
  const copy = new Float64Array(values.length);
  for (let i = 0, j = values.length - 1; j >= 0; i++, j--) copy[i] = itemAt(values, j);
  return copy;
}
