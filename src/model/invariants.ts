// Shared invariant checks for the data model; each throws InputRejected with the offending index.
import { InputRejected } from './errors.js';
import { itemAt } from './item-at.js';

/** Throws NON_FINITE when any element is NaN or ±Infinity. */
export function assertAllFinite(values: ArrayLike<number>, what: string): void {
  for (let i = 0; i < values.length; i++) {
    const value = itemAt(values, i);
    if (!Number.isFinite(value)) {
      throw new InputRejected('NON_FINITE', `${what} has a non-finite value (${value}) at point ${i + 1}`);
    }
  }
}

/** Throws AXIS_DUPLICATE or AXIS_NOT_ASCENDING unless the axis is strictly ascending. */
export function assertStrictlyAscending(axis: ArrayLike<number>, what: string): void {
  for (let i = 1; i < axis.length; i++) {
    const previous = itemAt(axis, i - 1);
    const current = itemAt(axis, i);
    if (current === previous) {
      throw new InputRejected('AXIS_DUPLICATE', `${what} repeats the value ${current} at points ${i} and ${i + 1}`);
    }
    if (current < previous) {
      throw new InputRejected(
        'AXIS_NOT_ASCENDING',
        `${what} is not monotonic: ${previous} is followed by ${current} at point ${i + 1}`,
      );
    }
  }
}

/** Throws NEGATIVE_COUNTS when a photon-count element is below zero. */
export function assertNonNegative(values: ArrayLike<number>, what: string): void {
  for (let i = 0; i < values.length; i++) {
    const value = itemAt(values, i);
    if (value < 0) {
      throw new InputRejected('NEGATIVE_COUNTS', `${what} has a negative value (${value}) at channel ${i + 1}`);
    }
  }
}
