// Least-squares lines through the origin (ordinary or weighted), a quadratic-through-origin curvature test
// and the residual sign-run count; used by the gradient yield method and Stern–Volmer analysis.
import { InputRejected } from '../model/errors.js';
import { runsTestTooFew } from './runs-test.js';
import { studentTTwoSidedPValue } from './student-t.js';
import { itemAt } from '../model/item-at.js';

export interface OriginLineFit {
  readonly slope: number;
  /** Standard error of the slope from the residual scatter: √(Σw r²/(n−1) / Σw x²). */
  readonly slopeStandardError: number;
  /** Coefficient of determination about the (weighted) mean of y: 1 − SS_res/SS_tot (stricter than the uncentred form). */
  readonly rSquared: number;
  readonly residuals: readonly number[];
  /** Number of runs of equal residual signs (few runs = systematic curvature; Wald–Wolfowitz). */
  readonly residualSignRuns: number;
  /** Quadratic term relative to the linear one at the largest x, b2·x_max/b1 of y = b1 x + b2 x²; < 0 means saturation. */
  readonly relativeCurvature: number | undefined;
  /** t statistic of b2 (b2 / se(b2)). */
  readonly curvatureTStatistic: number | undefined;
  /** Two-sided p-value of that t with n − 2 degrees of freedom (Student t; A&S 26.7.1). */
  readonly curvaturePValue: number | undefined;
  /** Exact one-sided p-value of the runs test for too few residual sign runs (Swed & Eisenhart 1943). */
  readonly residualRunsPValue: number;
  readonly pointCount: number;
}

function checkSeries(x: readonly number[], y: readonly number[], what: string): void {
  if (x.length !== y.length)
    throw new InputRejected('LENGTH_MISMATCH', `${what}: ${x.length} x values but ${y.length} y values`);
  if (x.length < 2)
    throw new InputRejected(
      'TOO_FEW_POINTS',
      `${what}: a line through the origin needs at least 2 points, got ${x.length}`,
    );
  for (const value of [...x, ...y])
    if (!Number.isFinite(value)) throw new InputRejected('NON_FINITE', `${what}: a value is not finite (${value})`);
}

/** Count of runs of equal signs in a sequence (zeros join the previous run). */
export function signRuns(values: readonly number[]): number {
  let runs = 0;
  let previous = 0;
  for (const value of values) {
    const sign = Math.sign(value);
    if (sign !== 0 && sign !== previous) {
      runs++;
      previous = sign;
    }
  }
  return runs;
}

/** y = b1·x + b2·x² by least squares (2×2 normal equations); b2 and its standard error, or undefined with < 3 points. */
export function quadraticThroughOrigin(
  x: readonly number[],
  y: readonly number[],
  weights?: readonly number[],
): { b1: number; b2: number; b2StandardError: number } | undefined {
  const n = x.length;
  if (n < 3) return undefined;
  let s2 = 0,
    s3 = 0,
    s4 = 0,
    t1 = 0,
    t2 = 0;
  for (let i = 0; i < n; i++) {
    const w = weights?.[i] ?? 1;
    const xi = itemAt(x, i);
    const yi = itemAt(y, i);
    s2 += w * xi * xi;
    s3 += w * xi * xi * xi;
    s4 += w * xi * xi * xi * xi;
    t1 += w * xi * yi;
    t2 += w * xi * xi * yi;
  }
  const determinant = s2 * s4 - s3 * s3;
  if (!(Math.abs(determinant) > 1e-300)) return undefined;
  const b1 = (t1 * s4 - t2 * s3) / determinant;
  const b2 = (s2 * t2 - s3 * t1) / determinant;
  let ssResidual = 0;
  for (let i = 0; i < n; i++) {
    const xi = itemAt(x, i);
    const r = itemAt(y, i) - b1 * xi - b2 * xi * xi;
    ssResidual += (weights?.[i] ?? 1) * r * r;
  }
  const variance = ssResidual / (n - 2);
  return { b1, b2, b2StandardError: Math.sqrt((variance * s2) / determinant) };
}

/** Weighted (or ordinary, weights = 1) least-squares slope through the origin, y = b·x, with standard error, R², residual runs and curvature; O(n). */
export function fitThroughOrigin(
  x: readonly number[],
  y: readonly number[],
  weights?: readonly number[],
  what = 'series',
): OriginLineFit {
  checkSeries(x, y, what);
  const n = x.length;
  let sxx = 0,
    sxy = 0,
    sw = 0,
    swy = 0;
  for (let i = 0; i < n; i++) {
    const w = weights?.[i] ?? 1;
    if (!(w > 0))
      throw new InputRejected('INPUT_INVALID', `${what}: weight ${i + 1} is ${w}; weights must be positive`);
    const xi = itemAt(x, i);
    const yi = itemAt(y, i);
    sxx += w * xi * xi;
    sxy += w * xi * yi;
    sw += w;
    swy += w * yi;
  }
  if (!(sxx > 0)) throw new InputRejected('INPUT_INVALID', `${what}: all x values are zero; the slope is undefined`);
  const slope = sxy / sxx;
  const residuals = x.map((xi, i) => itemAt(y, i) - slope * xi);
  const meanY = swy / sw;
  let ssResidual = 0,
    ssTotal = 0;
  for (let i = 0; i < n; i++) {
    const w = weights?.[i] ?? 1;
    ssResidual += w * itemAt(residuals, i) ** 2;
    ssTotal += w * (itemAt(y, i) - meanY) ** 2;
  }
  const quadratic = quadraticThroughOrigin(x, y, weights);
  const xMax = Math.max(...x.map(Math.abs));
  // Residuals at rounding level (exact data) carry no sign information.
  const yScale = Math.max(...y.map(Math.abs));
  const signedResiduals = residuals.map((r) => (Math.abs(r) <= 1e-12 * yScale ? 0 : r));
  const curvatureT =
    quadratic === undefined || !(quadratic.b2StandardError > 0) ? undefined : quadratic.b2 / quadratic.b2StandardError;
  return Object.freeze({
    slope,
    slopeStandardError: n > 1 ? Math.sqrt(ssResidual / (n - 1) / sxx) : 0,
    rSquared: ssTotal > 0 ? 1 - ssResidual / ssTotal : 1,
    residuals: Object.freeze(residuals),
    residualSignRuns: signRuns(signedResiduals),
    residualRunsPValue: runsTestTooFew(signedResiduals).pValue,
    relativeCurvature: quadratic === undefined || quadratic.b1 === 0 ? undefined : (quadratic.b2 * xMax) / quadratic.b1,
    curvatureTStatistic: curvatureT,
    curvaturePValue: curvatureT === undefined ? undefined : studentTTwoSidedPValue(curvatureT, n - 2),
    pointCount: n,
  });
}

export interface QuadraticFit {
  /** Coefficients of y = c0 + c1·x + c2·x². */
  readonly c0: number;
  readonly c1: number;
  readonly c2: number;
  /** t = c2/se(c2) (±∞ when the data lie exactly on a curved quadratic), n − 3 degrees of freedom. */
  readonly c2TStatistic: number;
  readonly degreesOfFreedom: number;
}

/** Weighted least-squares quadratic with intercept, y = c0 + c1 x + c2 x², and the t statistic of c2 (normal equations, 3×3; Draper & Smith, Applied Regression Analysis §2); undefined with < 4 points or a singular design. */
export function quadraticWithIntercept(
  x: readonly number[],
  y: readonly number[],
  weights?: readonly number[],
): QuadraticFit | undefined {
  const n = x.length;
  if (n < 4) return undefined;
  const m = [0, 0, 0, 0, 0, 0, 0, 0, 0];
  const r = [0, 0, 0];
  for (let i = 0; i < n; i++) {
    const w = weights?.[i] ?? 1;
    const row = [1, itemAt(x, i), itemAt(x, i) ** 2];
    for (let a = 0; a < 3; a++) {
      r[a] = itemAt(r, a) + w * itemAt(row, a) * itemAt(y, i);
      for (let b = 0; b < 3; b++) m[a * 3 + b] = itemAt(m, a * 3 + b) + w * itemAt(row, a) * itemAt(row, b);
    }
  }
  const at = (i: number): number => itemAt(m, i);
  const cofactor = [
    at(4) * at(8) - at(5) * at(7),
    at(2) * at(7) - at(1) * at(8),
    at(1) * at(5) - at(2) * at(4),
    at(5) * at(6) - at(3) * at(8),
    at(0) * at(8) - at(2) * at(6),
    at(2) * at(3) - at(0) * at(5),
    at(3) * at(7) - at(4) * at(6),
    at(1) * at(6) - at(0) * at(7),
    at(0) * at(4) - at(1) * at(3),
  ];
  const determinant = at(0) * itemAt(cofactor, 0) + at(1) * itemAt(cofactor, 3) + at(2) * itemAt(cofactor, 6);
  if (!(Math.abs(determinant) > 0) || !Number.isFinite(determinant)) return undefined;
  const inverse = cofactor.map((c) => c / determinant);
  const coefficient = (a: number): number =>
    itemAt(inverse, a * 3) * itemAt(r, 0) +
    itemAt(inverse, a * 3 + 1) * itemAt(r, 1) +
    itemAt(inverse, a * 3 + 2) * itemAt(r, 2);
  const c0 = coefficient(0),
    c1 = coefficient(1),
    c2 = coefficient(2);
  let ssResidual = 0;
  let yScale = 0;
  for (let i = 0; i < n; i++) {
    const xi = itemAt(x, i);
    ssResidual += (weights?.[i] ?? 1) * (itemAt(y, i) - c0 - c1 * xi - c2 * xi * xi) ** 2;
    yScale = Math.max(yScale, Math.abs(itemAt(y, i)));
  }
  const degreesOfFreedom = n - 3;
  const c2StandardError = Math.sqrt(Math.max(0, (ssResidual / degreesOfFreedom) * itemAt(inverse, 8)));
  const xMax = Math.max(...x.map(Math.abs));
  let c2TStatistic: number;
  if (c2StandardError > (1e-12 * yScale) / Math.max(xMax * xMax, 1e-300)) c2TStatistic = c2 / c2StandardError;
  else c2TStatistic = Math.abs(c2 * xMax * xMax) > 1e-9 * yScale ? Math.sign(c2) * Number.POSITIVE_INFINITY : 0;
  return Object.freeze({ c0, c1, c2, c2TStatistic, degreesOfFreedom });
}
