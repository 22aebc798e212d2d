// Public entry of the QC rules engine (pure core): metrics, rule sets, evaluation, recovery, replay.
export {
  METRICS,
  METRIC_NAMES,
  formatMetricValue,
  metricLabel,
  type ControlObservation,
  type MetricName,
} from './metrics.js';
export {
  SEVERITIES,
  INSTRUMENT_SCOPE,
  severityRank,
  describeScope,
  isInstrumentScope,
  namedControls,
  scopeJudgesControl,
  type Severity,
  type RuleScope,
} from './rule-base.js';
export type { QcFlag, RecoveryNotice } from './qc-flag.js';
export { flagKey } from './qc-flag.js';
export {
  parseRuleSet,
  formatConfigPath,
  rulesJudgingControl,
  ruleSetWarnings,
  withControls,
  describeRuleScope,
  type RuleSet,
} from './rule-set.js';
export {
  RULE_KINDS,
  RULE_KIND_NAMES,
  ruleKindOf,
  ruleNeedsBaseline,
  type Rule,
  type RuleKindName,
} from './rule-kinds/registry.js';
export {
  DEFAULT_BASELINE_RUNS,
  findControl,
  isControlMatch,
  selectsMeasurement,
  controlSchema,
  type ControlDefinition,
} from './controls.js';
export {
  establishBaseline,
  resolveBaseline,
  latestBaselineRecord,
  type BaselineRecord,
  type ResolvedBaseline,
} from './baselines.js';
export {
  evaluateRules,
  evaluateRuleStates,
  evaluateClockRules,
  seriesFor,
  type EvaluationInput,
  type ClockEvaluationInput,
  type RuleStates,
} from './evaluate.js';
export { detectRecoveries, type RecoveryInput } from './recovery.js';
export { replayObservations, sortByAcquisition, type ReplayOutcome, type ReplayStep } from './replay.js';
export { createSeededRandom, type SeededRandom } from './seeded-random.js';
export {
  parseIsoToEpochMs,
  epochMsToIso,
  localParts,
  isValidTimeZone,
  zonedTimeToEpochMs,
  parseClockTime,
} from './time.js';
export { judgeResult, observationFromResult, type ResultJudgement } from './observation.js';
export {
  acquisitionOf,
  compareAcquisition,
  judgeFrom,
  judgeRun,
  openStateFromVerdicts,
  type RuleVerdict,
  type RunJudgement,
  type VerdictStatus,
} from './acquisition-order.js';
