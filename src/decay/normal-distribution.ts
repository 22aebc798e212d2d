// Standard normal distribution function and its inverse, and the chi-square (1 degree of freedom)
// quantile used for profile confidence intervals: q = z², z = Φ⁻¹((1 + level)/2).

/**
 * Standard normal CDF Φ(z) via erf(x) = (2/√π)·e^(−x²)·Σ 2ⁿx^(2n+1)/(1·3·…·(2n+1)) (all terms positive,
 * Abramowitz & Stegun 7.1.6) for |z| ≤ 8; ±1 bounds beyond. Accurate to ~1e-15 absolute.
 */
export function normalCdf(z: number): number {
  if (z > 8) return 1;
  if (z < -8) return 0;
  const x = Math.abs(z) / Math.SQRT2;
  let term = x;
  let sum = x;
  for (let n = 1; n < 400; n++) {
    term *= (2 * x * x) / (2 * n + 1);
    sum += term;
    if (term < sum * 1e-17) break;
  }
  const erf = (2 / Math.sqrt(Math.PI)) * Math.exp(-x * x) * sum;
  return z >= 0 ? 0.5 * (1 + erf) : 0.5 * (1 - erf);
}

/** Inverse standard normal CDF for 0 < p < 1 by bisection on normalCdf (60 halvings of [−8, 8]); O(60). */
export function normalQuantile(probability: number): number {
  let low = -8;
  let high = 8;
  for (let i = 0; i < 60; i++) {
    const middle = 0.5 * (low + high);
    if (normalCdf(middle) < probability) low = middle;
    else high = middle;
  }
  return 0.5 * (low + high);
}

/** Chi-square quantile with one degree of freedom at `level` (e.g. 0.6827 → 1.000, 0.95 → 3.841): z² with z = Φ⁻¹((1 + level)/2). */
export function chiSquareQuantileOneDof(level: number): number {
  const z = normalQuantile(0.5 * (1 + level));
  return z * z;
}
