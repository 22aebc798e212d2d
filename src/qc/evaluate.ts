// Pure evaluation: (history, new observation, rule set, baselines) → flags; and the clock-driven
// evaluation of time rules (control missing) at a given instant and zone.
import type { BaselineRecord } from './baselines.js';
import { resolveBaseline } from './baselines.js';
import type { ControlObservation, MetricName } from './metrics.js';
import { flagKey, type QcFlag } from './qc-flag.js';
import { INSTRUMENT_SCOPE, isInstrumentScope, scopeJudgesControl } from './rule-base.js';
import type { EstablishedBaseline, RuleFinding, SeriesPoint } from './rule-kind.js';
import { ruleKindOf, ruleNeedsBaseline, type Rule } from './rule-kinds/registry.js';
import type { RuleSet } from './rule-set.js';
import { epochMsToIso, parseIsoToEpochMs, requireEpochMs } from './time.js';

export interface EvaluationInput {
  /** Earlier observations (any order; later ones than `observation` are ignored). */
  readonly history: readonly ControlObservation[];
  readonly observation: ControlObservation;
  readonly ruleSet: RuleSet;
  /** Baseline records from the ledger (start dates and stored values); default none. */
  readonly baselines?: readonly BaselineRecord[];
}

/** The metric series of a scope up to and including the observation, ascending by time. O(n log n). */
export function seriesFor(
  history: readonly ControlObservation[],
  observation: ControlObservation,
  controlId: string,
  metric: MetricName,
): SeriesPoint[] {
  const latestMs = requireEpochMs(observation.acquiredAt, 'observation.acquiredAt');
  const points: SeriesPoint[] = [];
  for (const earlier of history) {
    if (earlier === observation) continue;
    if (controlId !== INSTRUMENT_SCOPE && earlier.controlId !== controlId) continue;
    const value = earlier.metrics[metric];
    const epochMs = parseIsoToEpochMs(earlier.acquiredAt);
    if (value === undefined || !Number.isFinite(value) || epochMs === undefined || epochMs > latestMs) continue;
    if (epochMs === latestMs && earlier.setId === observation.setId && earlier.controlId === observation.controlId)
      continue;
    points.push({ value, acquiredAt: earlier.acquiredAt, epochMs, setId: earlier.setId });
  }
  points.sort((a, b) => a.epochMs - b.epochMs);
  const value = observation.metrics[metric];
  if (value !== undefined)
    points.push({ value, acquiredAt: observation.acquiredAt, epochMs: latestMs, setId: observation.setId });
  return points;
}

/** Turns a kind's findings into flags carrying the judged control (or "instrument"). */
function toFlags(
  rule: Rule,
  controlId: string,
  findings: readonly RuleFinding[],
  acquiredAt: string,
  setId: string,
): QcFlag[] {
  return findings.map((finding) => ({
    ruleId: rule.id,
    kind: rule.kind,
    check: finding.check,
    severity: finding.severity,
    controlId,
    metric: rule.metric,
    values: finding.values,
    message: finding.message,
    acquiredAt,
    setId,
  }));
}

/** The scope id whose series a rule judges for this observation: "instrument", the observation's control, or undefined. */
export function judgedScope(rule: Rule, observation: ControlObservation): string | undefined {
  if (isInstrumentScope(rule.scope)) return INSTRUMENT_SCOPE;
  return scopeJudgesControl(rule.scope, observation.controlId) ? observation.controlId : undefined;
}

/** True when the rule judges this observation (scope matches and the metric is present and finite). */
export function ruleApplies(rule: Rule, observation: ControlObservation): boolean {
  const value = observation.metrics[rule.metric];
  return judgedScope(rule, observation) !== undefined && value !== undefined && Number.isFinite(value);
}

/**
 * Flags raised by the rule set on a new observation given its history and baselines (pure).
 * Chart rules are skipped while their baseline is still being collected. O(rules × history).
 */
export function evaluateRules(input: EvaluationInput): QcFlag[] {
  return evaluateRuleStates(input).flags;
}

export interface RuleStates {
  readonly flags: QcFlag[];
  /** rule|control|metric keys of quiet rules that have not yet shown recovery (see RuleKindDefinition.settled). */
  readonly unsettledKeys: string[];
  /** rule|control|metric keys of every rule that judged this observation (fired, unsettled or settled). */
  readonly judgedKeys: string[];
}

/** Flags plus the keys of rules not yet settled, for recovery detection (pure). O(rules × history). */
export function evaluateRuleStates(input: EvaluationInput): RuleStates {
  const { history, observation, ruleSet } = input;
  const baselines = input.baselines ?? [];
  const flags: QcFlag[] = [];
  const unsettledKeys: string[] = [];
  const judgedKeys: string[] = [];
  const seriesCache = new Map<string, SeriesPoint[]>();
  for (const rule of ruleSet.rules) {
    const kind = ruleKindOf(rule);
    const controlId = judgedScope(rule, observation);
    if (kind.evaluate === undefined || controlId === undefined || !ruleApplies(rule, observation)) continue;
    const cacheKey = `${controlId}|${rule.metric}`;
    let points = seriesCache.get(cacheKey);
    if (points === undefined) {
      points = seriesFor(history, observation, controlId, rule.metric);
      seriesCache.set(cacheKey, points);
    }
    let baseline: EstablishedBaseline | undefined;
    let chartSeries: readonly SeriesPoint[] = points;
    if (ruleNeedsBaseline(rule)) {
      const control = ruleSet.controls.find((candidate) => candidate.id === controlId);
      if (control === undefined) continue;
      const resolved = resolveBaseline(control, rule.metric, points, baselines, {
        meanSuffices: kind.baselineMeanSuffices === true,
      });
      if (resolved.status !== 'established') continue;
      baseline = resolved.baseline;
      chartSeries = resolved.chartSeries;
      if (chartSeries[chartSeries.length - 1]?.acquiredAt !== observation.acquiredAt) continue;
    }
    const context = { controlId, metric: rule.metric, series: chartSeries, baseline };
    const findings = kind.evaluate(rule, context);
    judgedKeys.push(flagKey({ ruleId: rule.id, controlId, metric: rule.metric }));
    flags.push(...toFlags(rule, controlId, findings, observation.acquiredAt, observation.setId));
    if (findings.length === 0 && kind.settled !== undefined && !kind.settled(rule, context)) {
      unsettledKeys.push(flagKey({ ruleId: rule.id, controlId, metric: rule.metric }));
    }
  }
  return { flags, unsettledKeys, judgedKeys };
}

export interface ClockEvaluationInput {
  readonly history: readonly ControlObservation[];
  readonly ruleSet: RuleSet;
  /** The instant to judge, epoch ms or ISO text. */
  readonly now: number | string;
  /** IANA zone or ±HH:MM; overrides the rule set's zone (a rule's own timeZone still wins). */
  readonly timeZone?: string;
}

/** Flags of clock-driven rules (control missing) at instant `now` (pure). O(rules × history). */
export function evaluateClockRules(input: ClockEvaluationInput): QcFlag[] {
  const nowEpochMs = typeof input.now === 'number' ? input.now : requireEpochMs(input.now, 'now');
  const timeZone = input.timeZone ?? input.ruleSet.timeZone;
  const flags: QcFlag[] = [];
  for (const rule of input.ruleSet.rules) {
    const kind = ruleKindOf(rule);
    if (kind.evaluateClock === undefined) continue;
    for (const control of input.ruleSet.controls) {
      if (!scopeJudgesControl(rule.scope, control.id)) continue;
      const history = input.history.filter((observation) => observation.controlId === control.id);
      const findings = kind.evaluateClock(rule, { controlId: control.id, history, nowEpochMs, timeZone });
      flags.push(...toFlags(rule, control.id, findings, epochMsToIso(nowEpochMs), ''));
    }
  }
  return flags;
}
