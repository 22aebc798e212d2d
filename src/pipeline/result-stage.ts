// The hook through which other modules (QC rules, alerts) act on each result before it is written.
// The coordinator runs the configured stages in order on every completed analysis: `apply` may
// return the result with additions (e.g. `qc.flags`); `afterCommit` runs once the result, the
// ledger row and the archive moves are durable (e.g. alerts) and is never awaited by the pipeline.
import type { AnalysisResult, QcFlag } from '../analysis/result.js';
import type { Ledger } from '../store/ledger.js';

export interface ResultStageContext {
  /** The ledger (read it through src/store typed queries; stages may add their own store modules). */
  readonly ledger: Ledger;
  /** The coordinator's clock at the time of the stage. */
  readonly now: Date;
}

/** A change a stage made to a result already written (QC: a late result re-judged a later run): its flags as they stand now, and why. */
export interface ResultRevision {
  readonly setId: string;
  readonly qcFlags: readonly QcFlag[];
  readonly reason: string;
}

export interface ResultStage {
  /** Stable name, used in logs. */
  readonly name: string;
  /** Returns the result to write (the same object, or a copy with additions such as qc.flags). */
  apply(result: AnalysisResult, context: ResultStageContext): Promise<AnalysisResult> | AnalysisResult;
  /** Revisions of results already written that the stage's apply() calls made since the last call (the coordinator rewrites those files). */
  takeRevisions?(): ResultRevision[];
  /** Called after the result is durable; failures are logged, never retried, never block the pipeline. */
  afterCommit?(result: AnalysisResult, context: ResultStageContext): void | Promise<void>;
  /** Called by `watch` about once a minute for time-based checks (e.g. a control not measured by its deadline). */
  onClock?(context: ResultStageContext): void;
  /** Picks up background work a previous run left unfinished (alert deliveries waiting in the outbox); `process` calls it at start. */
  resume?(context: ResultStageContext): void;
  /** Resolves when the stage's background work (e.g. alert deliveries) has finished; awaited before the ledger closes. */
  idle?(): Promise<void>;
}

/** Runs `stages` in order over `result`; a stage that throws stops the chain (the caller decides). */
export async function applyStages(
  stages: readonly ResultStage[],
  result: AnalysisResult,
  context: ResultStageContext,
): Promise<AnalysisResult> {
  let current = result;
  for (const stage of stages) current = await stage.apply(current, context);
  return current;
}
