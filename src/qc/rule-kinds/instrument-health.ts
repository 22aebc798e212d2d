// Instrument-health thresholds: IRF width, water Raman SNR and peak error, count rate relative to
// the repetition rate (pile-up), fit χ² … against a fixed limit, optionally only after N runs in a
// row breach it so one noisy run does not page anyone (common practice).
import { z } from 'zod';
import { baseRuleShape, wholeNumberAtLeast } from '../rule-base.js';
import { defineRuleKind, type RuleFinding } from '../rule-kind.js';
import { formatMetricValue, metricLabel } from '../metrics.js';

export const instrumentHealthRuleSchema = z
  .strictObject({
    ...baseRuleShape,
    kind: z.literal('instrument-health'),
    /** Breach when the value is above this, in the metric's unit. */
    above: z.number({ error: 'expected a number' }).optional(),
    /** Breach when the value is below this, in the metric's unit. */
    below: z.number({ error: 'expected a number' }).optional(),
    /** Runs in a row that must breach before the rule fires. Default 1. */
    consecutiveRuns: wholeNumberAtLeast(1).default(1),
  })
  .refine((rule) => rule.above !== undefined || rule.below !== undefined, {
    error: 'give a threshold: above and/or below',
    path: ['above'],
  });
export type InstrumentHealthRule = z.output<typeof instrumentHealthRuleSchema>;

/** True when `value` breaches the rule's threshold(s). */
function breaches(rule: InstrumentHealthRule, value: number): boolean {
  return (rule.above !== undefined && value > rule.above) || (rule.below !== undefined && value < rule.below);
}

export const instrumentHealthKind = defineRuleKind({
  kind: 'instrument-health',
  schema: instrumentHealthRuleSchema,
  needsBaseline: false,
  describe: (rule) => {
    const parts = [];
    if (rule.above !== undefined) parts.push(`above ${formatMetricValue(rule.metric, rule.above)}`);
    if (rule.below !== undefined) parts.push(`below ${formatMetricValue(rule.metric, rule.below)}`);
    return `instrument health: ${parts.join(' or ')}${rule.consecutiveRuns > 1 ? ` for ${rule.consecutiveRuns} runs in a row` : ''}`;
  },
  evaluate(rule, context): RuleFinding[] {
    const { series, metric } = context;
    const recent = series.slice(-rule.consecutiveRuns);
    const latest = series[series.length - 1];
    if (latest === undefined || recent.length < rule.consecutiveRuns || !recent.every((p) => breaches(rule, p.value)))
      return [];
    const isHigh = rule.above !== undefined && latest.value > rule.above;
    const limit = (isHigh ? rule.above : rule.below) ?? 0;
    const runsText = rule.consecutiveRuns > 1 ? ` for ${rule.consecutiveRuns} runs in a row` : '';
    return [
      {
        severity: rule.severity,
        check: 'instrument health',
        values: { value: latest.value, limit, consecutiveRuns: rule.consecutiveRuns },
        message: `${metricLabel(metric)} ${formatMetricValue(metric, latest.value)} is ${isHigh ? 'above' : 'below'} the limit ${formatMetricValue(metric, limit)}${runsText}.`,
      },
    ];
  },
});
