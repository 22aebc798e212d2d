// The QC result stage: for a control (or instrument-check) result, evaluates the rule set against
// the ledger's history and baselines, adds the flags to result.qc.flags and records observation and
// flags in the ledger; afterCommit hands flags and recovery notices to the alert dispatcher
// (fire-and-forget). The effective rule set comes from qc-rule-set.ts.
import type { AnalysisResult, QcFlag as ResultQcFlag } from '../analysis/result.js';
import type { DriftlightConfig } from '../config/resolve.js';
import {
  createAlertDispatcher,
  createChannels,
  type AlertDispatcher,
  type AlertLogger,
  type SecretSource,
} from '../output/alerts/index.js';
import {
  detectRecoveries,
  evaluateClockRules,
  judgeFrom,
  flagKey,
  INSTRUMENT_SCOPE,
  judgeResult,
  type QcFlag,
  type RecoveryNotice,
  type RuleSet,
} from '../qc/index.js';
import type { Ledger } from '../store/ledger.js';
import { excludedSetIds } from '../store/qc-actions-store.js';
import {
  closeClockFlagsCoveredBy,
  flagSignaturesOfSets,
  reconcileOpenFlags,
  replaceVerdictsOfSet,
  verdictKeysOfScopes,
} from '../store/qc-order-store.js';
import { ledgerAlertOutbox } from '../store/alert-outbox.js';
import {
  baselineRecords,
  ledgerAlertState,
  ledgerDeliveryRecorder,
  observationHistory,
  openFlags,
  recordFlags,
  recordObservation,
  replaceFlagsOfSet,
} from '../store/qc-store.js';
import { effectiveRuleSet } from './qc-rule-set.js';
import type { ResultStage, ResultStageContext } from './result-stage.js';

export {
  controlsFromConfig,
  defaultRuleSetFile,
  effectiveRuleSet,
  loadRuleSetFile,
  withConfigControls,
} from './qc-rule-set.js';

/** A rules-engine flag in the result's qc.flags form (same severities: info, warning, critical). */
export function toResultFlag(flag: QcFlag): ResultQcFlag {
  const value = flag.values['value'];
  return {
    rule: `${flag.ruleId}:${flag.check}`,
    severity: flag.severity,
    message: flag.message,
    quantity: flag.metric,
    ...(value === undefined ? {} : { value }),
  };
}

export interface QcStageOptions {
  readonly ruleSet: RuleSet;
  /** Builds the dispatcher for a ledger (state and delivery records live in that ledger); none = no alerts. */
  readonly dispatcherFor?: (ledger: Ledger) => AlertDispatcher;
}

export interface QcStage extends ResultStage {
  /** Evaluates clock rules (control missing) at `now`, records and dispatches their flags; the caller schedules it. */
  checkClock(ledger: Ledger, now: Date): QcFlag[];
  /** Resolves when queued alert deliveries have finished (call before closing the ledger at shutdown). */
  idle(): Promise<void>;
}

/** Creates the QC stage over a rule set and an optional alert dispatcher factory. */
export function createQcStage(options: QcStageOptions): QcStage {
  const { ruleSet } = options;
  const pending = new Map<string, { flags: QcFlag[]; recoveries: RecoveryNotice[] }>();
  /** Results already written whose flags a later-judged (earlier-acquired) result changed, by set id (issue 16). */
  const revisions = new Map<string, { qcFlags: ResultQcFlag[]; reason: string }>();
  const dispatchers = new Map<Ledger, AlertDispatcher>();
  const dispatcher = (ledger: Ledger): AlertDispatcher | undefined => {
    if (options.dispatcherFor === undefined) return undefined;
    let existing = dispatchers.get(ledger);
    if (existing === undefined) {
      existing = options.dispatcherFor(ledger);
      dispatchers.set(ledger, existing);
      existing.retryDue?.(); // deliveries a previous run left in the outbox
    }
    return existing;
  };
  return {
    name: 'qc-rules',
    apply(result: AnalysisResult, context: ResultStageContext): AnalysisResult {
      // Which control (or the instrument) this result is a run of, and for a file holding several
      // measurements whether it is the one that control judges (issue 18.3): written into qc.judgement.
      const { observation, judgement } = judgeResult(result, ruleSet.controls);
      if (judgement === undefined) return result;
      if (observation === undefined) return { ...result, qc: { ...result.qc, judgement } };
      const { ledger } = context;
      const nowIso = context.now.toISOString();
      const scopes = [observation.controlId, INSTRUMENT_SCOPE];
      let outcome: { flags: QcFlag[]; recoveries: RecoveryNotice[]; ownFlags: QcFlag[] } = {
        flags: [],
        recoveries: [],
        ownFlags: [],
      };
      ledger.transaction(() => {
        // Issue 16.2: insert the run at its acquisition time, judge it and every later run again, and
        // derive open alarms from the newest deciding verdicts, so arrival order changes nothing.
        const openBefore = openFlags(ledger, scopes);
        recordObservation(ledger, observation);
        // Runs excluded by `rules exclude` (a known bad cuvette) leave the baseline and the charts (issue 16.7).
        const excluded = excludedSetIds(ledger);
        const all = observationHistory(ledger).filter(
          (run) => !excluded.has(run.setId) || run.setId === observation.setId,
        );
        const judged = judgeFrom(observation, all, ruleSet, baselineRecords(ledger));
        const known = flagSignaturesOfSets(
          ledger,
          judged.map((run) => run.observation.setId),
        );
        for (const run of judged) {
          replaceFlagsOfSet(ledger, run.observation.setId, run.flags);
          replaceVerdictsOfSet(ledger, run.observation.setId, run.verdicts);
        }
        const keys = [...new Set([...verdictKeysOfScopes(ledger, scopes), ...openBefore.map(flagKey)])];
        const { closed } = reconcileOpenFlags(ledger, keys, nowIso);
        const clockClosed = closeClockFlagsCoveredBy(
          ledger,
          observation.controlId,
          observation.acquiredAt,
          ruleSet.timeZone,
          nowIso,
        );
        const openAfter = new Set(openFlags(ledger, scopes).map(flagKey));
        // Alert only flags that are new and still open (a late run's flag already superseded is history).
        const fresh = judged.flatMap((run) =>
          run.flags.filter(
            (flag) => openAfter.has(flagKey(flag)) && !known.has(`${flag.setId}|${flagKey(flag)}|${flag.check}`),
          ),
        );
        // "Back in control" only when this run is the newest of its scope and itself decides it.
        const newest = judged[judged.length - 1]?.observation.setId === observation.setId;
        const ownVerdicts = judged.find((run) => run.observation.setId === observation.setId)?.verdicts ?? [];
        const settledHere = new Set(
          ownVerdicts.filter((verdict) => verdict.status === 'settled').map((verdict) => verdict.key),
        );
        const recoveredKeys = new Set([...closed.filter((key) => newest && settledHere.has(key)), ...clockClosed]);
        const recoveries = detectRecoveries({
          activeFlags: openBefore.filter((flag) => recoveredKeys.has(flagKey(flag))),
          newFlags: [],
          observation,
        });
        const ownFlags = judged.find((run) => run.observation.setId === observation.setId)?.flags ?? [];
        outcome = { flags: fresh, recoveries, ownFlags: [...ownFlags] };
        // Later runs whose verdict this result changed: their result files are rewritten (history kept).
        revisions.delete(observation.setId);
        for (const run of judged) {
          const setId = run.observation.setId;
          if (setId === observation.setId) continue;
          const before = [...known].filter((signature) => signature.startsWith(`${setId}|`)).sort();
          const after = run.flags.map((flag) => `${flag.setId}|${flagKey(flag)}|${flag.check}`).sort();
          if (before.length === after.length && before.every((signature, index) => signature === after[index]))
            continue;
          revisions.set(setId, {
            qcFlags: run.flags.map(toResultFlag),
            reason: `re-judged when the result of set ${observation.setId}, acquired ${observation.acquiredAt}, was placed before it in acquisition order`,
          });
        }
      });
      pending.set(result.setId, { flags: outcome.flags, recoveries: outcome.recoveries });
      return {
        ...result,
        qc: { ...result.qc, flags: [...result.qc.flags, ...outcome.ownFlags.map(toResultFlag)], judgement },
      };
    },
    takeRevisions() {
      const taken = [...revisions].map(([setId, revision]) => ({ setId, ...revision }));
      revisions.clear();
      return taken;
    },
    afterCommit(result: AnalysisResult, context: ResultStageContext): void {
      const outcome = pending.get(result.setId);
      pending.delete(result.setId);
      if (outcome === undefined) return;
      dispatcher(context.ledger)?.dispatch(outcome.flags, outcome.recoveries);
    },
    checkClock(ledger: Ledger, now: Date): QcFlag[] {
      const flags = evaluateClockRules({ history: observationHistory(ledger), ruleSet, now: now.getTime() });
      const open = new Set(
        openFlags(
          ledger,
          ruleSet.controls.map((control) => control.id),
        ).map(flagKey),
      );
      const fresh = flags.filter((flag) => !open.has(flagKey(flag)));
      if (fresh.length > 0) recordFlags(ledger, fresh);
      dispatcher(ledger)?.dispatch(flags);
      return fresh;
    },
    async idle(): Promise<void> {
      await Promise.all([...dispatchers.values()].map((existing) => existing.idle()));
    },
    resume(context: ResultStageContext): void {
      dispatcher(context.ledger); // creating it retries what the outbox holds
    },
    onClock(context: ResultStageContext): void {
      this.checkClock(context.ledger, context.now);
      dispatcher(context.ledger)?.retryDue?.();
    },
  };
}

/** The stage as the pipeline runs it: rule file from config.rules.file (or the built-in), config controls merged, alerts per config.alerts; `nowMs` (default Date.now) times cooldowns. */
export function qcStageFromConfig(
  config: DriftlightConfig,
  dependencies: { logger: AlertLogger; env?: SecretSource; nowMs?: () => number },
): QcStage {
  const ruleSet = effectiveRuleSet(config);
  const channels = createChannels(config.alerts, { env: dependencies.env ?? process.env, logger: dependencies.logger });
  return createQcStage({
    ruleSet,
    dispatcherFor: (ledger) =>
      createAlertDispatcher({
        alerts: config.alerts,
        channels,
        state: ledgerAlertState(ledger),
        recorder: ledgerDeliveryRecorder(ledger),
        outbox: ledgerAlertOutbox(ledger),
        logger: dependencies.logger,
        ...(dependencies.nowMs === undefined ? {} : { nowMs: dependencies.nowMs }),
      }),
  });
}
