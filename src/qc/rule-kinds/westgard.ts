// Westgard multirule: 1-2s warning; rejection on 1-3s, 2-2s, R-4s, 4-1s and 10-x, as defined by
// Westgard, Barry, Hunt & Groth, Clin. Chem. 27, 493 (1981). Judges the newest point of one
// control's metric series against its mean and SD; a rule fires only on a pattern that ends with it.
import { z } from 'zod';
import { baseRuleShape, SEVERITIES } from '../rule-base.js';
import { defineRuleKind, type RuleFinding } from '../rule-kind.js';
import { describeDeviation, standardize } from '../messages.js';
import { metricLabel } from '../metrics.js';
import { itemAt } from '../../model/item-at.js';

export const WESTGARD_CHECKS = ['1-2s', '1-3s', '2-2s', 'R-4s', '4-1s', '10-x'] as const;
export type WestgardCheck = (typeof WESTGARD_CHECKS)[number];

export const westgardRuleSchema = z.strictObject({
  ...baseRuleShape,
  kind: z.literal('westgard'),
  /** Which checks to apply; default all six. */
  checks: z
    .array(z.enum(WESTGARD_CHECKS, { error: `expected one of ${WESTGARD_CHECKS.join(', ')}` }))
    .min(1)
    .default([...WESTGARD_CHECKS]),
  /** Severity of a 1-2s warning (the rule's `severity` applies to the rejection checks). Default warning. */
  warningSeverity: z.enum(SEVERITIES).default('warning'),
  /** within-run (1981 definition: two results of the same run) or consecutive (the last two runs). Default within-run. */
  rangeScope: z.enum(['within-run', 'consecutive']).default('within-run'),
  /** true: apply rejection checks only when 1-2s is exceeded, as in the 1981 flow chart. Default false. */
  warningGate: z.boolean().default(false),
});
export type WestgardRule = z.output<typeof westgardRuleSchema>;

export interface WestgardOptions {
  readonly checks: readonly WestgardCheck[];
  readonly rangeScope: 'within-run' | 'consecutive';
  readonly warningGate: boolean;
}

/**
 * Westgard checks violated by the newest of `standardized` (z = (x − mean)/SD, oldest first);
 * `sameRun` are the z of other results of the newest point's run. 1-2s is reported only when no
 * rejection check fires (Westgard et al., Clin. Chem. 27, 493, 1981). O(1) per check.
 */
export function westgardViolations(
  standardized: readonly number[],
  sameRun: readonly number[],
  options: WestgardOptions,
): WestgardCheck[] {
  const count = standardized.length;
  if (count === 0) return [];
  const latest = itemAt(standardized, count - 1);
  const enabled = new Set(options.checks);
  const warning = Math.abs(latest) > 2;
  if (options.warningGate && !warning) return [];
  const lastN = (n: number): readonly number[] | undefined => (count >= n ? standardized.slice(count - n) : undefined);
  const allBeyond = (values: readonly number[] | undefined, limit: number): boolean =>
    values !== undefined && (values.every((z) => z > limit) || values.every((z) => z < -limit));
  const rejections: WestgardCheck[] = [];
  // 1-3s: one result beyond mean ± 3 SD.
  if (enabled.has('1-3s') && Math.abs(latest) > 3) rejections.push('1-3s');
  // 2-2s: two consecutive results beyond the same 2 SD limit.
  if (enabled.has('2-2s') && allBeyond(lastN(2), 2)) rejections.push('2-2s');
  // R-4s: one result beyond +2 SD and another beyond −2 SD (within the run, or in consecutive runs).
  if (enabled.has('R-4s')) {
    const partners =
      options.rangeScope === 'within-run' ? sameRun : count >= 2 ? [itemAt(standardized, count - 2)] : [];
    if ((latest > 2 && partners.some((z) => z < -2)) || (latest < -2 && partners.some((z) => z > 2)))
      rejections.push('R-4s');
  }
  // 4-1s: four consecutive results beyond the same 1 SD limit.
  if (enabled.has('4-1s') && allBeyond(lastN(4), 1)) rejections.push('4-1s');
  // 10-x: ten consecutive results on the same side of the mean.
  if (enabled.has('10-x') && allBeyond(lastN(10), 0)) rejections.push('10-x');
  if (rejections.length > 0) return rejections;
  return enabled.has('1-2s') && warning ? ['1-2s'] : [];
}

const CHECK_WORDING: Record<WestgardCheck, string> = {
  '1-2s': 'a warning: beyond 2 SD',
  '1-3s': 'beyond 3 SD',
  '2-2s': 'the second run in a row beyond the same 2 SD limit',
  'R-4s': 'the range between results exceeds 4 SD (one beyond +2 SD, one beyond −2 SD)',
  '4-1s': 'the fourth run in a row beyond the same 1 SD limit',
  '10-x': 'the tenth run in a row on the same side of the mean',
};

export const westgardKind = defineRuleKind({
  kind: 'westgard',
  schema: westgardRuleSchema,
  needsBaseline: true,
  describe: (rule) =>
    `Westgard multirule ${rule.checks.join(', ')} (R-4s ${rule.rangeScope}${rule.warningGate ? ', gated by 1-2s' : ''})`,
  evaluate(rule, context): RuleFinding[] {
    const { baseline, series, metric } = context;
    const latest = series[series.length - 1];
    if (baseline === undefined || latest === undefined) return [];
    const standardized = series.map((point) => standardize(point.value, baseline));
    const sameRun = series
      .slice(0, -1)
      .filter((point) => point.setId === latest.setId)
      .map((point) => standardize(point.value, baseline));
    return westgardViolations(standardized, sameRun, rule).map((check) => ({
      severity: check === '1-2s' ? rule.warningSeverity : rule.severity,
      check,
      values: {
        value: latest.value,
        mean: baseline.mean,
        sd: baseline.sd,
        sdUnits: standardize(latest.value, baseline),
      },
      message:
        check === '1-3s' || check === '1-2s'
          ? `${describeDeviation(metric, latest.value, baseline)} (${check}).`
          : `${describeDeviation(metric, latest.value, baseline)}; ${metricLabel(metric)} is ${CHECK_WORDING[check]} (${check}).`,
    }));
  },
});
