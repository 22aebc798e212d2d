// Normal distribution, chi-square quantile, residual tests and estimator sums against scipy and by hand.
import { describe, expect, it } from 'vitest';
import {
  countsLogCounts,
  estimatorObjective,
  estimatorResiduals,
  estimatorWeights,
  pearsonChiSquare,
  poissonDeviance,
} from '../../../src/decay/estimators.js';
import { chiSquareQuantileOneDof, normalCdf, normalQuantile } from '../../../src/decay/normal-distribution.js';
import { createSeededRandom } from '../../../src/decay/random.js';
import { durbinWatson, residualAutocorrelation, runsTest } from '../../../src/decay/residual-tests.js';

describe('normal distribution and chi-square quantile', () => {
  it('matches scipy.stats', () => {
    expect(normalCdf(1)).toBeCloseTo(0.8413447460685429, 13); // scipy.stats.norm.cdf(1.0)
    expect(normalCdf(-2.5)).toBeCloseTo(0.006209665325776132, 13); // scipy.stats.norm.cdf(-2.5)
    expect(normalQuantile(0.975)).toBeCloseTo(1.959963984540054, 10); // scipy.stats.norm.ppf(0.975)
    expect(chiSquareQuantileOneDof(0.6827)).toBeCloseTo(1.000043427117466, 9); // scipy.stats.chi2.ppf(0.6827, 1)
    expect(chiSquareQuantileOneDof(0.95)).toBeCloseTo(3.841458820694124, 9); // scipy.stats.chi2.ppf(0.95, 1)
  });
});

describe('estimator sums', () => {
  const counts = Float64Array.from([0, 1, 5, 10, 3]);
  const model = Float64Array.from([0.5, 2, 4.5, 12, 3]);

  it('Poisson deviance and Pearson χ² match numpy/scipy', () => {
    // 2*sum(m - n + xlogy(n, n/m)) with scipy.special.xlogy → 2.020879659579281
    expect(poissonDeviance(counts, model)).toBeCloseTo(2.0208796595792813, 12);
    // sum((n - m)**2 / m) → 1.3888888888888888
    expect(pearsonChiSquare(counts, model)).toBeCloseTo(1.3888888888888888, 12);
  });

  it('deviance residuals square-sum to the deviance and carry the sign of n − m', () => {
    const residuals = new Float64Array(5);
    const total = estimatorResiduals('ml', counts, model, residuals, undefined);
    expect(total).toBeCloseTo(2.0208796595792813, 12);
    expect(Math.sign(residuals[2] as number)).toBe(1);
    expect(Math.sign(residuals[3] as number)).toBe(-1);
  });

  it('Neyman residuals use max(n, 1) and Pearson residuals use m', () => {
    const residuals = new Float64Array(5);
    const neyman = estimatorResiduals('lsq-neyman', counts, model, residuals, undefined);
    // by hand: 0.25/1 + 1/1 + 0.25/5 + 4/10 + 0 = 1.7
    expect(neyman).toBeCloseTo(1.7, 12);
    expect(estimatorResiduals('lsq-pearson', counts, model, residuals, undefined)).toBeCloseTo(1.3888888888888888, 12);
  });

  it('dr/dm matches a finite difference for every estimator', () => {
    for (const estimator of ['ml', 'lsq-neyman', 'lsq-pearson'] as const) {
      const residuals = new Float64Array(5);
      const slope = new Float64Array(5);
      estimatorResiduals(estimator, counts, model, residuals, slope);
      const shifted = Float64Array.from(model, (m) => m + 1e-7);
      const after = new Float64Array(5);
      estimatorResiduals(estimator, counts, shifted, after, undefined);
      for (let k = 0; k < 5; k++) {
        if (estimator === 'ml' && counts[k] === model[k]) continue;
        expect(slope[k]).toBeCloseTo(((after[k] as number) - (residuals[k] as number)) / 1e-7, 5);
      }
    }
  });
});

describe('Gauss–Newton weights without square roots', () => {
  it('equal (dr/dm)² and r·dr/dm of the residual form, and the same Σr² as the objective path', () => {
    const counts = Float64Array.from([0, 1, 5, 10, 3, 7]);
    const model = Float64Array.from([0.5, 2, 4.5, 12, 3.2, 7]);
    const countsLog = countsLogCounts(counts);
    for (const estimator of ['ml', 'lsq-neyman', 'lsq-pearson'] as const) {
      const residuals = new Float64Array(6);
      const slopeOfResidual = new Float64Array(6);
      const total = estimatorResiduals(estimator, counts, model, residuals, slopeOfResidual);
      const curvature = new Float64Array(6);
      const slope = new Float64Array(6);
      const weightedTotal = estimatorWeights(estimator, counts, countsLog, model, curvature, slope);
      expect(weightedTotal).toBeCloseTo(total, 12);
      expect(estimatorObjective(estimator, counts, countsLog, model)).toBeCloseTo(total, 12);
      for (let k = 0; k < 6; k++) {
        expect(curvature[k]).toBeCloseTo((slopeOfResidual[k] as number) ** 2, 10);
        expect(slope[k]).toBeCloseTo((residuals[k] as number) * (slopeOfResidual[k] as number), 10);
      }
    }
  });
});

describe('deviance from the residual pass', () => {
  it('is the Poisson deviance itself for ml, bit for bit', () => {
    const counts = Float64Array.from([0, 1, 5, 10, 3, 7, 7, 2]);
    const model = Float64Array.from([0.5, 2, 4.5, 12, 3.2, 7, 7.000000000000001, 1e-12]);
    expect(estimatorResiduals('ml', counts, model, new Float64Array(8), undefined)).toBe(
      poissonDeviance(counts, model),
    );
  });
});

describe('n·ln(n) per channel', () => {
  it('takes small whole counts from a table with the same values as the direct expression', () => {
    const counts = Float64Array.from([
      ...Array.from({ length: 5000 }, (_unused, k) => k),
      0.5,
      2.25,
      4095.5,
      1e6 + 0.5,
      123456,
    ]);
    const countsLog = countsLogCounts(counts);
    counts.forEach((n, k) => expect(countsLog[k]).toBe(n > 0 ? n * Math.log(n) : 0));
  });
});

describe('residual tests', () => {
  it('Durbin–Watson by hand', () => {
    // r = [1, -1, 1, -1]: Σ(Δr)² = 3·4 = 12, Σr² = 4 → 3 (hand calculation from the definition).
    expect(durbinWatson([1, -1, 1, -1])).toBeCloseTo(3, 12);
    // r = [1, 2, 3]: Σ(Δr)² = 2, Σr² = 14 → 1/7.
    expect(durbinWatson([1, 2, 3])).toBeCloseTo(1 / 7, 12);
  });

  it('runs test by hand: + + − − + (3 runs, n₊ = 3, n₋ = 2)', () => {
    // μ = 2·3·2/5 + 1 = 3.4; σ² = (μ − 1)(μ − 2)/(n − 1) = 2.4·1.4/4 = 0.84; z = (3 − 3.4)/√0.84
    const result = runsTest([1, 2, -1, -2, 3]);
    expect(result.runs).toBe(3);
    expect(result.expectedRuns).toBeCloseTo(3.4, 12);
    expect(result.z).toBeCloseTo(-0.4 / Math.sqrt(0.84), 12);
  });

  it('autocorrelation in blocks of lags equals the definition one lag at a time, bit for bit', () => {
    const random = createSeededRandom(5);
    for (const [length, maxLag] of [
      [1, 32],
      [3, 32],
      [7, 5],
      [40, 32],
      [101, 9],
      [1000, 32],
    ] as const) {
      const residuals = Float64Array.from({ length }, () => random.nextUniform() - 0.5);
      let power = 0;
      for (let k = 0; k < length; k++) power += (residuals[k] as number) ** 2;
      power /= length;
      const expected: number[] = [];
      for (let lag = 0; lag <= Math.min(maxLag, length - 1); lag++) {
        let sum = 0;
        for (let k = 0; k + lag < length; k++) sum += (residuals[k] as number) * (residuals[k + lag] as number);
        expected.push(sum / (length - lag) / power);
      }
      expect(residualAutocorrelation(residuals, maxLag)).toEqual(expected);
    }
  });

  it('autocorrelation is 1 at lag 0 and −1 at lag 1 for an alternating sequence', () => {
    const values = residualAutocorrelation([1, -1, 1, -1, 1, -1], 2);
    expect(values[0]).toBeCloseTo(1, 12);
    expect(values[1]).toBeCloseTo(-1, 12);
    expect(values[2]).toBeCloseTo(1, 12);
  });
});
