// Absolute tolerance: the metric must stay within target ± tolerance and/or [min, max], in the
// metric's own unit (common practice for acceptance limits; no chart statistics).
import { z } from 'zod';
import { baseRuleShape, positiveNumber } from '../rule-base.js';
import { defineRuleKind, type RuleFinding } from '../rule-kind.js';
import { formatMetricValue, metricLabel } from '../metrics.js';

export const toleranceRuleSchema = z
  .strictObject({
    ...baseRuleShape,
    kind: z.literal('tolerance'),
    /** Centre of the tolerance band, in the metric's unit. */
    target: z.number({ error: 'expected a number' }).optional(),
    /** Allowed deviation either side of `target`, in the metric's unit. */
    plusMinus: positiveNumber().optional(),
    /** Lowest acceptable value, in the metric's unit. */
    min: z.number({ error: 'expected a number' }).optional(),
    /** Highest acceptable value, in the metric's unit. */
    max: z.number({ error: 'expected a number' }).optional(),
  })
  .refine((rule) => (rule.target === undefined) === (rule.plusMinus === undefined), {
    error: 'give target and plusMinus together',
    path: ['plusMinus'],
  })
  .refine((rule) => rule.target !== undefined || rule.min !== undefined || rule.max !== undefined, {
    error: 'give target with plusMinus, or min and/or max',
    path: ['kind'],
  });
export type ToleranceRule = z.output<typeof toleranceRuleSchema>;

/** The acceptance interval [low, high] of a tolerance rule (the intersection of both forms). */
export function toleranceBounds(rule: ToleranceRule): { low: number; high: number } {
  let low = rule.min ?? -Infinity;
  let high = rule.max ?? Infinity;
  if (rule.target !== undefined && rule.plusMinus !== undefined) {
    low = Math.max(low, rule.target - rule.plusMinus);
    high = Math.min(high, rule.target + rule.plusMinus);
  }
  return { low, high };
}

/** Text of the band: "0.925 ± 0.030" or "between 0.880 and 0.960". */
function bandText(rule: ToleranceRule): string {
  const { metric } = rule;
  if (rule.target !== undefined && rule.plusMinus !== undefined && rule.min === undefined && rule.max === undefined) {
    return `${formatMetricValue(metric, rule.target)} ± ${formatMetricValue(metric, rule.plusMinus)}`;
  }
  const { low, high } = toleranceBounds(rule);
  if (low === -Infinity) return `at most ${formatMetricValue(metric, high)}`;
  if (high === Infinity) return `at least ${formatMetricValue(metric, low)}`;
  return `between ${formatMetricValue(metric, low)} and ${formatMetricValue(metric, high)}`;
}

export const toleranceKind = defineRuleKind({
  kind: 'tolerance',
  schema: toleranceRuleSchema,
  needsBaseline: false,
  describe: (rule) => `absolute tolerance: ${bandText(rule)}`,
  evaluate(rule, context): RuleFinding[] {
    const latest = context.series[context.series.length - 1];
    if (latest === undefined) return [];
    const { low, high } = toleranceBounds(rule);
    if (latest.value >= low && latest.value <= high) return [];
    const values: Record<string, number> = { value: latest.value };
    if (low !== -Infinity) values['low'] = low;
    if (high !== Infinity) values['high'] = high;
    return [
      {
        severity: rule.severity,
        check: 'tolerance',
        values,
        message: `${metricLabel(rule.metric)} ${formatMetricValue(rule.metric, latest.value)} is outside the tolerance (${bandText(rule)}).`,
      },
    ];
  },
});
