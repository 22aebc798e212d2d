// Recovery detection: a flagged rule + control + metric is back in control when a new observation
// carries the metric and the rule no longer flags it.
import type { ControlObservation } from './metrics.js';
import { formatMetricValue, metricLabel } from './metrics.js';
import { flagKey, type QcFlag, type RecoveryNotice } from './qc-flag.js';
import { INSTRUMENT_SCOPE } from './rule-base.js';

export interface RecoveryInput {
  /** Flags still open (raised earlier and not yet recovered), e.g. from the ledger. */
  readonly activeFlags: readonly QcFlag[];
  /** Flags the new observation raised (evaluateRules output). */
  readonly newFlags: readonly QcFlag[];
  readonly observation: ControlObservation;
  /** Keys of rules that do not fire but have not yet shown recovery (evaluateRuleStates). */
  readonly unsettledKeys?: readonly string[];
}

/** Recovery notices for open flags that the new observation no longer raises (pure). O(active + new). */
export function detectRecoveries(input: RecoveryInput): RecoveryNotice[] {
  const stillFlagged = new Set([...input.newFlags.map(flagKey), ...(input.unsettledKeys ?? [])]);
  const seen = new Set<string>();
  const notices: RecoveryNotice[] = [];
  for (const flag of input.activeFlags) {
    const key = flagKey(flag);
    if (seen.has(key) || stillFlagged.has(key)) continue;
    if (flag.controlId !== INSTRUMENT_SCOPE && flag.controlId !== input.observation.controlId) continue;
    const value = input.observation.metrics[flag.metric];
    if (value === undefined || !Number.isFinite(value)) continue;
    seen.add(key);
    const who = flag.controlId === INSTRUMENT_SCOPE ? 'instrument' : `control ${flag.controlId}`;
    notices.push({
      ruleId: flag.ruleId,
      kind: flag.kind,
      controlId: flag.controlId,
      metric: flag.metric,
      value,
      acquiredAt: input.observation.acquiredAt,
      message: `${metricLabel(flag.metric)} ${formatMetricValue(flag.metric, value)} is back in control for ${who} (rule ${flag.ruleId} no longer fires).`,
    });
  }
  return notices;
}
