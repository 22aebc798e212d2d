// The coordinator: the single writer of the ledger, results, outbox and archive moves, and the
// owner of the pipeline's lifecycle (recover at start, intake and ticks while running, repair of
// failed moves, drain at the end). It composes three parts, each owning one concept:
//   SetAssembly (set-assembly.ts)     stable files → records → open sets
//   JobDispatcher (job-dispatcher.ts) ready sets → payloads → job queue, with back-pressure
//   GroupCommit (group-commit.ts)     job outcomes → batched commits, held retries
//   VersionWatch (version-watch.ts)   inputs changed after they were read → taken again
// and a RunReport (run-report.ts) they all add to.
import type { Logger } from 'pino';
import type { AnalysisJobPayload, AnalysisOutput } from '../analysis/payload.js';
import type { DriftlightConfig } from '../config/resolve.js';
import type { JobQueue } from '../queue/job-queue.js';
import type { Ledger } from '../store/ledger.js';
import type { FileRecord } from '../store/files.js';
import { queuedSetJobs } from '../store/file-versions.js';
import { ContentCache } from './content-cache.js';
import { GroupCommit } from './group-commit.js';
import { dispatchSettingsFrom, JobDispatcher } from './job-dispatcher.js';
import { recoverMoves, type MoveRecovery } from './recovery.js';
import type { ResultStage } from './result-stage.js';
import { RunReport, type CommittedListener, type CoordinatorCounts } from './run-report.js';
import { assemblyRulesFrom, INTAKE_CHUNK_FILES, SetAssembly } from './set-assembly.js';
import { VersionWatch } from './version-watch.js';

export type { CoordinatorCounts } from './run-report.js';
export { isEnvironmentError } from './commit-retry.js';
export { setIdOfJob } from './group-commit.js';

export interface CoordinatorOptions {
  readonly config: DriftlightConfig;
  readonly ledger: Ledger;
  readonly queue: JobQueue<AnalysisJobPayload, AnalysisOutput>;
  readonly logger: Logger;
  readonly softwareVersion: string;
  readonly stages?: readonly ResultStage[];
  /** The clock (tests and benchmarks may pass their own). */
  readonly clock?: () => Date;
}

export class Coordinator {
  private readonly config: DriftlightConfig;
  private readonly ledger: Ledger;
  private readonly queue: JobQueue<AnalysisJobPayload, AnalysisOutput>;
  private readonly logger: Logger;
  private readonly clock: () => Date;
  private readonly report = new RunReport();
  private readonly assembly: SetAssembly;
  private readonly dispatcher: JobDispatcher;
  private readonly commits: GroupCommit;
  private readonly versions: VersionWatch;

  constructor(options: CoordinatorOptions) {
    const { config, ledger, queue, logger } = options;
    this.config = config;
    this.ledger = ledger;
    this.queue = queue;
    this.logger = logger;
    const clock = options.clock ?? ((): Date => new Date());
    this.clock = clock;
    const report = this.report;
    const rules = assemblyRulesFrom(config);
    const contents = new ContentCache();
    this.assembly = new SetAssembly({ config, ledger, logger, rules, contents, report });
    this.dispatcher = new JobDispatcher({
      config,
      ledger,
      queue,
      logger,
      clock,
      softwareVersion: options.softwareVersion,
      settings: dispatchSettingsFrom(config, rules),
      openSets: this.assembly,
      contents,
      report,
    });
    this.commits = new GroupCommit({
      config,
      ledger,
      logger,
      clock,
      stages: options.stages ?? [],
      report,
      detached: config.queue.backend === 'in-process',
      inFlight: () => this.dispatcher.inFlight,
      release: (jobId) => this.dispatcher.release(jobId),
      afterBatch: () => this.dispatcher.dispatchWaiting(),
      retake: (paths) => this.versions.retakeWhenStable(paths),
      archivedChanged: (files) => this.versions.takeArchivedWhenStable(files),
    });
    this.versions = new VersionWatch({
      config,
      ledger,
      logger,
      clock,
      assembly: this.assembly,
      dispatcher: this.dispatcher,
      intake: (paths) => this.intakeMany(paths),
    });
    queue.onOutcome((outcome) => this.commits.take(outcome));
  }

  /** Batch mode: sets are only dispatched by tick(true), in dependency order (supporting, reference, samples). */
  get holdDispatch(): boolean {
    return this.dispatcher.holdDispatch;
  }

  set holdDispatch(hold: boolean) {
    this.dispatcher.holdDispatch = hold;
  }

  /** Counters for the end-of-run summary. */
  get counts(): Readonly<CoordinatorCounts> {
    return this.report.counts;
  }

  /** Registers a listener called after each set is committed (result path, or undefined when it failed). */
  onCommitted(listener: CommittedListener): void {
    this.report.onCommitted(listener);
  }

  /** Sets dispatched and not yet committed. */
  get pendingJobs(): number {
    return this.dispatcher.inFlight;
  }

  /** Open sets still assembling. */
  get openSetCount(): number {
    return this.assembly.size;
  }

  /** Outcomes whose commit failed and that wait for a retry. */
  get heldCommitCount(): number {
    return this.commits.heldCount;
  }

  /** Stops the coordinator's own timers (the archive re-check; files still listed are looked at from the next start). */
  close(): void {
    this.versions.close();
  }

  /** Crash recovery: finishes (or finds) interrupted moves of done/failed files, starts the archive re-check (version-watch.ts), then re-enqueues queued sets (whose payloads may borrow those files). */
  async recover(): Promise<void> {
    const moves = recoverMoves(this.ledger, this.config, this.clock());
    if (moves.moved + moves.relocated > 0)
      this.logger.info(
        { moved: moves.moved, relocated: moves.relocated },
        'recovery: finished interrupted moves and recorded moved files whose location was lost',
      );
    if (moves.failed > 0)
      this.logger.error(
        { files: moves.failed, err: moves.firstError },
        'recovery: files could not be moved to the archive or quarantine; they stay in the inbox and are tried again (watch: every watch.rescanIntervalMs)',
      );
    this.versions.startArchiveRechecks();
    const queued = queuedSetJobs(this.ledger);
    for (const { id, jobId } of queued) await this.dispatcher.enqueue(id, jobId ?? id);
    this.assembly.reload();
    if (queued.length > 0) this.logger.info({ sets: queued.length }, 'recovery: re-enqueued queued sets');
  }

  /**
   * Finishes file moves that failed after their set or file was recorded (an archive or quarantine
   * folder briefly not writable): `watch` calls it every watch.rescanIntervalMs. Cheap when there
   * is nothing to move (one indexed query); skipped while a group commit runs. Returns what it did.
   */
  repairMoves(): MoveRecovery {
    // A commit between its moves and the transaction recording them would look like lost records.
    if (this.commits.running) return { moved: 0, relocated: 0, failed: 0 };
    this.commits.recordMovesNow();
    const moves = recoverMoves(this.ledger, this.config, this.clock());
    if (moves.moved + moves.relocated > 0)
      this.logger.info(
        { moved: moves.moved, relocated: moves.relocated },
        'repair: finished file moves that had failed',
      );
    if (moves.failed > 0)
      this.logger.warn(
        { files: moves.failed, err: moves.firstError },
        'repair: files still cannot be moved out of the inbox; tried again later',
      );
    return moves;
  }

  /**
   * Takes stable files in order, INTAKE_CHUNK_FILES per ledger transaction (see SetAssembly), and
   * dispatches the sets each chunk made ready. Returns the files whose intake failed for a reason
   * other than the file itself (an I/O or ledger error, logged): they stay in the inbox, to be taken again.
   */
  async intakeMany(paths: readonly string[]): Promise<string[]> {
    const failed: string[] = [];
    for (let start = 0; start < paths.length; start += INTAKE_CHUNK_FILES) {
      if (start > 0) await new Promise<void>((resolve) => setImmediate(resolve));
      const now = this.clock();
      const chunk = this.assembly.intakeChunk(paths.slice(start, start + INTAKE_CHUNK_FILES), now);
      failed.push(...chunk.failed);
      await this.dispatcher.dispatchReady(chunk.touched, now);
    }
    return failed;
  }

  /** Dispatches every open set that is ready (timeouts); with `force`, every open set (end of a batch). */
  async tick(force = false): Promise<void> {
    await this.dispatcher.dispatchReady(this.assembly.inDispatchOrder(), this.clock(), force);
  }

  /** Builds the payload of a set and enqueues it (recovery, reprocess with a `~r` job id); see JobDispatcher.enqueue. */
  enqueue(setId: string, jobId: string = setId, ownFiles?: readonly FileRecord[]): Promise<string | undefined> {
    return this.dispatcher.enqueue(setId, jobId, ownFiles);
  }

  /**
   * Waits until every dispatched job (and every ready set waiting for capacity) is committed. Held
   * failed commits are tried once more at once; one that fails again is let go (its set stays queued
   * and is re-run at the next start), so a lasting outage cannot keep `watch` from stopping. Wakes
   * on events: the queue's own drain and the release of the last in-flight slot.
   */
  async drain(): Promise<void> {
    this.commits.beginLettingGo();
    try {
      while (this.dispatcher.inFlight > 0 || this.dispatcher.waiting > 0 || this.versions.busy) {
        if (this.dispatcher.inFlight === 0) await this.dispatcher.dispatchWaiting();
        await this.queue.drain();
        await this.dispatcher.whenNoneInFlight();
        // Changed inputs waiting to be taken again (their sets are still queued).
        if (this.versions.busy) await new Promise((resolve) => setTimeout(resolve, 20));
      }
    } finally {
      this.commits.endLettingGo();
    }
  }
}
