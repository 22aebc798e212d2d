// Levenberg–Marquardt minimisation of Σ r² with box bounds (projected steps, active set), written for
// the decay fits: Marquardt scaling of the damping (Marquardt, J. SIAM 11, 431 (1963)), gain-ratio
// damping update (Nielsen, IMM-REP-1999-05), and a convergence test on the Newton decrement gᵀA⁻¹g,
// the decrease of Σ r² a full Gauss–Newton step would still give (Σ r² is a deviance or χ², so a
// decrement ≪ 1 means the parameters are within a tiny fraction of a standard error of the minimum).
import { choleskyInPlace, choleskySolveInPlace } from './linear-algebra.js';
import { itemAt } from '../model/item-at.js';

/**
 * A sum-of-squares objective: returns Σ r² and, when asked, the normal matrix JᵀJ (row-major p×p) and
 * gradient Jᵀr. Σ r² must not depend on `withDerivatives` (bit for bit): the loop compares values from both.
 */
export interface SumOfSquaresObjective {
  readonly parameterCount: number;
  evaluate(parameters: Float64Array, withDerivatives: boolean, normal: Float64Array, gradient: Float64Array): number;
}

export interface MinimiserStatus {
  /** True only when the convergence test passed with finite values. */
  readonly converged: boolean;
  /** Number of Jacobian evaluations (outer iterations). */
  readonly iterations: number;
  /** Why the loop stopped, in words. */
  readonly reason: string;
}

export interface MinimiserOutcome extends MinimiserStatus {
  readonly parameters: Float64Array;
  /** Σ r² at `parameters`. */
  readonly objective: number;
}

/** Newton decrement below which the fit counts as converged (Σ r² units, i.e. deviance or χ²). */
export const DECREMENT_TOLERANCE = 1e-7;

/** Minimises Σ r² by Levenberg–Marquardt within [lower, upper] (lower = upper fixes a parameter); never reports success on NaN or at the cap. */
export function minimiseLevenbergMarquardt(
  objective: SumOfSquaresObjective,
  start: Float64Array,
  lower: Float64Array,
  upper: Float64Array,
  maxIterations: number,
): MinimiserOutcome {
  const size = objective.parameterCount;
  const parameters = new Float64Array(size);
  for (let i = 0; i < size; i++) parameters[i] = clamp(itemAt(start, i), itemAt(lower, i), itemAt(upper, i));
  const normal = new Float64Array(size * size);
  const gradient = new Float64Array(size);
  const damped = new Float64Array(size * size);
  const step = new Float64Array(size);
  const trial = new Float64Array(size);
  const active = new Uint8Array(size);
  const trialNormal = new Float64Array(size * size);
  const trialGradient = new Float64Array(size);
  const scaledGradient = new Float64Array(size);
  let value = objective.evaluate(parameters, true, normal, gradient);
  const finish = (converged: boolean, iterations: number, reason: string): MinimiserOutcome => ({
    converged,
    iterations,
    reason,
    parameters,
    objective: value,
  });
  if (!Number.isFinite(value) || !allFinite(gradient) || !allFinite(normal)) {
    return finish(false, 0, 'the model is not finite at the start values');
  }
  let lambda = 1e-3;
  let growth = 2;
  for (let iteration = 0; iteration <= maxIterations; iteration++) {
    markActive(parameters, gradient, lower, upper, active);
    const decrement = newtonDecrement(normal, gradient, active, size, damped, step, scaledGradient);
    if (decrement !== undefined && decrement < DECREMENT_TOLERANCE) {
      return finish(
        true,
        iteration,
        `converged: Newton decrement ${decrement.toExponential(1)} < ${DECREMENT_TOLERANCE}`,
      );
    }
    if (iteration === maxIterations) break;
    // The first trial of an iteration also computes JᵀJ and Jᵀr (usually it is accepted, and they are the
    // next iteration's); retries after a rejection compute Σ r² only.
    let trialWithDerivatives = true;
    let acceptedWithDerivatives: boolean;
    for (;;) {
      buildDamped(normal, active, lambda, size, damped);
      for (let i = 0; i < size; i++) step[i] = active[i] === 1 ? 0 : -itemAt(gradient, i);
      if (choleskyInPlace(damped, size)) {
        choleskySolveInPlace(damped, size, step);
        for (let i = 0; i < size; i++) {
          trial[i] = clamp(itemAt(parameters, i) + itemAt(step, i), itemAt(lower, i), itemAt(upper, i));
          step[i] = itemAt(trial, i) - itemAt(parameters, i);
        }
        const predicted = predictedDecrease(normal, gradient, step, size);
        const trialValue = objective.evaluate(trial, trialWithDerivatives, trialNormal, trialGradient);
        if (Number.isFinite(trialValue) && trialValue < value) {
          const gain = predicted > 0 ? (value - trialValue) / predicted : 0;
          lambda *= Math.max(1 / 3, 1 - Math.pow(2 * gain - 1, 3));
          growth = 2;
          parameters.set(trial);
          value = trialValue;
          acceptedWithDerivatives = trialWithDerivatives;
          break;
        }
        trialWithDerivatives = false;
        if (Number.isFinite(trialValue) && trialValue === value && decrement !== undefined && decrement < 1e-4) {
          return finish(
            true,
            iteration + 1,
            `converged: no further decrease (Newton decrement ${decrement.toExponential(1)})`,
          );
        }
      }
      lambda *= growth;
      growth *= 2;
      if (lambda > 1e16) {
        if (decrement !== undefined && decrement < 1e-4) {
          return finish(
            true,
            iteration + 1,
            `converged: no further decrease (Newton decrement ${decrement.toExponential(1)})`,
          );
        }
        return finish(
          false,
          iteration + 1,
          'stalled: no step lowers the objective (check start values, range and bounds)',
        );
      }
    }
    if (acceptedWithDerivatives) {
      normal.set(trialNormal);
      gradient.set(trialGradient);
    } else {
      objective.evaluate(parameters, true, normal, gradient);
    }
    if (!allFinite(gradient) || !allFinite(normal)) {
      return finish(false, iteration + 1, 'the model became non-finite during the fit');
    }
  }
  return finish(false, maxIterations, `iteration limit ${maxIterations} reached before convergence`);
}

function clamp(value: number, low: number, high: number): number {
  return value < low ? low : value > high ? high : value;
}

function allFinite(values: Float64Array): boolean {
  for (let i = 0; i < values.length; i++) if (!Number.isFinite(itemAt(values, i))) return false;
  return true;
}

/** A parameter is held this iteration when fixed (lower = upper) or on a bound with the gradient pushing outward. */
function markActive(
  parameters: Float64Array,
  gradient: Float64Array,
  lower: Float64Array,
  upper: Float64Array,
  active: Uint8Array,
): void {
  for (let i = 0; i < parameters.length; i++) {
    const value = itemAt(parameters, i);
    const slope = itemAt(gradient, i);
    const fixed = itemAt(lower, i) === itemAt(upper, i);
    active[i] = fixed || (value <= itemAt(lower, i) && slope > 0) || (value >= itemAt(upper, i) && slope < 0) ? 1 : 0;
  }
}

function buildDamped(normal: Float64Array, active: Uint8Array, lambda: number, size: number, out: Float64Array): void {
  let largestDiagonal = 0;
  for (let i = 0; i < size; i++)
    if (active[i] === 0) largestDiagonal = Math.max(largestDiagonal, itemAt(normal, i * size + i));
  // Marquardt scaling by each parameter's own curvature; a floor only where that curvature is zero.
  const floor = 1e-12 * (largestDiagonal > 0 ? largestDiagonal : 1);
  for (let i = 0; i < size; i++) {
    for (let j = 0; j < size; j++) {
      out[i * size + j] = active[i] === 1 || active[j] === 1 ? 0 : itemAt(normal, i * size + j);
    }
    const own = itemAt(normal, i * size + i);
    const diagonal = own > 0 ? own : floor;
    out[i * size + i] = active[i] === 1 ? 1 : diagonal * (1 + lambda);
  }
}

/** gᵀA⁻¹g over the free set (computed on the Jacobi-scaled matrix for conditioning), or undefined when A is singular there. */
function newtonDecrement(
  normal: Float64Array,
  gradient: Float64Array,
  active: Uint8Array,
  size: number,
  work: Float64Array,
  vector: Float64Array,
  scaled: Float64Array,
): number | undefined {
  for (let i = 0; i < size; i++) {
    const scaleI = active[i] === 1 ? 1 : 1 / Math.sqrt(Math.max(itemAt(normal, i * size + i), Number.MIN_VALUE));
    for (let j = 0; j < size; j++) {
      const scaleJ = active[j] === 1 ? 1 : 1 / Math.sqrt(Math.max(itemAt(normal, j * size + j), Number.MIN_VALUE));
      work[i * size + j] =
        active[i] === 1 || active[j] === 1 ? (i === j ? 1 : 0) : itemAt(normal, i * size + j) * scaleI * scaleJ;
    }
    vector[i] = active[i] === 1 ? 0 : itemAt(gradient, i) * scaleI;
  }
  scaled.set(vector);
  if (!choleskyInPlace(work, size)) return undefined;
  choleskySolveInPlace(work, size, vector);
  let sum = 0;
  for (let i = 0; i < size; i++) sum += itemAt(vector, i) * itemAt(scaled, i);
  return sum;
}

/** Decrease of Σ r² predicted by the linear model: −(2δᵀg + δᵀAδ). */
function predictedDecrease(normal: Float64Array, gradient: Float64Array, step: Float64Array, size: number): number {
  let linear = 0;
  let quadratic = 0;
  for (let i = 0; i < size; i++) {
    const si = itemAt(step, i);
    linear += si * itemAt(gradient, i);
    let row = 0;
    for (let j = 0; j < size; j++) row += itemAt(normal, i * size + j) * itemAt(step, j);
    quadratic += si * row;
  }
  return -(2 * linear + quadratic);
}
