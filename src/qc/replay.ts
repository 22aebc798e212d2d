// Replays a history of observations through a rule set in acquisition order (pure): which flags and
// recovery notices would have been raised, and when. Used by `rules simulate` and drift studies.
import type { BaselineRecord } from './baselines.js';
import { evaluateClockRules, evaluateRuleStates } from './evaluate.js';
import type { ControlObservation } from './metrics.js';
import { flagKey, type QcFlag, type RecoveryNotice } from './qc-flag.js';
import { detectRecoveries } from './recovery.js';
import type { RuleSet } from './rule-set.js';
import { requireEpochMs } from './time.js';

export interface ReplayStep {
  readonly observation: ControlObservation;
  readonly flags: readonly QcFlag[];
  readonly recoveries: readonly RecoveryNotice[];
}

export interface ReplayOptions {
  readonly baselines?: readonly BaselineRecord[];
  /** Clock instants (epoch ms) at which to evaluate time rules such as control-missing; default none. */
  readonly clockTicksEpochMs?: readonly number[];
  readonly timeZone?: string;
}

export interface ReplayOutcome {
  readonly steps: readonly ReplayStep[];
  /** Flags from clock rules, at each tick. */
  readonly clockFlags: readonly QcFlag[];
}

/** Observations sorted by acquisition time (stable for equal times). O(n log n). */
export function sortByAcquisition(observations: readonly ControlObservation[]): ControlObservation[] {
  return observations
    .map((observation, index) => ({
      observation,
      index,
      epochMs: requireEpochMs(observation.acquiredAt, `acquiredAt of set ${observation.setId}`),
    }))
    .sort((a, b) => a.epochMs - b.epochMs || a.index - b.index)
    .map((entry) => entry.observation);
}

/** Evaluates each observation against the ones before it, tracking open flags for recoveries. O(n² × rules). */
export function replayObservations(
  observations: readonly ControlObservation[],
  ruleSet: RuleSet,
  options: ReplayOptions = {},
): ReplayOutcome {
  const ordered = sortByAcquisition(observations);
  const open = new Map<string, QcFlag>();
  const steps: ReplayStep[] = [];
  ordered.forEach((observation, index) => {
    const history = ordered.slice(0, index);
    const { flags, unsettledKeys } = evaluateRuleStates({
      history,
      observation,
      ruleSet,
      baselines: options.baselines ?? [],
    });
    const recoveries = detectRecoveries({
      activeFlags: [...open.values()],
      newFlags: flags,
      observation,
      unsettledKeys,
    });
    for (const notice of recoveries) open.delete(flagKey(notice));
    for (const flag of flags) open.set(flagKey(flag), flag);
    steps.push({ observation, flags, recoveries });
  });
  const clockFlags: QcFlag[] = [];
  for (const tick of options.clockTicksEpochMs ?? []) {
    const history = ordered.filter((observation) => requireEpochMs(observation.acquiredAt, 'acquiredAt') <= tick);
    clockFlags.push(
      ...evaluateClockRules({
        history,
        ruleSet,
        now: tick,
        ...(options.timeZone === undefined ? {} : { timeZone: options.timeZone }),
      }),
    );
  }
  return { steps, clockFlags };
}
