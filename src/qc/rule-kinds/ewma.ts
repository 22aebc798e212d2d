// EWMA chart with exact time-varying limits (Roberts, Technometrics 1, 239, 1959; limits and ARL
// tables in Lucas & Saccucci, Technometrics 32, 1, 1990): z_i = λx_i + (1 − λ)z_{i−1}, z_0 = μ0,
// signal when |z_i − μ0| > L·σ·√(λ/(2 − λ)·[1 − (1 − λ)^(2i)]).
import { z } from 'zod';
import { baseRuleShape, numberBetween, positiveNumber } from '../rule-base.js';
import { defineRuleKind, type ObservationContext, type RuleFinding } from '../rule-kind.js';
import { centreName } from '../messages.js';
import { formatMetricValue, metricLabel } from '../metrics.js';

export const ewmaRuleSchema = z.strictObject({
  ...baseRuleShape,
  kind: z.literal('ewma'),
  /** Weight of the newest run, 0 < λ ≤ 1. Default 0.2. */
  lambda: numberBetween(0, 1, { exclusiveMin: true }).default(0.2),
  /** Limit width in asymptotic EWMA SDs. Default 2.962 (in-control ARL ≈ 500 at λ = 0.2; Lucas & Saccucci 1990). */
  limitWidth: positiveNumber().default(2.962),
  /** Restart the EWMA at the centre (and its limits at their first-run width) after a signal. Default true. */
  restartAfterSignal: z.boolean().default(true),
});
export type EwmaRule = z.output<typeof ewmaRuleSchema>;

export interface EwmaState {
  /** Runs folded in so far. */
  readonly step: number;
  /** EWMA of the standardized values (0 = on target). */
  readonly statistic: number;
}

export const EWMA_START: EwmaState = { step: 0, statistic: 0 };

/** Folds one standardized value into the EWMA (Roberts 1959). O(1). */
export function ewmaStep(state: EwmaState, standardizedValue: number, lambda: number): EwmaState {
  return { step: state.step + 1, statistic: lambda * standardizedValue + (1 - lambda) * state.statistic };
}

/** Half-width of the exact EWMA limit at run i, in SDs of x: L·√(λ/(2−λ)·[1 − (1−λ)^(2i)]) (Lucas & Saccucci 1990). O(1). */
export function ewmaLimitHalfWidth(step: number, lambda: number, limitWidth: number): number {
  return limitWidth * Math.sqrt((lambda / (2 - lambda)) * (1 - (1 - lambda) ** (2 * step)));
}

/** The EWMA after folding the series (restarting after each signal when asked) and the sign of the last signal. O(n). */
function foldSeries(
  rule: EwmaRule,
  context: ObservationContext,
): { state: EwmaState; lastSignalSign: number } | undefined {
  const { baseline, series } = context;
  if (baseline === undefined || series.length === 0) return undefined;
  let state = EWMA_START;
  let lastSignalSign = 0;
  const signalled = (current: EwmaState): boolean =>
    current.step > 0 && Math.abs(current.statistic) > ewmaLimitHalfWidth(current.step, rule.lambda, rule.limitWidth);
  for (const point of series) {
    if (signalled(state)) {
      lastSignalSign = Math.sign(state.statistic);
      if (rule.restartAfterSignal) state = EWMA_START;
    }
    state = ewmaStep(state, (point.value - baseline.mean) / baseline.sd, rule.lambda);
  }
  if (signalled(state)) lastSignalSign = Math.sign(state.statistic);
  return { state, lastSignalSign };
}

export const ewmaKind = defineRuleKind({
  kind: 'ewma',
  schema: ewmaRuleSchema,
  needsBaseline: true,
  describe: (rule) =>
    `EWMA λ = ${rule.lambda}, L = ${rule.limitWidth} (exact time-varying limits${rule.restartAfterSignal ? ', restarting after a signal' : ''})`,
  evaluate(rule, context): RuleFinding[] {
    const { baseline, metric } = context;
    const folded = foldSeries(rule, context);
    if (baseline === undefined || folded === undefined) return [];
    const { state } = folded;
    const halfWidth = ewmaLimitHalfWidth(state.step, rule.lambda, rule.limitWidth);
    if (Math.abs(state.statistic) <= halfWidth) return [];
    const ewmaValue = baseline.mean + state.statistic * baseline.sd;
    const below = state.statistic < 0;
    const limit = baseline.mean + (below ? -halfWidth : halfWidth) * baseline.sd;
    return [
      {
        severity: rule.severity,
        check: 'EWMA',
        values: {
          ewma: ewmaValue,
          lowerLimit: baseline.mean - halfWidth * baseline.sd,
          upperLimit: baseline.mean + halfWidth * baseline.sd,
          mean: baseline.mean,
          sd: baseline.sd,
          runs: state.step,
        },
        message:
          `${metricLabel(metric)} is trending ${below ? 'down' : 'up'}: its running average ${formatMetricValue(metric, ewmaValue)} ` +
          `is ${below ? 'below the lower' : 'above the upper'} limit ${formatMetricValue(metric, limit)} around ${centreName(metric, baseline)} ` +
          `(EWMA λ = ${rule.lambda}, L = ${rule.limitWidth}).`,
      },
    ];
  },
  // Back in control only once the running average is back on the target side of the signal.
  settled(rule, context): boolean {
    const folded = foldSeries(rule, context);
    return folded === undefined || folded.lastSignalSign === 0 || folded.state.statistic * folded.lastSignalSign <= 0;
  },
});
