// Trapezoidal integration on a non-uniform ascending axis, optionally over a window with interpolated edges.
import { InputRejected } from '../model/errors.js';
import { itemAt } from '../model/item-at.js';

/** Trapezoid weights w such that ∫y dx ≈ Σ w_i·y_i over [from, to] (edges linearly interpolated); used for integrals and their noise. */
export function trapezoidWeights(axis: ArrayLike<number>, from: number, to: number): Float64Array {
  const n = axis.length;
  const weights = new Float64Array(n);
  for (let i = 0; i < n - 1; i++) {
    const x0 = itemAt(axis, i);
    const x1 = itemAt(axis, i + 1);
    const a = Math.max(x0, from);
    const b = Math.min(x1, to);
    if (b <= a) continue;
    // ∫_a^b of the linear interpolant = Σ over the two end values of their hat-function integrals.
    const h = x1 - x0;
    const ta = (a - x0) / h;
    const tb = (b - x0) / h;
    const width = b - a;
    const meanT = (ta + tb) / 2;
    weights[i] = itemAt(weights, i) + width * (1 - meanT);
    weights[i + 1] = itemAt(weights, i + 1) + width * meanT;
  }
  return weights;
}

/** ∫ y dx by the trapezoid rule on a non-uniform ascending axis, over [from, to] (default the whole axis); throws if the window is outside the axis. */
export function trapezoid(axis: ArrayLike<number>, values: ArrayLike<number>, from?: number, to?: number): number {
  const first = itemAt(axis, 0);
  const last = itemAt(axis, axis.length - 1);
  const lower = from ?? first;
  const upper = to ?? last;
  if (!(lower < upper) || lower < first || upper > last) {
    throw new InputRejected(
      'AXIS_NOT_COVERED',
      `the integration window ${lower}–${upper} is empty or outside the axis ${first}–${last}`,
    );
  }
  const weights = trapezoidWeights(axis, lower, upper);
  let sum = 0;
  for (let i = 0; i < weights.length; i++) sum += itemAt(weights, i) * itemAt(values, i);
  return sum;
}
