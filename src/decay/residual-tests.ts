// Tests of the weighted residuals for structure left by the model: the Durbin–Watson statistic
// (Durbin & Watson, Biometrika 37, 409 (1950)), the residual autocorrelation function, and the
// Wald–Wolfowitz runs test on residual signs (Wald & Wolfowitz, Ann. Math. Stat. 11, 147 (1940)).

/** Durbin–Watson d = Σ(r_k − r_{k−1})² / Σ r_k² (≈ 2 for uncorrelated residuals, < 2 for positive correlation); O(n). */
export function durbinWatson(residuals: ArrayLike<number>): number {
  let numerator = 0;
  let denominator = 0;
  for (let k = 0; k < residuals.length; k++) {
    const value = residuals[k] as number;
    denominator += value * value;
    if (k > 0) {
      const difference = value - (residuals[k - 1] as number);
      numerator += difference * difference;
    }
  }
  return denominator > 0 ? numerator / denominator : 2;
}

/** Autocorrelation of the residuals at lags 0…maxLag, c_j = (1/(n−j))Σ r_k·r_{k+j} / ((1/n)Σ r_k²) (the usual TCSPC form); O(n·maxLag). */
export function residualAutocorrelation(residuals: ArrayLike<number>, maxLag: number): number[] {
  const n = residuals.length;
  let power = 0;
  for (let k = 0; k < n; k++) power += (residuals[k] as number) ** 2;
  power /= n;
  const result: number[] = [];
  for (let lag = 0; lag <= Math.min(maxLag, n - 1); lag++) {
    let sum = 0;
    for (let k = 0; k + lag < n; k++) sum += (residuals[k] as number) * (residuals[k + lag] as number);
    result.push(power > 0 ? sum / (n - lag) / power : 0);
  }
  return result;
}

export interface RunsTest {
  /** Number of runs of equal sign (zeros skipped). */
  readonly runs: number;
  /** Expected number of runs for random signs, 2·n₊·n₋/n + 1. */
  readonly expectedRuns: number;
  /** (runs − expected)/σ with σ² = (μ − 1)(μ − 2)/(n − 1); large negative z means too few runs (trends). */
  readonly z: number;
}

/** Wald–Wolfowitz runs test on the residual signs (normal approximation); O(n). */
export function runsTest(residuals: ArrayLike<number>): RunsTest {
  let positive = 0;
  let negative = 0;
  let runs = 0;
  let previous = 0;
  for (let k = 0; k < residuals.length; k++) {
    const value = residuals[k] as number;
    if (value === 0) continue;
    const sign = value > 0 ? 1 : -1;
    if (sign > 0) positive++;
    else negative++;
    if (sign !== previous) runs++;
    previous = sign;
  }
  const n = positive + negative;
  if (positive === 0 || negative === 0 || n < 3) return { runs, expectedRuns: runs, z: 0 };
  const expectedRuns = (2 * positive * negative) / n + 1;
  const variance = ((expectedRuns - 1) * (expectedRuns - 2)) / (n - 1);
  return { runs, expectedRuns, z: variance > 0 ? (runs - expectedRuns) / Math.sqrt(variance) : 0 };
}
