// Profile (support-plane) confidence interval of one parameter: the values v where the objective
// minimised over every other parameter, P(v), rises by Δ above its minimum (Δ = χ²₁ quantile: 1 for
// 68.27 %, 3.84 for 95 %). The root on each side is bracketed by expanding steps, then refined by
// regula falsi on √(P − P_min), which is close to linear in v (Bates & Watts, Nonlinear Regression
// Analysis and Its Applications, Wiley 1988, ch. 6).
import { minimiseLevenbergMarquardt, type SumOfSquaresObjective } from './levenberg-marquardt.js';
import { itemAt } from '../model/item-at.js';

export interface ProfileSide {
  /** The interval end, or undefined when a bound or a failed refit came first. */
  readonly value: number | undefined;
  /** Why the end is missing. */
  readonly reason?: string;
}

/**
 * Low and high ends of the profile interval of parameter `index`; each side costs ~5–10 warm-started refits.
 * A refit that does not converge from the warm start is retried from the best fit with twice the
 * iterations; a missing end carries its reason.
 */
export function profileInterval(
  objective: SumOfSquaresObjective,
  best: Float64Array,
  bestObjective: number,
  index: number,
  lower: Float64Array,
  upper: Float64Array,
  standardError: number,
  deltaObjective: number,
  maxIterations: number,
): { low: number | undefined; high: number | undefined; lowReason?: string; highReason?: string } {
  const side = (direction: 1 | -1): ProfileSide => {
    let failedAt: number | undefined;
    const value = sideValue(direction, (at) => (failedAt = at));
    if (value !== undefined) return { value };
    const limit = direction > 0 ? itemAt(upper, index) : itemAt(lower, index);
    if (failedAt !== undefined)
      return { value, reason: `the refit with the lifetime held at ${failedAt.toPrecision(4)} did not converge` };
    return {
      value,
      reason: `the objective rises by less than ${deltaObjective.toPrecision(3)} between the fit and the bound ${limit.toPrecision(4)} (or 12 widening steps): the interval is open on this side`,
    };
  };
  const sideValue = (direction: 1 | -1, onFailure: (at: number) => void): number | undefined => {
    const centre = itemAt(best, index);
    const target = Math.sqrt(deltaObjective);
    let warm = Float64Array.from(best);
    const rise = (value: number): number | undefined => {
      const low = Float64Array.from(lower);
      const high = Float64Array.from(upper);
      low[index] = value;
      high[index] = value;
      const start = Float64Array.from(warm);
      start[index] = value;
      let outcome = minimiseLevenbergMarquardt(objective, start, low, high, maxIterations);
      if (!outcome.converged) {
        const cold = Float64Array.from(best);
        cold[index] = value;
        outcome = minimiseLevenbergMarquardt(objective, cold, low, high, 2 * maxIterations);
      }
      if (!outcome.converged) {
        onFailure(value);
        return undefined;
      }
      warm = Float64Array.from(outcome.parameters);
      return Math.sqrt(Math.max(outcome.objective - bestObjective, 0));
    };
    const limit = direction > 0 ? itemAt(upper, index) : itemAt(lower, index);
    let step = Math.max(standardError, 1e-9 * Math.max(Math.abs(centre), 1)) * target;
    let inside = centre;
    let insideRise = 0;
    let outside: number | undefined;
    let outsideRise = 0;
    for (let expansion = 0; expansion < 12; expansion++) {
      let value = centre + direction * step;
      if ((direction > 0 && value >= limit) || (direction < 0 && value <= limit)) value = limit;
      const measured = rise(value);
      if (measured === undefined) return undefined;
      if (measured >= target) {
        outside = value;
        outsideRise = measured;
        break;
      }
      inside = value;
      insideRise = measured;
      if (value === limit) return undefined;
      step *= measured > 0 ? Math.min(4, Math.max(1.5, (1.2 * target) / measured)) : 4;
    }
    if (outside === undefined) return undefined;
    let outer: number = outside;
    let keepSide = 0;
    for (let iteration = 0; iteration < 20; iteration++) {
      const fraction = (target - insideRise) / (outsideRise - insideRise);
      const value: number = inside + fraction * (outer - inside);
      const measured = rise(value);
      if (measured === undefined) return undefined;
      if (Math.abs(measured - target) < 1e-3 * target) return value;
      if (measured < target) {
        inside = value;
        insideRise = measured;
        if (keepSide === -1) outsideRise = target + (outsideRise - target) / 2;
        keepSide = -1;
      } else {
        outer = value;
        outsideRise = measured;
        if (keepSide === 1) insideRise = target - (target - insideRise) / 2;
        keepSide = 1;
      }
    }
    return 0.5 * (inside + outer);
  };
  const low = side(-1);
  const high = side(1);
  return {
    low: low.value,
    high: high.value,
    ...(low.reason === undefined ? {} : { lowReason: low.reason }),
    ...(high.reason === undefined ? {} : { highReason: high.reason }),
  };
}
