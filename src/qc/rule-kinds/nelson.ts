// Nelson run rules 1–8 for a control chart (Nelson, J. Qual. Technol. 16, 237, 1984): each test
// fires when the pattern it defines ends with the newest point of the series.
import { z } from 'zod';
import { baseRuleShape } from '../rule-base.js';
import { defineRuleKind, type RuleFinding } from '../rule-kind.js';
import { describeDeviation, standardize } from '../messages.js';
import { metricLabel } from '../metrics.js';
import { itemAt } from '../../model/item-at.js';

export const NELSON_TESTS = [1, 2, 3, 4, 5, 6, 7, 8] as const;
export type NelsonTest = (typeof NELSON_TESTS)[number];

export const nelsonRuleSchema = z.strictObject({
  ...baseRuleShape,
  kind: z.literal('nelson'),
  /** Which of the eight tests to apply; default all. */
  tests: z
    .array(
      z.union(
        NELSON_TESTS.map((test) => z.literal(test)),
        { error: 'expected test numbers 1 to 8' },
      ),
    )
    .min(1)
    .default([...NELSON_TESTS]),
});
export type NelsonRule = z.output<typeof nelsonRuleSchema>;

const TEST_WORDING: Record<NelsonTest, string> = {
  1: 'one point beyond 3 SD',
  2: 'nine points in a row on the same side of the mean',
  3: 'six points in a row steadily increasing or decreasing',
  4: 'fourteen points in a row alternating up and down',
  5: 'two of three points in a row beyond 2 SD on the same side',
  6: 'four of five points in a row beyond 1 SD on the same side',
  7: 'fifteen points in a row within 1 SD of the mean',
  8: 'eight points in a row beyond 1 SD, on both sides, none within 1 SD',
};

/** The last n values, or undefined when the series is shorter. */
function tail(values: readonly number[], n: number): readonly number[] | undefined {
  return values.length >= n ? values.slice(values.length - n) : undefined;
}

/** True when `needed` of the last `window` points lie beyond `limit` on the newest point's side. */
function someOfLastBeyond(z: readonly number[], window: number, needed: number, limit: number): boolean {
  const points = tail(z, window);
  const latest = z[z.length - 1];
  if (points === undefined || latest === undefined || Math.abs(latest) <= limit) return false;
  const side = Math.sign(latest);
  return points.filter((value) => value * side > limit).length >= needed;
}

/** Nelson tests (1984) violated by the newest of `standardized` (z-scores, oldest first). O(1) per test. */
export function nelsonViolations(standardized: readonly number[], tests: readonly NelsonTest[]): NelsonTest[] {
  const z = standardized;
  const fired: NelsonTest[] = [];
  const check: Record<NelsonTest, () => boolean> = {
    1: () => Math.abs(z[z.length - 1] ?? 0) > 3,
    2: () => {
      const points = tail(z, 9);
      return points !== undefined && (points.every((v) => v > 0) || points.every((v) => v < 0));
    },
    3: () => {
      const points = tail(z, 6);
      if (points === undefined) return false;
      const steps = points.slice(1).map((v, i) => v - itemAt(points, i));
      return steps.every((d) => d > 0) || steps.every((d) => d < 0);
    },
    4: () => {
      const points = tail(z, 14);
      if (points === undefined) return false;
      const steps = points.slice(1).map((v, i) => Math.sign(v - itemAt(points, i)));
      return steps.every((sign, i) => sign !== 0 && (i === 0 || sign === -itemAt(steps, i - 1)));
    },
    5: () => someOfLastBeyond(z, 3, 2, 2),
    6: () => someOfLastBeyond(z, 5, 4, 1),
    7: () => {
      const points = tail(z, 15);
      return points !== undefined && points.every((v) => Math.abs(v) < 1);
    },
    8: () => {
      const points = tail(z, 8);
      return (
        points !== undefined &&
        points.every((v) => Math.abs(v) > 1) &&
        points.some((v) => v > 0) &&
        points.some((v) => v < 0)
      );
    },
  };
  for (const test of tests) if (check[test]()) fired.push(test);
  return fired;
}

export const nelsonKind = defineRuleKind({
  kind: 'nelson',
  schema: nelsonRuleSchema,
  needsBaseline: true,
  describe: (rule) => `Nelson run rules ${rule.tests.join(', ')}`,
  evaluate(rule, context): RuleFinding[] {
    const { baseline, series, metric } = context;
    const latest = series[series.length - 1];
    if (baseline === undefined || latest === undefined) return [];
    const standardized = series.map((point) => standardize(point.value, baseline));
    return nelsonViolations(standardized, rule.tests).map((test) => ({
      severity: rule.severity,
      check: `Nelson ${test}`,
      values: {
        value: latest.value,
        mean: baseline.mean,
        sd: baseline.sd,
        sdUnits: standardize(latest.value, baseline),
      },
      message: `${describeDeviation(metric, latest.value, baseline)}; ${metricLabel(metric)} shows ${TEST_WORDING[test]} (Nelson ${test}).`,
    }));
  },
});
