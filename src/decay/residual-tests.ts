// Tests of the weighted residuals for structure left by the model: the Durbin–Watson statistic
// (Durbin & Watson, Biometrika 37, 409 (1950)), the residual autocorrelation function, and the
// Wald–Wolfowitz runs test on residual signs (Wald & Wolfowitz, Ann. Math. Stat. 11, 147 (1940)).
import { itemAt } from '../model/item-at.js';

/** Durbin–Watson d = Σ(r_k − r_{k−1})² / Σ r_k² (≈ 2 for uncorrelated residuals, < 2 for positive correlation); O(n). */
export function durbinWatson(residuals: ArrayLike<number>): number {
  let numerator = 0;
  let denominator = 0;
  for (let k = 0; k < residuals.length; k++) {
    const value = itemAt(residuals, k);
    denominator += value * value;
    if (k > 0) {
      const difference = value - itemAt(residuals, k - 1);
      numerator += difference * difference;
    }
  }
  return denominator > 0 ? numerator / denominator : 2;
}

/**
 * Autocorrelation of the residuals at lags 0…maxLag, c_j = (1/(n−j))Σ r_k·r_{k+j} / ((1/n)Σ r_k²) (the usual
 * TCSPC form); O(n·maxLag), eight lags per pass over the residuals (each sum still runs over k in order).
 */
export function residualAutocorrelation(residuals: ArrayLike<number>, maxLag: number): number[] {
  const n = residuals.length;
  let power = 0;
  for (let k = 0; k < n; k++) power += itemAt(residuals, k) ** 2;
  power /= n;
  const lastLag = Math.min(maxLag, n - 1);
  const result: number[] = [];
  const sums = new Float64Array(LAGS_PER_PASS);
  for (let lag = 0; lag <= lastLag; lag += LAGS_PER_PASS) {
    const blockLast = Math.min(lag + LAGS_PER_PASS - 1, lastLag);
    laggedProducts(residuals, lag, blockLast, sums);
    for (let j = lag; j <= blockLast; j++) result.push(power > 0 ? itemAt(sums, j - lag) / (n - j) / power : 0);
  }
  return result;
}

const LAGS_PER_PASS = 8;

/**
 * Fills sums[j − first] with Σ_k r_k·r_{k+j} for the lags j = first…last (at most eight, last ≤ n − 1): one pass
 * in which the partners r_{k+first} … r_{k+first+7} slide through local variables, then the short tails.
 */
function laggedProducts(residuals: ArrayLike<number>, first: number, last: number, sums: Float64Array): void {
  const n = residuals.length;
  let window0 = partnerOf(residuals, first);
  let window1 = partnerOf(residuals, first + 1);
  let window2 = partnerOf(residuals, first + 2);
  let window3 = partnerOf(residuals, first + 3);
  let window4 = partnerOf(residuals, first + 4);
  let window5 = partnerOf(residuals, first + 5);
  let window6 = partnerOf(residuals, first + 6);
  let window7 = partnerOf(residuals, first + 7);
  let sum0 = 0;
  let sum1 = 0;
  let sum2 = 0;
  let sum3 = 0;
  let sum4 = 0;
  let sum5 = 0;
  let sum6 = 0;
  let sum7 = 0;
  // Where every lag of the block has a partner (k + last < n), all sums advance together; sums past `last` are discarded.
  const shared = n - last;
  for (let k = 0; k < shared; k++) {
    const value = itemAt(residuals, k);
    sum0 += value * window0;
    sum1 += value * window1;
    sum2 += value * window2;
    sum3 += value * window3;
    sum4 += value * window4;
    sum5 += value * window5;
    sum6 += value * window6;
    sum7 += value * window7;
    window0 = window1;
    window1 = window2;
    window2 = window3;
    window3 = window4;
    window4 = window5;
    window5 = window6;
    window6 = window7;
    window7 = partnerOf(residuals, k + first + LAGS_PER_PASS);
  }
  sums[0] = sum0;
  sums[1] = sum1;
  sums[2] = sum2;
  sums[3] = sum3;
  sums[4] = sum4;
  sums[5] = sum5;
  sums[6] = sum6;
  sums[7] = sum7;
  for (let j = 0; first + j < last; j++) {
    let tail = itemAt(sums, j);
    for (let k = shared; k + first + j < n; k++) tail += itemAt(residuals, k) * itemAt(residuals, k + first + j);
    sums[j] = tail;
  }
}

/** r[index], or 0 past the end (a partner only lags beyond the block use). */
function partnerOf(residuals: ArrayLike<number>, index: number): number {
  return index < residuals.length ? itemAt(residuals, index) : 0;
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
    const value = itemAt(residuals, k);
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
