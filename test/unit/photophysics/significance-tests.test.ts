// Student t tail probabilities and the exact runs test used by the photophysics warnings (issue 17.5).
import { describe, expect, it } from 'vitest';
import { runsProbability, runsTestTooFew } from '../../../src/photophysics/runs-test.js';
import {
  logGamma,
  regularizedIncompleteBeta,
  studentTTwoSidedPValue,
  studentTUpperTail,
} from '../../../src/photophysics/student-t.js';

describe('Student t (A&S 26.7.1 via the incomplete beta)', () => {
  // Check values from scipy 1.17: scipy.stats.t.sf, scipy.special.betainc, scipy.special.gammaln.
  it.each([
    [3, 3, 0.02883444281121865],
    [1.2, 1, 0.22114206162369554],
    [2.5, 20, 0.01061677271956619],
  ])('P(T > %f | ν = %i) matches scipy.stats.t.sf', (t, dof, expected) => {
    expect(studentTUpperTail(t, dof)).toBeCloseTo(expected, 12);
    expect(studentTUpperTail(-t, dof)).toBeCloseTo(1 - expected, 12);
  });

  it('two-sided p at the tabulated 1 % point t = 5.84, ν = 3 (scipy: 0.010004368)', () => {
    expect(studentTTwoSidedPValue(5.84, 3)).toBeCloseTo(0.010004368181011728, 10);
  });

  it('matches scipy.special.betainc and gammaln', () => {
    expect(regularizedIncompleteBeta(0.3, 2.5, 0.5)).toBeCloseTo(0.018927124071945658, 13);
    expect(regularizedIncompleteBeta(0.8, 10, 3)).toBeCloseTo(0.5583457484800002, 13);
    expect(logGamma(0.3)).toBeCloseTo(1.0957979948180756, 12);
    expect(logGamma(12.5)).toBeCloseTo(18.73434751193645, 11);
  });
});

describe('exact runs test (Swed & Eisenhart 1943)', () => {
  it('gives the null distribution of runs by hand for 5 + and 5 −', () => {
    // By hand from Swed & Eisenhart's formulas: P(R = 2) = 2/C(10,5) = 2/252; P(R = 3) = 2·C(4,1)/252 = 8/252.
    expect(runsProbability(2, 5, 5)).toBeCloseTo(2 / 252, 14);
    expect(runsProbability(3, 5, 5)).toBeCloseTo(8 / 252, 14);
    let total = 0;
    for (let r = 1; r <= 10; r++) total += runsProbability(r, 5, 5);
    expect(total).toBeCloseTo(1, 14);
  });

  it('flags two runs in ten residuals (p = 0.0079) but never five residuals (smallest p = 0.2)', () => {
    const ten = runsTestTooFew([1, 2, 1, 3, 1, -1, -2, -1, -3, -1]);
    expect(ten.runs).toBe(2);
    expect(ten.pValue).toBeCloseTo(2 / 252, 12);
    // 2 + and 3 −, two runs: P(R ≤ 2) = 2/C(5,2) = 0.2 (by hand).
    expect(runsTestTooFew([1, 1, -1, -1, -1]).pValue).toBeCloseTo(0.2, 12);
    expect(runsTestTooFew([0, 0, 0]).pValue).toBe(1);
  });
});
