// Gathers what control charts draw from the ledger: QC observations, baseline records and every flag
// of each control, for the controls of a rule set (the caller loads the rule set).
import { type ControlDefinition, type MetricName, type RuleSet, INSTRUMENT_SCOPE } from '../qc/index.js';
import { baselineRecords, observationHistory } from '../store/qc-store.js';
import { excludedSetIds } from '../store/qc-actions-store.js';
import { flagsOfControls } from '../store/report-queries.js';
import type { Ledger } from '../store/ledger.js';
import { buildControlChart, metricsOfControl, type ControlChartData } from './chart-series.js';

export interface ChartSelection {
  /** One control id; all of the rule set's controls when absent. */
  readonly controlId?: string;
  /** One metric; every metric the control has values for when absent. */
  readonly metric?: MetricName;
  /** Runs at or after this instant are drawn (statistics use the whole history). */
  readonly sinceEpochMs?: number;
  /** Runs excluded from the statistics (set ids). Default: those excluded by `driftlight rules exclude` (qc_actions). */
  readonly excludedSetIds?: ReadonlySet<string>;
}

/** The controls a selection names; throws RangeError naming the known ids when the id is unknown. */
export function selectControls(ruleSet: RuleSet, controlId?: string): ControlDefinition[] {
  if (controlId === undefined) return [...ruleSet.controls];
  const control = ruleSet.controls.find((candidate) => candidate.id === controlId);
  if (control === undefined) {
    const known = ruleSet.controls.map((candidate) => candidate.id);
    throw new RangeError(
      `no control "${controlId}" in the rule set or config (known: ${known.length === 0 ? 'none' : known.join(', ')})`,
    );
  }
  return [control];
}

/** Chart data for each selected control and metric, read from the ledger. O(history × charts). */
export function controlChartsFromLedger(
  ledger: Ledger,
  ruleSet: RuleSet,
  selection: ChartSelection = {},
): ControlChartData[] {
  const controls = selectControls(ruleSet, selection.controlId).filter((control) => control.id !== INSTRUMENT_SCOPE);
  const ids = controls.map((control) => control.id);
  const observations = observationHistory(ledger, ids);
  const baselines = baselineRecords(ledger);
  const flags = flagsOfControls(ledger, ids);
  const excluded = selection.excludedSetIds ?? excludedSetIds(ledger);
  const charts: ControlChartData[] = [];
  for (const control of controls) {
    const metrics = selection.metric === undefined ? metricsOfControl(observations, control.id) : [selection.metric];
    for (const metric of metrics) {
      charts.push(
        buildControlChart({
          control,
          metric,
          ruleSet,
          observations,
          baselines,
          flags: flags.filter((flag) => flag.controlId === control.id),
          excludedSetIds: excluded,
          ...(selection.sinceEpochMs === undefined ? {} : { sinceEpochMs: selection.sinceEpochMs }),
        }),
      );
    }
  }
  return charts;
}
