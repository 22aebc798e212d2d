// EWMA and CUSUM on hand-worked sequences: the exact EWMA limit and the tabular CUSUM sums.
import { describe, expect, it } from 'vitest';
import { evaluateRules, replayObservations } from '../../../src/qc/index.js';
import { cusumStep, CUSUM_START } from '../../../src/qc/rule-kinds/cusum.js';
import { ewmaLimitHalfWidth } from '../../../src/qc/rule-kinds/ewma.js';
import { lastOf, ruleSetWith, yieldObservations } from './qc-fixtures.js';

describe('EWMA (Roberts 1959; exact limits as in Lucas & Saccucci 1990)', () => {
  it('the exact limit is L·λ at the first run and L·√(λ/(2−λ)) asymptotically (algebra of the limit formula)', () => {
    expect(ewmaLimitHalfWidth(1, 0.2, 3)).toBeCloseTo(3 * 0.2, 12);
    expect(ewmaLimitHalfWidth(10_000, 0.2, 2.962)).toBeCloseTo(2.962 / 3, 12);
    // i = 2: 3·√(0.2/1.8·(1 − 0.8⁴)) = 3·√(0.111111·0.5904) = 0.768375 (hand computation)
    expect(ewmaLimitHalfWidth(2, 0.2, 3)).toBeCloseTo(0.768375, 5);
  });

  const ruleSet = ruleSetWith(`
  - id: yield-ewma
    metric: controlQuantumYield
    scope: { control: flu }
    kind: ewma
    severity: warning
    lambda: 0.2
    limitWidth: 3
`);

  it('signals when z crosses the time-varying limit and not one run before', () => {
    // z-scores −1.5 each run: EWMA z_i = −1.5·(1 − 0.8^i); limit 3·√(0.2/1.8·(1−0.64^i)).
    // i=1: −0.30 vs 0.60; i=2: −0.54 vs 0.768; i=3: −0.732 vs 0.860; i=4: −0.886 vs 0.911; i=5: −1.008 vs 0.946 → signal at 5.
    const observations = yieldObservations([-1.5, -1.5, -1.5, -1.5, -1.5]);
    const atFour = lastOf(observations.slice(0, 4));
    expect(evaluateRules({ history: atFour.history, observation: atFour.latest, ruleSet })).toEqual([]);
    const atFive = lastOf(observations);
    const flags = evaluateRules({ history: atFive.history, observation: atFive.latest, ruleSet });
    expect(flags).toHaveLength(1);
    expect(flags[0]?.values['ewma']).toBeCloseTo(0.925 - 1.5 * (1 - 0.8 ** 5) * 0.01, 10);
    expect(flags[0]?.message).toMatch(
      /^control yield is trending down: its running average 0\.915 is below the lower limit 0\.916/,
    );
  });
});

describe('tabular CUSUM (Page 1954; Montgomery tabular form)', () => {
  it('accumulates z − k above and −z − k below, floored at zero (hand-worked)', () => {
    let state = CUSUM_START;
    const sums: [number, number][] = [];
    for (const z of [1, 1, -0.2, 2, -3]) {
      state = cusumStep(state, z, 0.5);
      sums.push([state.upper, state.lower]);
    }
    // upper: 0.5, 1.0, 0.3, 1.8, 0; lower: 0, 0, 0, 0, 2.5
    expect(sums.map(([u]) => u)).toEqual([0.5, 1, 0.30000000000000004, 1.8, 0]);
    expect(sums.map(([, l]) => l)).toEqual([0, 0, 0, 0, 2.5]);
  });

  it('signals on the lower side after a sustained −1.5 SD shift once S_L exceeds h', () => {
    const ruleSet = ruleSetWith(`
  - id: yield-cusum
    metric: controlQuantumYield
    scope: { control: flu }
    kind: cusum
    severity: critical
    referenceSd: 0.5
    decisionSd: 4
`);
    // S_L grows by 0.9 per run: 0.9, 1.8, 2.7, 3.6 (not > 4), 4.5 (> 4) → first signal at run 5.
    const observations = yieldObservations([-1.4, -1.4, -1.4, -1.4, -1.4]);
    const four = lastOf(observations.slice(0, 4));
    expect(evaluateRules({ history: four.history, observation: four.latest, ruleSet })).toEqual([]);
    const five = lastOf(observations);
    const flags = evaluateRules({ history: five.history, observation: five.latest, ruleSet });
    expect(flags.map((flag) => flag.check)).toEqual(['lower CUSUM']);
    expect(flags[0]?.values['lowerSum']).toBeCloseTo(4.5, 10);
  });
});

describe('recovery of restarted charts', () => {
  it('a CUSUM restarted after its signal recovers only when the signalling sum is back at zero', () => {
    const ruleSet = ruleSetWith(`
  - { id: c, metric: controlQuantumYield, scope: { control: flu }, kind: cusum, severity: critical, referenceSd: 0.5, decisionSd: 4 }
`);
    // Signal at run 5 (S_L = 4.5); restart; run 6 at −1.0 SD → S_L = 0.5 (quiet, not settled);
    // run 7 at +0.5 SD → S_L = max(0, −0.5 − 0.5 + 0.5) = 0 → recovery.
    const outcome = replayObservations(yieldObservations([-1.4, -1.4, -1.4, -1.4, -1.4, -1.0, 0.5]), ruleSet);
    expect(outcome.steps.map((step) => step.flags.length)).toEqual([0, 0, 0, 0, 1, 0, 0]);
    expect(outcome.steps.map((step) => step.recoveries.length)).toEqual([0, 0, 0, 0, 0, 0, 1]);
  });

  it('an EWMA restarted after its signal recovers once its average is back on the target side', () => {
    const ruleSet = ruleSetWith(`
  - { id: e, metric: controlQuantumYield, scope: { control: flu }, kind: ewma, severity: warning, lambda: 0.2, limitWidth: 3 }
`);
    // Signal at run 5 (see above); restart; run 6 at −0.5 SD → z = −0.1 (same side, not settled);
    // run 7 at +1 SD → z = 0.2·1 + 0.8·(−0.1) = 0.12 → recovery.
    const outcome = replayObservations(yieldObservations([-1.5, -1.5, -1.5, -1.5, -1.5, -0.5, 1]), ruleSet);
    expect(outcome.steps.map((step) => step.flags.length)).toEqual([0, 0, 0, 0, 1, 0, 0]);
    expect(outcome.steps.map((step) => step.recoveries.length)).toEqual([0, 0, 0, 0, 0, 0, 1]);
  });
});
