// Percent change against a rolling median: flags a run whose value differs from the median of the
// preceding runs by more than a set percentage (common practice; robust to a single outlier).
import { z } from 'zod';
import { baseRuleShape, positiveNumber, wholeNumberAtLeast } from '../rule-base.js';
import { defineRuleKind, type RuleFinding } from '../rule-kind.js';
import { formatMetricValue, metricLabel } from '../metrics.js';
import { medianOf } from '../statistics.js';

export const percentChangeRuleSchema = z
  .strictObject({
    ...baseRuleShape,
    kind: z.literal('percent-change'),
    /** Largest allowed |change| against the median, in percent. Required. */
    maxPercent: positiveNumber(),
    /** Preceding runs in the rolling median. Default 7. */
    windowRuns: wholeNumberAtLeast(1).default(7),
    /** Fewest preceding runs before the rule judges at all. Default 3. */
    minRuns: wholeNumberAtLeast(1).default(3),
  })
  .refine((rule) => rule.minRuns <= rule.windowRuns, { error: 'minRuns must not exceed windowRuns', path: ['minRuns'] });
export type PercentChangeRule = z.output<typeof percentChangeRuleSchema>;

export const percentChangeKind = defineRuleKind({
  kind: 'percent-change',
  schema: percentChangeRuleSchema,
  needsBaseline: false,
  describe: (rule) => `change > ${rule.maxPercent} % against the median of the last ${rule.windowRuns} runs (from ${rule.minRuns} runs on)`,
  evaluate(rule, context): RuleFinding[] {
    const { series, metric } = context;
    const latest = series[series.length - 1];
    const preceding = series.slice(Math.max(0, series.length - 1 - rule.windowRuns), -1).map((point) => point.value);
    if (latest === undefined || preceding.length < rule.minRuns) return [];
    const median = medianOf(preceding);
    if (median === 0) return [];
    const changePercent = ((latest.value - median) / Math.abs(median)) * 100;
    if (Math.abs(changePercent) <= rule.maxPercent) return [];
    return [
      {
        severity: rule.severity,
        check: 'percent change',
        values: { value: latest.value, median, changePercent, maxPercent: rule.maxPercent, runs: preceding.length },
        message:
          `${metricLabel(metric)} ${formatMetricValue(metric, latest.value)} is ${Math.abs(changePercent).toFixed(1)} % ` +
          `${changePercent < 0 ? 'below' : 'above'} the median ${formatMetricValue(metric, median)} of the last ${preceding.length} runs ` +
          `(limit ${rule.maxPercent} %).`,
      },
    ];
  },
});
