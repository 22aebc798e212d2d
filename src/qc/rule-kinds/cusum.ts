// Tabular CUSUM, both sides (Page, Biometrika 41, 100, 1954; tabular form as in Montgomery,
// Introduction to Statistical Quality Control): in SD units, S_H = max(0, z − k + S_H),
// S_L = max(0, −z − k + S_L); signal when either exceeds h.
import { z } from 'zod';
import { baseRuleShape, positiveNumber } from '../rule-base.js';
import { defineRuleKind, type ObservationContext, type RuleFinding } from '../rule-kind.js';
import { centreName } from '../messages.js';
import { metricLabel } from '../metrics.js';

export const cusumRuleSchema = z.strictObject({
  ...baseRuleShape,
  kind: z.literal('cusum'),
  /** Reference value k in SDs (half the shift to detect). Default 0.5. */
  referenceSd: z.number({ error: 'expected a number ≥ 0' }).gte(0, { error: 'expected a number ≥ 0' }).default(0.5),
  /** Decision interval h in SDs. Default 5 (in-control ARL ≈ 465 with k = 0.5). */
  decisionSd: positiveNumber().default(5),
  /** Restart both sums at zero after a signal (Montgomery's practice once the cause is dealt with). Default true. */
  restartAfterSignal: z.boolean().default(true),
});
export type CusumRule = z.output<typeof cusumRuleSchema>;

export interface CusumState {
  /** Upper cumulative sum S_H in SDs. */
  readonly upper: number;
  /** Lower cumulative sum S_L in SDs. */
  readonly lower: number;
}

export const CUSUM_START: CusumState = { upper: 0, lower: 0 };

/** Folds one standardized value into the tabular CUSUM (Page 1954). O(1). */
export function cusumStep(state: CusumState, standardizedValue: number, referenceSd: number): CusumState {
  return {
    upper: Math.max(0, standardizedValue - referenceSd + state.upper),
    lower: Math.max(0, -standardizedValue - referenceSd + state.lower),
  };
}

/** The sums after folding the series (restarting after each signal when asked) and the side that signalled last. O(n). */
function foldSeries(
  rule: CusumRule,
  context: ObservationContext,
): { state: CusumState; lastSignal: 'upper' | 'lower' | undefined } | undefined {
  const { baseline, series } = context;
  if (baseline === undefined || series.length === 0) return undefined;
  let state = CUSUM_START;
  let lastSignal: 'upper' | 'lower' | undefined;
  series.forEach((point, index) => {
    if (index > 0 && (state.upper > rule.decisionSd || state.lower > rule.decisionSd)) {
      lastSignal = state.lower > rule.decisionSd ? 'lower' : 'upper';
      if (rule.restartAfterSignal) state = CUSUM_START;
    }
    state = cusumStep(state, (point.value - baseline.mean) / baseline.sd, rule.referenceSd);
  });
  if (state.upper > rule.decisionSd) lastSignal = 'upper';
  if (state.lower > rule.decisionSd) lastSignal = 'lower';
  return { state, lastSignal };
}

export const cusumKind = defineRuleKind({
  kind: 'cusum',
  schema: cusumRuleSchema,
  needsBaseline: true,
  describe: (rule) =>
    `tabular CUSUM k = ${rule.referenceSd} SD, h = ${rule.decisionSd} SD, both sides${rule.restartAfterSignal ? ', restarting after a signal' : ''}`,
  evaluate(rule, context): RuleFinding[] {
    const { baseline, metric } = context;
    const folded = foldSeries(rule, context);
    if (baseline === undefined || folded === undefined) return [];
    const { state } = folded;
    const findings: RuleFinding[] = [];
    const sides = [
      { sum: state.upper, check: 'upper CUSUM', direction: 'up' },
      { sum: state.lower, check: 'lower CUSUM', direction: 'down' },
    ];
    for (const side of sides) {
      if (side.sum <= rule.decisionSd) continue;
      findings.push({
        severity: rule.severity,
        check: side.check,
        values: {
          upperSum: state.upper,
          lowerSum: state.lower,
          decisionSd: rule.decisionSd,
          referenceSd: rule.referenceSd,
          mean: baseline.mean,
          sd: baseline.sd,
        },
        message:
          `${metricLabel(metric)} has shifted ${side.direction} from ${centreName(metric, baseline)}: ` +
          `the ${side.check} is ${side.sum.toFixed(1)} SD, over the limit h = ${rule.decisionSd} SD (CUSUM k = ${rule.referenceSd}).`,
      });
    }
    return findings;
  },
  // Back in control only once the sum of the side that signalled has returned to zero.
  settled(rule, context): boolean {
    const folded = foldSeries(rule, context);
    if (folded?.lastSignal === undefined) return true;
    return folded.lastSignal === 'lower' ? folded.state.lower === 0 : folded.state.upper === 0;
  },
});
