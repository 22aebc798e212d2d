// Percent change of the newest run against a reference: the control's baseline mean (or declared
// target), or the median of the preceding runs (common practice; robust to a single outlier, but it
// follows a slow drift, so the shipped rules judge against the baseline).
import { z } from 'zod';
import { baseRuleShape, positiveNumber, wholeNumberAtLeast } from '../rule-base.js';
import { defineRuleKind, type RuleFinding } from '../rule-kind.js';
import { formatMetricValue, metricLabel } from '../metrics.js';
import { medianOf } from '../statistics.js';

/** What a percent-change rule compares with: the baseline mean (or declared target), or a rolling median. */
export const PERCENT_CHANGE_REFERENCES = ['median', 'baseline'] as const;

export const percentChangeRuleSchema = z
  .strictObject({
    ...baseRuleShape,
    kind: z.literal('percent-change'),
    /** Largest allowed |change| against the reference, in percent. Required. */
    maxPercent: positiveNumber(),
    /**
     * `baseline`: the control's baseline mean (declared target, stored baseline or first N runs; an SD
     * of 0 is accepted, e.g. a peak read on a 1 nm grid). `median`: the median of the preceding
     * `windowRuns` runs, which follows a slow drift. Default median.
     */
    against: z.enum(PERCENT_CHANGE_REFERENCES, { error: 'expected median or baseline' }).default('median'),
    /** Preceding runs in the rolling median (against: median). Default 7. */
    windowRuns: wholeNumberAtLeast(1).default(7),
    /** Fewest preceding runs before the rule judges at all (against: median). Default 3. */
    minRuns: wholeNumberAtLeast(1).default(3),
  })
  .refine((rule) => rule.minRuns <= rule.windowRuns, {
    error: 'minRuns must not exceed windowRuns',
    path: ['minRuns'],
  });
export type PercentChangeRule = z.output<typeof percentChangeRuleSchema>;

export const percentChangeKind = defineRuleKind({
  kind: 'percent-change',
  schema: percentChangeRuleSchema,
  needsBaseline: (rule) => rule.against === 'baseline',
  baselineMeanSuffices: true,
  describe: (rule) =>
    rule.against === 'baseline'
      ? `change > ${rule.maxPercent} % against the baseline mean (or declared target)`
      : `change > ${rule.maxPercent} % against the median of the last ${rule.windowRuns} runs (from ${rule.minRuns} runs on)`,
  evaluate(rule, context): RuleFinding[] {
    const { series, metric, baseline } = context;
    const latest = series[series.length - 1];
    if (latest === undefined) return [];
    let reference: number;
    let runs: number;
    if (rule.against === 'baseline') {
      if (baseline === undefined) return [];
      reference = baseline.mean;
      runs = baseline.runs;
    } else {
      const preceding = series.slice(Math.max(0, series.length - 1 - rule.windowRuns), -1).map((point) => point.value);
      if (preceding.length < rule.minRuns) return [];
      reference = medianOf(preceding);
      runs = preceding.length;
    }
    if (reference === 0) return [];
    const changePercent = ((latest.value - reference) / Math.abs(reference)) * 100;
    if (Math.abs(changePercent) <= rule.maxPercent) return [];
    const direction = changePercent < 0 ? 'below' : 'above';
    const against =
      rule.against === 'baseline'
        ? `the ${baseline?.source === 'declared' ? 'target' : 'baseline'} ${formatMetricValue(metric, reference)}`
        : `the median ${formatMetricValue(metric, reference)} of the last ${runs} runs`;
    return [
      {
        severity: rule.severity,
        check: 'percent change',
        values: {
          value: latest.value,
          ...(rule.against === 'baseline' ? { mean: reference } : { median: reference }),
          changePercent,
          maxPercent: rule.maxPercent,
          runs,
        },
        message: `${metricLabel(metric)} ${formatMetricValue(metric, latest.value)} is ${Math.abs(changePercent).toFixed(1)} % ${direction} ${against} (limit ${rule.maxPercent} %).`,
      },
    ];
  },
});
