// Weighted least-squares line through (t, ln y), the log-slope estimate used for lifetime start values
// (tail slope, exponential peeling): weights y ≈ 1/var(ln y) for Poisson counts (common practice).
import { itemAt } from '../model/item-at.js';

export interface LogLine {
  /** d ln(y)/dt in 1/ns. */
  readonly slopePerNs: number;
  /** ln(y) at t = 0. */
  readonly intercept: number;
}

/** Weighted least-squares line through (t in ns, ln y) with weights y; undefined with fewer than `minPoints` points or a degenerate axis. O(n). */
export function logLinearFit(
  timesNs: readonly number[],
  values: readonly number[],
  minPoints: number,
): LogLine | undefined {
  let sw = 0;
  let swt = 0;
  let swy = 0;
  let swtt = 0;
  let swty = 0;
  for (let i = 0; i < timesNs.length; i++) {
    const weight = itemAt(values, i);
    const t = itemAt(timesNs, i);
    const y = Math.log(weight);
    sw += weight;
    swt += weight * t;
    swy += weight * y;
    swtt += weight * t * t;
    swty += weight * t * y;
  }
  const denominator = sw * swtt - swt * swt;
  if (timesNs.length < minPoints || !(denominator > 0)) return undefined;
  const slopePerNs = (sw * swty - swt * swy) / denominator;
  return { slopePerNs, intercept: (swy - slopePerNs * swt) / sw };
}
