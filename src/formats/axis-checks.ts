// Axis checks on the numbers as they appear in the file, so errors name the file line:
// monotonic (either direction), no repeated value, equal spacing for decay histograms.
import { reject } from './reject.js';

/** +1 for an ascending axis, −1 for descending; throws AXIS_DUPLICATE or AXIS_NOT_ASCENDING (with the line) otherwise. */
export function checkMonotonic(
  axis: Float64Array,
  lineOfRow: (row: number) => number | undefined,
  file: string,
  what: string,
): 1 | -1 {
  if (axis.length < 2) return 1;
  const direction = (axis[1] as number) > (axis[0] as number) ? 1 : -1;
  for (let i = 1; i < axis.length; i++) {
    const previous = axis[i - 1] as number;
    const current = axis[i] as number;
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
  const mean = ((axis[n - 1] as number) - (axis[0] as number)) / (n - 1);
  for (let i = 1; i < n; i++) {
    const width = (axis[i] as number) - (axis[i - 1] as number);
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
    if ((values[i] as number) < 0) {
      reject(
        'NEGATIVE_COUNTS',
        `the ${what} column holds the negative count ${values[i] as number}`,
        file,
        lineOfRow(i),
      );
    }
  }
}

/** A reversed copy of an array. */
export function reversed(values: Float64Array): Float64Array {
  const copy = new Float64Array(values.length);
  for (let i = 0, j = values.length - 1; j >= 0; i++, j--) copy[i] = values[j] as number;
  return copy;
}
