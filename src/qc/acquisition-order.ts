// Judging in acquisition order (issue 16.2): a result that arrives late is inserted at its
// acquisition time and every run from there on is judged again; whether an alarm is open follows
// from the newest run that decides it (fired, or judged and settled), never from arrival order.
import { evaluateRuleStates } from './evaluate.js';
import type { BaselineRecord } from './baselines.js';
import type { ControlObservation } from './metrics.js';
import type { QcFlag } from './qc-flag.js';
import type { RuleSet } from './rule-set.js';
import { requireEpochMs } from './time.js';

/** How a rule judged one run: it fired, it is quiet but not yet back in control, or it is back in control. */
export type VerdictStatus = 'fired' | 'unsettled' | 'settled';

/** One rule's verdict on one run (rule|control|metric key), placed by acquisition time. */
export interface RuleVerdict {
  readonly setId: string;
  readonly key: string;
  readonly status: VerdictStatus;
  readonly acquiredAtMs: number;
}

/** The verdicts and flags of one run. */
export interface RunJudgement {
  readonly observation: ControlObservation;
  readonly flags: readonly QcFlag[];
  readonly verdicts: readonly RuleVerdict[];
}

/** Total acquisition order: time, then set id (a re-export at the same time sorts by its id). O(1). */
export function compareAcquisition(
  a: { acquiredAtMs: number; setId: string },
  b: { acquiredAtMs: number; setId: string },
): number {
  return a.acquiredAtMs - b.acquiredAtMs || (a.setId < b.setId ? -1 : a.setId > b.setId ? 1 : 0);
}

/** Acquisition time and set id of an observation, for compareAcquisition. O(1). */
export function acquisitionOf(observation: ControlObservation): { acquiredAtMs: number; setId: string } {
  return {
    acquiredAtMs: requireEpochMs(observation.acquiredAt, `acquiredAt of set ${observation.setId}`),
    setId: observation.setId,
  };
}

/** One run judged against every run acquired before it (pure). O(rules × history). */
export function judgeRun(
  observation: ControlObservation,
  history: readonly ControlObservation[],
  ruleSet: RuleSet,
  baselines: readonly BaselineRecord[],
): RunJudgement {
  const { flags, unsettledKeys, judgedKeys } = evaluateRuleStates({ history, observation, ruleSet, baselines });
  const acquiredAtMs = requireEpochMs(observation.acquiredAt, `acquiredAt of set ${observation.setId}`);
  const fired = new Set(flags.map((flag) => `${flag.ruleId}|${flag.controlId}|${flag.metric}`));
  const unsettled = new Set(unsettledKeys);
  const verdicts = judgedKeys.map((key) => ({
    setId: observation.setId,
    key,
    acquiredAtMs,
    status: fired.has(key) ? ('fired' as const) : unsettled.has(key) ? ('unsettled' as const) : ('settled' as const),
  }));
  return { observation, flags, verdicts };
}

/**
 * Every run acquired at or after `inserted` judged again against the full history (pure): the runs
 * a late result changes. `all` holds every observation, including the inserted one.
 * O(affected × rules × history).
 */
export function judgeFrom(
  inserted: ControlObservation,
  all: readonly ControlObservation[],
  ruleSet: RuleSet,
  baselines: readonly BaselineRecord[],
): RunJudgement[] {
  const from = acquisitionOf(inserted);
  return all
    .filter((observation) => acquisitionOf(observation).acquiredAtMs >= from.acquiredAtMs)
    .sort((a, b) => compareAcquisition(acquisitionOf(a), acquisitionOf(b)))
    .map((observation) => judgeRun(observation, all, ruleSet, baselines));
}

/**
 * Whether each key's alarm is open: yes when the newest deciding verdict (fired or settled, in
 * acquisition order; unsettled runs decide nothing) fired. Returns, per key, the newest settled
 * verdict (undefined when none): flags acquired after it are open. O(verdicts).
 */
export function openStateFromVerdicts(
  verdicts: readonly RuleVerdict[],
): Map<string, { open: boolean; lastSettled?: RuleVerdict; lastDeciding: RuleVerdict }> {
  const state = new Map<string, { open: boolean; lastSettled?: RuleVerdict; lastDeciding: RuleVerdict }>();
  const ordered = [...verdicts].filter((verdict) => verdict.status !== 'unsettled').sort(compareAcquisition);
  for (const verdict of ordered) {
    const previous = state.get(verdict.key);
    const lastSettled = verdict.status === 'settled' ? verdict : previous?.lastSettled;
    state.set(verdict.key, {
      open: verdict.status === 'fired',
      lastDeciding: verdict,
      ...(lastSettled === undefined ? {} : { lastSettled }),
    });
  }
  return state;
}
