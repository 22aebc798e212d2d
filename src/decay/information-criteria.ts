// Information criteria for comparing models fitted to the same data. With −2 ln L = deviance + const for
// Poisson ML (and χ² + const for Gaussian-weighted LS), the constant cancels between models:
//   AIC = objective + 2p (Akaike, IEEE Trans. Autom. Control 19, 716 (1974))
//   BIC = objective + p·ln(n) (Schwarz, Ann. Stat. 6, 461 (1978))

/** Akaike information criterion from the fit objective (deviance or χ²) and the free-parameter count. */
export function akaikeCriterion(objective: number, freeParameters: number): number {
  return objective + 2 * freeParameters;
}

/** Bayesian (Schwarz) information criterion from the objective, the free-parameter count and the number of channels. */
export function bayesianCriterion(objective: number, freeParameters: number, channels: number): number {
  return objective + freeParameters * Math.log(channels);
}
