// Absorptance (fraction of light absorbed) from absorbance, and its derivative, for yield equations.

/** f = 1 − 10^(−A) (Brouwer, Pure Appl. Chem. 83, 2213 (2011)); computed with expm1 for small A. */
export function absorptanceFromAbsorbance(absorbance: number): number {
  return -Math.expm1(-Math.LN10 * absorbance);
}

/** df/dA = ln10·10^(−A), per absorbance unit. */
export function absorptanceSlope(absorbance: number): number {
  return Math.LN10 * Math.pow(10, -absorbance);
}
