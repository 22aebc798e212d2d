// Exact runs test (too few runs of equal residual signs = systematic lack of fit), from the exact null
// distribution of the number of runs given the counts of each sign (Swed & Eisenhart, Ann. Math. Stat.
// 14, 66 (1943); Wald & Wolfowitz, Ann. Math. Stat. 11, 147 (1940)).

function binomial(n: number, k: number): number {
  if (k < 0 || k > n) return 0;
  let result = 1;
  for (let i = 1; i <= k; i++) result = (result * (n - k + i)) / i;
  return result;
}

/** P(R = runs) for a random arrangement of `positive` + and `negative` − signs (Swed & Eisenhart 1943, eq. 1–2). */
export function runsProbability(runs: number, positive: number, negative: number): number {
  const total = binomial(positive + negative, positive);
  if (positive === 0 || negative === 0) return runs === (positive + negative > 0 ? 1 : 0) ? 1 : 0;
  if (runs % 2 === 0) {
    const k = runs / 2;
    return (2 * binomial(positive - 1, k - 1) * binomial(negative - 1, k - 1)) / total;
  }
  const k = (runs - 1) / 2;
  return (
    (binomial(positive - 1, k - 1) * binomial(negative - 1, k) +
      binomial(positive - 1, k) * binomial(negative - 1, k - 1)) /
    total
  );
}

export interface RunsTestResult {
  readonly runs: number;
  readonly positive: number;
  readonly negative: number;
  /** One-sided exact p-value P(R ≤ runs): small = fewer runs than chance, a systematic pattern. */
  readonly pValue: number;
}

/** Exact one-sided runs test for too few sign runs in a residual sequence (zeros ignored); O(n²) (Swed & Eisenhart 1943). */
export function runsTestTooFew(residuals: readonly number[]): RunsTestResult {
  const signs = residuals.map(Math.sign).filter((s) => s !== 0);
  const positive = signs.filter((s) => s > 0).length;
  const negative = signs.length - positive;
  let runs = 0;
  signs.forEach((s, i) => {
    if (i === 0 || s !== signs[i - 1]) runs++;
  });
  if (signs.length === 0) return Object.freeze({ runs: 0, positive: 0, negative: 0, pValue: 1 });
  let pValue = 0;
  for (let r = 1; r <= runs; r++) pValue += runsProbability(r, positive, negative);
  return Object.freeze({ runs, positive, negative, pValue: Math.min(1, pValue) });
}
