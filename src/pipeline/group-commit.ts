// Group commit of job outcomes: outcomes that finish together are committed as one batch (one
// ledger transaction costs about the same for one set as for ten; see commit.ts for the order of
// writes). Failed sets and sets whose every input was unreadable are recorded failed; the rest go
// through the result stages and commitResults. On the in-process queue a commit that fails is held
// and retried (commit-retry.ts); on a persistent queue the job is acknowledged only after its commit.
import type { Logger } from 'pino';
import type { AnalysisOutput } from '../analysis/payload.js';
import type { DriftlightConfig } from '../config/resolve.js';
import type { JobOutcome } from '../queue/job-queue.js';
import type { Ledger } from '../store/ledger.js';
import { getSet } from '../store/sets.js';
import {
  commitFailure,
  commitResults,
  commitUnreadableSet,
  recordArchiveMoves,
  type ArchivedFile,
  type CommitItem,
} from './commit.js';
import { HeldCommits, timerScheduler, type Scheduler } from './commit-retry.js';
import { applyStages, type ResultStage } from './result-stage.js';
import { analysedCurrentInputs, inputsChangedOnDisk, isRerunJob } from './input-versions.js';
import { reviseResultFiles } from './result-revision.js';
import { OutageLog, outageKey } from './outage-log.js';
import { logMovesFailed, type RunReport } from './run-report.js';

/** Outcomes committed per batch at most. */
export const COMMIT_BATCH_MAX = 64;
/**
 * How long the first outcome of a group waits for others while more jobs are running (ms): a ledger
 * transaction costs about the same for one set as for ten, so under load sets are committed in
 * groups. With nothing else running an outcome is committed at once.
 */
export const COMMIT_WINDOW_MS = 10;

/** Parses the set id out of a job id (`SETID` or `SETID~rN` for re-runs). */
export function setIdOfJob(jobId: string): string {
  const cut = jobId.indexOf('~');
  return cut < 0 ? jobId : jobId.slice(0, cut);
}

type Outcome = JobOutcome<AnalysisOutput>;

interface PendingCommit {
  readonly outcome: Outcome;
  readonly resolve: () => void;
  readonly reject: (error: unknown) => void;
}

export interface GroupCommitOptions {
  readonly config: DriftlightConfig;
  readonly ledger: Ledger;
  readonly logger: Logger;
  readonly clock: () => Date;
  readonly stages: readonly ResultStage[];
  readonly report: RunReport;
  /** Whether outcomes are committed after the queue slot is released (in-process queue: nothing to acknowledge), with held retries. */
  readonly detached: boolean;
  /** Jobs in flight now: a group waits COMMIT_WINDOW_MS for others only while more are running than it holds. */
  readonly inFlight: () => number;
  /** Frees the in-flight slot of a job whose commit is done or let go (after its batch). */
  readonly release: (jobId: string) => void;
  /** Runs after each batch (dispatch of sets waiting for a slot); its failure is logged. */
  readonly afterBatch: () => Promise<void>;
  /** Schedules held retries (tests pass their own). */
  readonly schedule?: Scheduler;
  /** Inputs found changed on disk at commit: taken again once stable (input-versions.ts); none by default. */
  readonly retake?: (paths: readonly string[]) => void;
  /** Archived inputs (taken again from their archived copy) found changed at commit: taken as a new version once stable (version-watch.ts). */
  readonly archivedChanged?: (files: readonly ArchivedFile[]) => void;
}

export class GroupCommit {
  /** Outcomes waiting for the next group commit. */
  private readonly buffer: PendingCommit[] = [];
  /** Archive moves made and not yet recorded: the next commit's transaction records them (one transaction fewer per batch), else runCommits on its way out. */
  private readonly unrecordedMoves: ArchivedFile[] = [];
  private committing: Promise<void> | undefined;
  private readonly held: HeldCommits<Outcome>;
  /** Set while the coordinator drains: a failed commit is then let go instead of held. */
  private lettingGo = false;
  /** Held-commit failures: one line per folder per watch.rescanIntervalMs. */
  private readonly outageLog: OutageLog;

  constructor(private readonly options: GroupCommitOptions) {
    this.held = new HeldCommits((outcome) => this.takeDetached(outcome), options.schedule ?? timerScheduler);
    this.outageLog = new OutageLog(options.config.watch.rescanIntervalMs);
  }

  /** Outcomes whose commit failed and that wait for a retry. */
  get heldCount(): number {
    return this.held.size;
  }

  /** Whether a group commit is running now. */
  get running(): boolean {
    return this.committing !== undefined;
  }

  /**
   * Takes a job outcome into the next group commit. Detached (in-process queue): nothing is
   * persisted, so the worker slot is freed at once and the commit runs on (its in-flight slot kept;
   * a crash before it lands leaves the set queued, re-enqueued at the next start); a commit that
   * fails is held and tried again. Otherwise the returned promise settles with the commit, and a
   * failed commit leaves the job to the queue's own retries.
   */
  take(outcome: Outcome): Promise<void> {
    if (this.options.detached) {
      this.takeDetached(outcome);
      return Promise.resolve();
    }
    const committed = new Promise<void>((resolve, reject) => this.buffer.push({ outcome, resolve, reject }));
    this.committing ??= this.runCommits();
    return committed;
  }

  /** From now until endLettingGo(): held outcomes are tried once more at once, and a commit that fails is let go instead of held. */
  beginLettingGo(): void {
    this.lettingGo = true;
    this.held.retryAll();
  }

  endLettingGo(): void {
    this.lettingGo = false;
  }

  /** Records the archive moves no commit has recorded yet (when no batch follows); a failure leaves them to the next commit, recovery and repair. */
  recordMovesNow(): void {
    if (this.unrecordedMoves.length === 0) return;
    try {
      recordArchiveMoves(this.options.ledger, this.unrecordedMoves, this.options.clock());
      this.unrecordedMoves.length = 0;
    } catch (error) {
      this.options.logger.error(
        { err: error, files: this.unrecordedMoves.length },
        'archive moves not recorded; the next commit records them, or the repair finds them',
      );
    }
  }

  /** Puts a detached outcome into the next group commit; a failure holds it for a retry. */
  private takeDetached(outcome: Outcome): void {
    // Settled once, like a promise: runCommits rejects a whole batch when commitBatch throws,
    // entries it had already resolved included.
    let settled = false;
    this.buffer.push({
      outcome,
      resolve: () => {
        if (settled) return;
        settled = true;
        this.held.committed(outcome.id);
      },
      reject: (error) => {
        if (settled) return;
        settled = true;
        this.holdFailed(outcome, error);
      },
    });
    this.committing ??= this.runCommits();
  }

  /** Holds a detached outcome whose commit failed, or lets it go (during drain, or a bug that keeps failing): the set then stays queued and is re-run at the next start. */
  private holdFailed(outcome: Outcome, error: unknown): void {
    const decision = this.held.fail(outcome, error, this.lettingGo);
    const log = this.options.logger.child({ setId: setIdOfJob(outcome.id) });
    if (decision.kind === 'let-go') {
      this.options.report.setNotCommitted();
      log.error(
        { err: error, failures: decision.failures },
        'commit failed; the set stays queued and is re-run at the next start',
      );
      return;
    }
    // One line per folder per interval (watch.rescanIntervalMs) while an outage lasts, not one per
    // set: the first failure at error level, the repeats of a lasting outage at warn.
    const folder = outageKey(error);
    const admitted = this.outageLog.admit(folder, this.options.clock().getTime());
    if (admitted === undefined) return;
    log[decision.failures === 1 ? 'error' : 'warn'](
      {
        err: error,
        folder,
        failures: decision.failures,
        retryInMs: decision.retryInMs,
        notLoggedSinceLastLine: admitted.suppressed,
      },
      'commit failed (are the results, outbox and archive folders writable, is the disk full?); the outcome is kept and committed again later',
    );
  }

  /** Commits buffered outcomes in batches until none is left; outcomes arriving meanwhile join the next batch. */
  private async runCommits(): Promise<void> {
    try {
      // Let outcomes that finish together (several threads, one event-loop turn) join one batch, and
      // while other jobs are still running give them COMMIT_WINDOW_MS to join it.
      await new Promise<void>((resolve) => setImmediate(resolve));
      if (this.options.inFlight() > this.buffer.length)
        await new Promise<void>((resolve) => setTimeout(resolve, COMMIT_WINDOW_MS));
      while (this.buffer.length > 0) {
        const batch = this.buffer.splice(0, COMMIT_BATCH_MAX);
        try {
          await this.commitBatch(batch);
        } catch (error) {
          for (const entry of batch) entry.reject(error);
        }
        for (const { outcome } of batch) {
          if (!this.held.has(outcome.id)) this.options.release(outcome.id);
        }
        try {
          await this.options.afterBatch();
        } catch (error) {
          this.options.logger.error(
            { err: error },
            'dispatch of waiting sets failed; they are dispatched at the next tick or start',
          );
        }
      }
    } finally {
      this.recordMovesNow();
      this.committing = undefined;
    }
  }

  private async commitBatch(batch: readonly PendingCommit[]): Promise<void> {
    const { ledger, config, logger, report, stages } = this.options;
    const now = this.options.clock();
    const context = { ledger, now };
    const toCommit: { entry: PendingCommit; item: CommitItem }[] = [];
    for (const entry of batch) {
      const { outcome } = entry;
      const setId = setIdOfJob(outcome.id);
      const log = logger.child({ setId });
      try {
        const rerun = isRerunJob(outcome.id);
        const set = getSet(ledger, setId);
        if (
          set === undefined ||
          (!rerun &&
            (set.state === 'done' || set.state === 'failed' || (set.jobId !== null && set.jobId !== outcome.id)))
        ) {
          log.debug(
            { jobId: outcome.id, state: set?.state },
            'outcome for a finished set, or for a run superseded by a newer one, ignored',
          );
          entry.resolve();
          continue;
        }
        // Before anything is committed: are the inputs still the bytes that were analysed (issue 20)?
        const changed = inputsChangedOnDisk(ledger, setId);
        if (changed.length > 0) {
          log.warn(
            { files: changed.map((f) => f.name) },
            'an input changed after it was read; not committed: it is taken again once stable, and the set runs again',
          );
          this.options.retake?.(changed.filter((f) => f.archivePath === null).map((f) => f.path));
          this.options.archivedChanged?.(
            changed.flatMap((f) => (f.archivePath === null ? [] : [{ id: f.id, archivePath: f.archivePath }])),
          );
          entry.resolve();
          continue;
        }
        if (outcome.status === 'completed' && !analysedCurrentInputs(ledger, setId, outcome.value.result)) {
          log.info(
            { jobId: outcome.id },
            'outcome computed from an earlier version of an input; not committed (a newer run follows)',
          );
          entry.resolve();
          continue;
        }
        if (outcome.status === 'failed') {
          const movesFailed = commitFailure(ledger, config, setId, outcome.failure, now);
          log.error(
            { code: outcome.failure.code, message: outcome.failure.message },
            'set failed; its files are quarantined',
          );
          logMovesFailed(log, movesFailed);
          report.setFailed(setId);
          entry.resolve();
          continue;
        }
        const unreadable = commitUnreadableSet(ledger, config, setId, outcome.value.rejectedInputs ?? [], now);
        if (unreadable.files > 0) {
          report.filesRejectedLater(unreadable.files);
          log.warn(
            { files: unreadable.files },
            'no file of the set could be read; the set failed and its files are quarantined',
          );
          logMovesFailed(log, unreadable.movesFailed);
          report.setFailed(setId);
          entry.resolve();
          continue;
        }
        const result = await applyStages(stages, outcome.value.result, context);
        // Each further measurement of a file holding several goes through the stages too (issue 18.3: QC
        // decides per control which measurement it judges and says so in every result), in file order.
        let output = outcome.value;
        if (output.measurements !== undefined) {
          const measurements = [];
          for (const measurement of output.measurements)
            measurements.push({ ...measurement, result: await applyStages(stages, measurement.result, context) });
          output = { ...output, measurements };
        }
        toCommit.push({ entry, item: { output, result, setCreatedAt: new Date(set.createdAt) } });
      } catch (error) {
        entry.reject(error);
      }
    }
    if (toCommit.length === 0) return;
    let outcomes;
    const carried = this.unrecordedMoves.splice(0);
    try {
      const done = await commitResults(
        ledger,
        config,
        toCommit.map((c) => c.item),
        now,
        carried,
      );
      outcomes = done.outcomes;
      this.unrecordedMoves.push(...done.unrecordedMoves);
    } catch (error) {
      // The transaction rolled back: the carried moves are still unrecorded.
      this.unrecordedMoves.unshift(...carried);
      for (const { entry } of toCommit) entry.reject(error);
      return;
    }
    outcomes.forEach((committed, index) => {
      const pending = toCommit[index];
      if (pending === undefined) return;
      const {
        entry,
        item: { result, output },
      } = pending;
      if (!committed.ok) {
        entry.reject(committed.error);
        return;
      }
      const log = logger.child({ setId: committed.setId });
      if (committed.filesRejected > 0) {
        report.filesRejectedLater(committed.filesRejected);
        log.warn({ files: committed.filesRejected }, 'inputs rejected by the worker were quarantined');
      }
      log.info(
        { result: committed.path, partial: result.partial, missing: result.missing.map((m) => m.what) },
        'result written',
      );
      logMovesFailed(log, committed.movesFailed);
      for (const written of [result, ...(output.measurements ?? []).map((measurement) => measurement.result)]) {
        for (const stage of stages) {
          if (stage.afterCommit === undefined) continue;
          Promise.resolve()
            .then(() => stage.afterCommit?.(written, context))
            .catch((error: unknown) => log.error({ stage: stage.name, err: error }, 'result stage afterCommit failed'));
        }
      }
      report.setDone(committed.setId, committed.path, result.partial);
      entry.resolve();
    });
    await this.reviseWrittenResults(now);
  }

  /** Rewrites results already written whose verdict this batch's stages revised (a failure is logged; the ledger keeps the verdict, the next revision of that set rewrites it). */
  private async reviseWrittenResults(now: Date): Promise<void> {
    const revisions = this.options.stages.flatMap((stage) => stage.takeRevisions?.() ?? []);
    if (revisions.length === 0) return;
    try {
      const rewritten = await reviseResultFiles(this.options.ledger, revisions, now);
      if (rewritten.length > 0)
        this.options.logger.info(
          { sets: rewritten },
          'QC verdict of earlier-written results revised (a result acquired before them arrived later); their files show it, qc.history keeps the earlier flags',
        );
    } catch (error) {
      this.options.logger.error(
        { err: error, sets: revisions.map((revision) => revision.setId) },
        'could not rewrite results whose QC verdict was revised; the ledger holds the current verdict',
      );
    }
  }
}
