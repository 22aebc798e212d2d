// Baselines: the mean and SD a chart judges against — declared in the rule set, stored in the
// ledger (after `rules rebaseline`), or established from the first N in-control runs of a control
// (Levey–Jennings practice: N = 20, runs beyond 3 SD of the provisional mean left out).
import type { ControlDefinition } from './controls.js';
import type { MetricName } from './metrics.js';
import type { EstablishedBaseline, SeriesPoint } from './rule-kind.js';
import { meanOf, sampleStandardDeviation } from './statistics.js';
import { parseIsoToEpochMs } from './time.js';

/** A baseline as the ledger stores it: a start date alone (collect N runs from it) or the computed values. */
export interface BaselineRecord {
  readonly controlId: string;
  readonly metric: MetricName;
  /** The baseline period starts at this ISO time; charts ignore earlier runs. */
  readonly fromIso: string;
  readonly mean?: number | undefined;
  readonly sd?: number | undefined;
  readonly runs?: number | undefined;
  /** Last run used for mean and SD (ISO); charts judge runs after it. */
  readonly throughIso?: string | undefined;
}

export type ResolvedBaseline =
  | {
      readonly status: 'established';
      readonly baseline: EstablishedBaseline;
      readonly chartSeries: readonly SeriesPoint[];
    }
  | {
      readonly status: 'collecting';
      readonly runsSoFar: number;
      readonly runsNeeded: number;
      readonly fromIso?: string | undefined;
    };

/**
 * Mean and sample SD of baseline runs, leaving out runs beyond `excludeBeyondSd` SDs of the
 * provisional mean (one pass; common Levey–Jennings practice). Undefined when fewer than 2 remain
 * or the SD is 0, unless `allowZeroSd` (rules that use only the mean: identical runs still give a
 * mean). O(n).
 */
export function establishBaseline(
  values: readonly number[],
  excludeBeyondSd: number,
  allowZeroSd = false,
): { mean: number; sd: number; runs: number } | undefined {
  if (values.length < 2) return undefined;
  const provisionalMean = meanOf(values);
  const provisionalSd = sampleStandardDeviation(values);
  const kept =
    provisionalSd > 0
      ? values.filter((value) => Math.abs(value - provisionalMean) <= excludeBeyondSd * provisionalSd)
      : [...values];
  if (kept.length < 2) return undefined;
  const sd = sampleStandardDeviation(kept);
  return sd > 0 || allowZeroSd ? { mean: meanOf(kept), sd, runs: kept.length } : undefined;
}

/** The most recent record (by fromIso) for a control and metric. O(records). */
export function latestBaselineRecord(
  records: readonly BaselineRecord[],
  controlId: string,
  metric: MetricName,
): BaselineRecord | undefined {
  let latest: BaselineRecord | undefined;
  let latestMs = -Infinity;
  for (const record of records) {
    if (record.controlId !== controlId || record.metric !== metric) continue;
    const epochMs = parseIsoToEpochMs(record.fromIso) ?? -Infinity;
    if (epochMs >= latestMs) {
      latest = record;
      latestMs = epochMs;
    }
  }
  return latest;
}

/**
 * The baseline for one control metric and the points charts judge (`points` ascending, newest
 * last): declared target → stored values → first N runs since the latest start date.
 * `meanSuffices`: the rule uses only the mean, so a baseline with SD 0 is accepted. O(n).
 */
export function resolveBaseline(
  control: ControlDefinition,
  metric: MetricName,
  points: readonly SeriesPoint[],
  records: readonly BaselineRecord[],
  options: { readonly meanSuffices?: boolean } = {},
): ResolvedBaseline {
  const meanSuffices = options.meanSuffices === true;
  const record = latestBaselineRecord(records, control.id, metric);
  const fromMs = record === undefined ? -Infinity : (parseIsoToEpochMs(record.fromIso) ?? -Infinity);
  const sincePeriodStart = points.filter((point) => point.epochMs >= fromMs);
  const declared = control.targets[metric];
  if (declared !== undefined) {
    return {
      status: 'established',
      baseline: {
        mean: declared.mean,
        sd: declared.sd,
        runs: 0,
        source: 'declared',
        ...(record === undefined ? {} : { fromIso: record.fromIso }),
      },
      chartSeries: sincePeriodStart,
    };
  }
  if (record?.mean !== undefined && record.sd !== undefined && (record.sd > 0 || (meanSuffices && record.sd === 0))) {
    const throughMs = record.throughIso === undefined ? fromMs : (parseIsoToEpochMs(record.throughIso) ?? fromMs);
    return {
      status: 'established',
      baseline: {
        mean: record.mean,
        sd: record.sd,
        runs: record.runs ?? 0,
        source: 'stored',
        fromIso: record.fromIso,
        ...(record.throughIso === undefined ? {} : { throughIso: record.throughIso }),
      },
      chartSeries: points.filter((point) => point.epochMs > throughMs),
    };
  }
  const runsNeeded = control.baselineRuns;
  if (sincePeriodStart.length < runsNeeded) {
    return { status: 'collecting', runsSoFar: sincePeriodStart.length, runsNeeded, fromIso: record?.fromIso };
  }
  const baselineRuns = sincePeriodStart.slice(0, runsNeeded);
  const established = establishBaseline(
    baselineRuns.map((point) => point.value),
    control.baselineExcludeBeyondSd,
    meanSuffices,
  );
  const lastRun = baselineRuns[runsNeeded - 1];
  const firstRun = baselineRuns[0];
  if (established === undefined || lastRun === undefined || firstRun === undefined) {
    return { status: 'collecting', runsSoFar: sincePeriodStart.length, runsNeeded, fromIso: record?.fromIso };
  }
  return {
    status: 'established',
    baseline: { ...established, source: 'history', fromIso: firstRun.acquiredAt, throughIso: lastRun.acquiredAt },
    chartSeries: sincePeriodStart.slice(runsNeeded),
  };
}
