// The numbers a control chart draws, from the QC history: each run's value in acquisition order, the
// baseline (mean and SD) of each period between rebaselines, the EWMA and tabular CUSUM folded as the
// rules fold them, the flags raised on each run and the runs excluded from the statistics. Pure: no I/O.
import {
  resolveBaseline,
  type BaselineRecord,
  type ControlDefinition,
  type ControlObservation,
  type MetricName,
  type QcFlag,
  type Rule,
  type RuleSet,
} from '../qc/index.js';
import { METRICS, parseIsoToEpochMs, scopeJudgesControl } from '../qc/index.js';
import { cusumStep, CUSUM_START } from '../qc/rule-kinds/cusum.js';
import { ewmaLimitHalfWidth, ewmaStep, EWMA_START } from '../qc/rule-kinds/ewma.js';
import type { SeriesPoint } from '../qc/rule-kind.js';

/** How a run takes part in its chart. */
export type ChartPointStatus = 'baseline' | 'judged' | 'collecting' | 'excluded';

export interface ChartPoint {
  readonly setId: string;
  readonly acquiredAt: string;
  readonly epochMs: number;
  /** The metric value, in the metric's unit. */
  readonly value: number;
  readonly status: ChartPointStatus;
  /** Baseline period (0 = before the first rebaseline). */
  readonly period: number;
  /** (value − mean)/SD of the period's baseline; absent while the baseline is collected or for excluded runs. */
  readonly deviationSd?: number;
  /** EWMA in the metric's unit and its exact limits (judged runs only). */
  readonly ewma?: number;
  readonly ewmaLower?: number;
  readonly ewmaUpper?: number;
  /** Tabular CUSUM sums in SDs (judged runs only). */
  readonly cusumUpperSd?: number;
  readonly cusumLowerSd?: number;
  /** Flags raised on this run: "ruleId check". */
  readonly flags: readonly string[];
}

export interface ChartPeriod {
  readonly index: number;
  /** Start of the period (ISO; absent for the first, open-ended one). */
  readonly fromIso?: string;
  readonly startEpochMs: number;
  readonly endEpochMs: number;
  readonly baseline?: { readonly mean: number; readonly sd: number; readonly runs: number; readonly source: string };
  /** While no baseline is established: runs so far and runs needed. */
  readonly collecting?: { readonly runsSoFar: number; readonly runsNeeded: number };
}

export interface ControlChartData {
  readonly controlId: string;
  readonly metric: MetricName;
  readonly metricLabel: string;
  readonly unit: string;
  readonly points: readonly ChartPoint[];
  readonly periods: readonly ChartPeriod[];
  /** Rebaselines: where a new baseline period starts (drawn as breaks). */
  readonly breaks: readonly { readonly epochMs: number; readonly iso: string }[];
  /** EWMA parameters drawn, and whether they come from a rule of the set or are the defaults. */
  readonly ewma: { readonly lambda: number; readonly limitWidth: number; readonly ruleId?: string };
  readonly cusum: { readonly referenceSd: number; readonly decisionSd: number; readonly ruleId?: string };
}

export interface ChartInput {
  readonly control: ControlDefinition;
  readonly metric: MetricName;
  readonly ruleSet: RuleSet;
  /** Observations of any control (filtered here), any order. */
  readonly observations: readonly ControlObservation[];
  readonly baselines: readonly BaselineRecord[];
  /** Every flag recorded for the control (open or closed). */
  readonly flags: readonly QcFlag[];
  /** Runs excluded from the statistics (set ids). */
  readonly excludedSetIds?: ReadonlySet<string>;
  /** Only runs at or after this instant are returned (statistics still use the whole history). */
  readonly sinceEpochMs?: number;
}

/** Defaults of the ewma and cusum rule kinds (Lucas & Saccucci 1990; Montgomery), used when the set has no such rule. */
const DEFAULT_EWMA = { lambda: 0.2, limitWidth: 2.962, restartAfterSignal: true };
const DEFAULT_CUSUM = { referenceSd: 0.5, decisionSd: 5, restartAfterSignal: true };

function ruleFor<K extends 'ewma' | 'cusum'>(
  rules: readonly Rule[],
  kind: K,
  controlId: string,
  metric: MetricName,
): Extract<Rule, { kind: K }> | undefined {
  return rules.find(
    (rule): rule is Extract<Rule, { kind: K }> =>
      rule.kind === kind && rule.metric === metric && scopeJudgesControl(rule.scope, controlId),
  );
}

/** EWMA (Roberts 1959, exact limits of Lucas & Saccucci 1990) and tabular CUSUM (Page 1954) of judged runs, restarting after a signal as the rules do. O(n). */
function foldCharts(
  judged: readonly SeriesPoint[],
  baseline: { mean: number; sd: number },
  ewma: { lambda: number; limitWidth: number; restartAfterSignal: boolean },
  cusum: { referenceSd: number; decisionSd: number; restartAfterSignal: boolean },
): Map<string, Pick<ChartPoint, 'ewma' | 'ewmaLower' | 'ewmaUpper' | 'cusumUpperSd' | 'cusumLowerSd'>> {
  const out = new Map<string, Pick<ChartPoint, 'ewma' | 'ewmaLower' | 'ewmaUpper' | 'cusumUpperSd' | 'cusumLowerSd'>>();
  let ewmaState = EWMA_START;
  let cusumState = CUSUM_START;
  judged.forEach((point, index) => {
    if (
      ewma.restartAfterSignal &&
      ewmaState.step > 0 &&
      Math.abs(ewmaState.statistic) > ewmaLimitHalfWidth(ewmaState.step, ewma.lambda, ewma.limitWidth)
    )
      ewmaState = EWMA_START;
    if (
      cusum.restartAfterSignal &&
      index > 0 &&
      (cusumState.upper > cusum.decisionSd || cusumState.lower > cusum.decisionSd)
    )
      cusumState = CUSUM_START;
    const standardized = (point.value - baseline.mean) / baseline.sd;
    ewmaState = ewmaStep(ewmaState, standardized, ewma.lambda);
    cusumState = cusumStep(cusumState, standardized, cusum.referenceSd);
    const halfWidth = ewmaLimitHalfWidth(ewmaState.step, ewma.lambda, ewma.limitWidth);
    out.set(`${point.setId}|${point.epochMs}`, {
      ewma: baseline.mean + ewmaState.statistic * baseline.sd,
      ewmaLower: baseline.mean - halfWidth * baseline.sd,
      ewmaUpper: baseline.mean + halfWidth * baseline.sd,
      cusumUpperSd: cusumState.upper,
      cusumLowerSd: cusumState.lower,
    });
  });
  return out;
}

/**
 * Control-chart data for one control and metric (Levey–Jennings chart with EWMA and CUSUM panels;
 * Westgard, Clin. Chem. 27, 493, 1981). Baselines are resolved per period exactly as the rules
 * resolve them (qc/baselines.ts). O(n log n).
 */
export function buildControlChart(input: ChartInput): ControlChartData {
  const { control, metric } = input;
  const excluded = input.excludedSetIds ?? new Set<string>();
  const all: SeriesPoint[] = [];
  for (const observation of input.observations) {
    if (observation.controlId !== control.id) continue;
    const value = observation.metrics[metric];
    const epochMs = parseIsoToEpochMs(observation.acquiredAt);
    if (value === undefined || !Number.isFinite(value) || epochMs === undefined) continue;
    all.push({ value, acquiredAt: observation.acquiredAt, epochMs, setId: observation.setId });
  }
  all.sort((a, b) => a.epochMs - b.epochMs || a.setId.localeCompare(b.setId));
  const records = input.baselines
    .filter(
      (record) =>
        record.controlId === control.id && record.metric === metric && parseIsoToEpochMs(record.fromIso) !== undefined,
    )
    .sort((a, b) => (parseIsoToEpochMs(a.fromIso) ?? 0) - (parseIsoToEpochMs(b.fromIso) ?? 0));
  const starts = [-Infinity, ...records.map((record) => parseIsoToEpochMs(record.fromIso) ?? -Infinity)];
  const ewmaRule = ruleFor(input.ruleSet.rules, 'ewma', control.id, metric);
  const cusumRule = ruleFor(input.ruleSet.rules, 'cusum', control.id, metric);
  const ewma = ewmaRule ?? DEFAULT_EWMA;
  const cusum = cusumRule ?? DEFAULT_CUSUM;
  const flagsBySet = new Map<string, string[]>();
  for (const flag of input.flags) {
    if (flag.metric !== metric || flag.setId === '') continue;
    const list = flagsBySet.get(flag.setId) ?? [];
    const label = `${flag.ruleId} ${flag.check}`;
    if (!list.includes(label)) list.push(label);
    flagsBySet.set(flag.setId, list);
  }
  const periods: ChartPeriod[] = [];
  const points: ChartPoint[] = [];
  starts.forEach((startMs, index) => {
    const endMs = starts[index + 1] ?? Infinity;
    const inPeriod = all.filter((point) => point.epochMs >= startMs && point.epochMs < endMs);
    const used = inPeriod.filter((point) => !excluded.has(point.setId));
    const record = index === 0 ? undefined : records[index - 1];
    const resolved = resolveBaseline(control, metric, used, record === undefined ? [] : [record]);
    const firstMs = inPeriod[0]?.epochMs ?? (Number.isFinite(startMs) ? startMs : 0);
    const lastMs = inPeriod[inPeriod.length - 1]?.epochMs ?? firstMs;
    const period: ChartPeriod = {
      index,
      ...(record === undefined ? {} : { fromIso: record.fromIso }),
      startEpochMs: Number.isFinite(startMs) ? startMs : firstMs,
      endEpochMs: Number.isFinite(endMs) ? endMs : lastMs,
      ...(resolved.status === 'established'
        ? {
            baseline: {
              mean: resolved.baseline.mean,
              sd: resolved.baseline.sd,
              runs: resolved.baseline.runs,
              source: resolved.baseline.source,
            },
          }
        : { collecting: { runsSoFar: resolved.runsSoFar, runsNeeded: resolved.runsNeeded } }),
    };
    periods.push(period);
    const judgedKeys = new Set(
      resolved.status === 'established' ? resolved.chartSeries.map((point) => `${point.setId}|${point.epochMs}`) : [],
    );
    const folded =
      resolved.status === 'established' ? foldCharts(resolved.chartSeries, resolved.baseline, ewma, cusum) : new Map();
    for (const point of inPeriod) {
      const key = `${point.setId}|${point.epochMs}`;
      const status: ChartPointStatus = excluded.has(point.setId)
        ? 'excluded'
        : resolved.status !== 'established'
          ? 'collecting'
          : judgedKeys.has(key)
            ? 'judged'
            : 'baseline';
      const deviation =
        resolved.status === 'established' && status !== 'excluded'
          ? (point.value - resolved.baseline.mean) / resolved.baseline.sd
          : undefined;
      points.push({
        setId: point.setId,
        acquiredAt: point.acquiredAt,
        epochMs: point.epochMs,
        value: point.value,
        status,
        period: index,
        ...(deviation === undefined ? {} : { deviationSd: deviation }),
        ...(folded.get(key) ?? {}),
        flags: flagsBySet.get(point.setId) ?? [],
      });
    }
  });
  const since = input.sinceEpochMs ?? -Infinity;
  return {
    controlId: control.id,
    metric,
    metricLabel: METRICS[metric].label,
    unit: METRICS[metric].unit,
    points: points.filter((point) => point.epochMs >= since),
    periods: periods.filter((period) => period.endEpochMs >= since),
    breaks: records
      .map((record) => ({ epochMs: parseIsoToEpochMs(record.fromIso) ?? 0, iso: record.fromIso }))
      .filter((b) => b.epochMs >= since),
    ewma: {
      lambda: ewma.lambda,
      limitWidth: ewma.limitWidth,
      ...(ewmaRule === undefined ? {} : { ruleId: ewmaRule.id }),
    },
    cusum: {
      referenceSd: cusum.referenceSd,
      decisionSd: cusum.decisionSd,
      ...(cusumRule === undefined ? {} : { ruleId: cusumRule.id }),
    },
  };
}

/** The metrics a control has values for, in the METRICS table's order. */
export function metricsOfControl(observations: readonly ControlObservation[], controlId: string): MetricName[] {
  const present = new Set<string>();
  for (const observation of observations)
    if (observation.controlId === controlId) for (const name of Object.keys(observation.metrics)) present.add(name);
  return (Object.keys(METRICS) as MetricName[]).filter((name) => present.has(name));
}
