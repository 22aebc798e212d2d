// The Levenberg–Marquardt loop on a published test problem (Rosenbrock as least squares), with bounds,
// and its honest failure modes (iteration cap, NaN).
import { describe, expect, it } from 'vitest';
import { minimiseLevenbergMarquardt, type SumOfSquaresObjective } from '../../../src/decay/levenberg-marquardt.js';

/** Rosenbrock residuals r = [10(y − x²), 1 − x]: minimum Σr² = 0 at (1, 1) (Rosenbrock, Comput. J. 3, 175 (1960)). */
function rosenbrock(poison = false): SumOfSquaresObjective {
  return {
    parameterCount: 2,
    evaluate(p, withDerivatives, normal, gradient): number {
      const x = p[0] as number;
      const y = p[1] as number;
      const r = [10 * (y - x * x), 1 - x];
      const jacobian = [
        [-20 * x, 10],
        [-1, 0],
      ];
      if (withDerivatives) {
        for (let i = 0; i < 2; i++) {
          gradient[i] = (jacobian[0]?.[i] ?? 0) * (r[0] ?? 0) + (jacobian[1]?.[i] ?? 0) * (r[1] ?? 0);
          for (let j = 0; j < 2; j++) {
            normal[i * 2 + j] =
              (jacobian[0]?.[i] ?? 0) * (jacobian[0]?.[j] ?? 0) + (jacobian[1]?.[i] ?? 0) * (jacobian[1]?.[j] ?? 0);
          }
        }
      }
      return poison && x > 0 ? Number.NaN : (r[0] ?? 0) ** 2 + (r[1] ?? 0) ** 2;
    },
  };
}

const unbounded = Float64Array.from([-Infinity, -Infinity]);
const noUpper = Float64Array.from([Infinity, Infinity]);

describe('minimiseLevenbergMarquardt', () => {
  it('finds the Rosenbrock minimum (1, 1) from the classic start (−1.2, 1)', () => {
    const outcome = minimiseLevenbergMarquardt(rosenbrock(), Float64Array.from([-1.2, 1]), unbounded, noUpper, 200);
    expect(outcome.converged).toBe(true);
    // Convergence means the Newton decrement (the Σr² still to gain) is < 1e-7, so Σr² ≤ ~1e-7 here.
    expect(outcome.objective).toBeLessThan(1e-7);
    expect(outcome.parameters[0]).toBeCloseTo(1, 3);
    expect(outcome.parameters[1]).toBeCloseTo(1, 3);
  });

  it('respects an upper bound x ≤ 0.5: scipy least_squares gives (0.5, 0.25), Σr² = 0.25', () => {
    // scipy.optimize.least_squares(f, [-1.2, 1], bounds=([-inf, -inf], [0.5, inf])) → x = [0.5, 0.25], 2·cost = 0.25
    const outcome = minimiseLevenbergMarquardt(
      rosenbrock(),
      Float64Array.from([-1.2, 1]),
      unbounded,
      Float64Array.from([0.5, Infinity]),
      200,
    );
    expect(outcome.converged).toBe(true);
    expect(outcome.parameters[0]).toBeCloseTo(0.5, 8);
    expect(outcome.parameters[1]).toBeCloseTo(0.25, 6);
    expect(outcome.objective).toBeCloseTo(0.25, 8);
  });

  it('holds a parameter when lower = upper', () => {
    const outcome = minimiseLevenbergMarquardt(
      rosenbrock(),
      Float64Array.from([0.3, 1]),
      Float64Array.from([0.3, -Infinity]),
      Float64Array.from([0.3, Infinity]),
      200,
    );
    expect(outcome.converged).toBe(true);
    expect(outcome.parameters[0]).toBe(0.3);
    // min over y of 100(y − 0.09)² + 0.49: y = 0.09 (by hand), to the decrement tolerance.
    expect(outcome.parameters[1]).toBeCloseTo(0.09, 4);
    expect(outcome.objective).toBeCloseTo(0.49, 7);
  });

  it('does not report success at the iteration cap', () => {
    const outcome = minimiseLevenbergMarquardt(rosenbrock(), Float64Array.from([-1.2, 1]), unbounded, noUpper, 2);
    expect(outcome.converged).toBe(false);
    expect(outcome.iterations).toBe(2);
    expect(outcome.reason).toMatch(/iteration limit/);
  });

  it('does not report success when the objective turns NaN', () => {
    const atStart = minimiseLevenbergMarquardt(rosenbrock(true), Float64Array.from([0.5, 1]), unbounded, noUpper, 50);
    expect(atStart.converged).toBe(false);
    expect(atStart.reason).toMatch(/not finite/);
    const later = minimiseLevenbergMarquardt(rosenbrock(true), Float64Array.from([-1.2, 1]), unbounded, noUpper, 200);
    expect(later.converged).toBe(false);
    expect(Number.isFinite(later.objective)).toBe(true);
  });
});
