// The coordinator: the single writer of the ledger, results, outbox and archive moves. It takes
// stable files (from the watcher or a batch), assembles sets, dispatches ready ones to the job
// queue with self-contained payloads, and commits each outcome exactly once.
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { basename, dirname } from 'node:path';
import type { Logger } from 'pino';
import { InputRejected } from '../model/errors.js';
import type { MeasurementRole } from '../model/spectrum.js';
import type { AnalysisJobPayload, AnalysisOutput, PayloadFile } from '../analysis/payload.js';
import type { SetPart } from '../analysis/result.js';
import type { DriftlightConfig } from '../config/resolve.js';
import type { JobOutcome, JobQueue } from '../queue/job-queue.js';
import type { Ledger } from '../store/ledger.js';
import { advanceFilesOfSet, assembleRecordedFile, filesOfSet, getFile, insertAssembledFile, insertFileId, type FileRecord } from '../store/files.js';
import { deleteOpenSet, getSet, insertPairing, insertSet, markSetQueued } from '../store/sets.js';
import { classifyFile, makeSetId, partsPresent, placeFile, setReadiness, type AssemblyRules } from './assemble.js';
import { commitFailure, commitResults, commitUnreadableSet, recordArchiveMoves, type ArchivedFile, type CommitItem } from './commit.js';
import { ContentCache } from './content-cache.js';
import { buildPayload, choosePairings, readText } from './dispatch.js';
import { intakeFile, type Acquisition, type IntakeFile, type IntakeResult } from './intake.js';
import { recoverMoves, type MoveRecovery } from './recovery.js';
import type { SetManifest } from './manifest.js';
import { OpenSets, toView, type OpenSet } from './open-sets.js';
import { applyStages, type ResultStage } from './result-stage.js';
import { configHash } from './settings.js';
import type { ParsedData } from '../formats/index.js';

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

/** Counters for the end-of-run summary. */
export interface CoordinatorCounts {
  filesAccepted: number;
  filesRejected: number;
  setsDispatched: number;
  setsDone: number;
  setsFailed: number;
  setsPartial: number;
  /** Sets whose outcome could not be committed and was let go (held commits at drain()): they stay queued and run again at the next start. */
  setsNotCommitted: number;
}

/** Parses the set id out of a job id (`SETID` or `SETID~rN` for re-runs). */
export function setIdOfJob(jobId: string): string {
  const cut = jobId.indexOf('~');
  return cut < 0 ? jobId : jobId.slice(0, cut);
}

/** Files read per ledger transaction at intake; the event loop is yielded between chunks. */
export const INTAKE_CHUNK_FILES = 64;
/** Outcomes committed per batch at most. */
export const COMMIT_BATCH_MAX = 64;
/**
 * How long the first outcome of a group waits for others while more jobs are running (ms): a ledger
 * transaction costs about the same for one set as for ten, so under load sets are committed in
 * groups. With nothing else running an outcome is committed at once.
 */
export const COMMIT_WINDOW_MS = 10;
/**
 * Jobs dispatched and not yet committed, per worker (backpressure; room for a commit group while
 * the threads work on their next shares). Under a backlog each thread holds a share of up to
 * MAX_JOBS_PER_TASK (queue/in-process.ts) jobs while a commit group waits COMMIT_WINDOW_MS and then
 * its fsyncs, so 8 per worker let dispatch stall behind commits. Measured on the 2-core machine,
 * bench/pipeline's burst of 1,000 sets, runs interleaved: 8 → 16 took the burst from 497–534 to
 * 544–571 sets/s on tmpfs (three runs each) and from 486–495 to 529–552 sets/s on disk (two runs
 * each); 32 was no better than 16.
 */
export const MAX_IN_FLIGHT_PER_WORKER = 16;
/**
 * Wait before a failed commit (results, outbox or archive folder not writable, disk full, ledger
 * error) is tried again, in ms; doubled after each failure up to COMMIT_RETRY_MAX_MS. The outcome is
 * kept meanwhile and holds its in-flight slot, so during a long outage dispatch pauses once every
 * slot is held instead of running analyses whose results cannot be written.
 */
export const COMMIT_RETRY_FIRST_MS = 1000;
export const COMMIT_RETRY_MAX_MS = 60_000;
/**
 * Failed commits of one outcome after which it is let go (the set stays queued and is re-run at the
 * next start) when the error is not an I/O or database error (which may pass; those are retried
 * for as long as the process runs).
 */
export const COMMIT_RETRY_MAX_FAILURES_OTHER = 3;

/** Whether `error` comes from the file system or the database (a system errno code or an SQLite code), i.e. may pass. */
export function isEnvironmentError(error: unknown): boolean {
  const code = (error as { code?: unknown } | null)?.code;
  return typeof code === 'string' && (/^E[A-Z0-9]+$/.test(code) || code.startsWith('SQLITE_'));
}

interface HeldCommit {
  readonly outcome: JobOutcome<AnalysisOutput>;
  readonly failures: number;
  timer: NodeJS.Timeout | undefined;
}

interface PendingCommit {
  readonly outcome: JobOutcome<AnalysisOutput>;
  readonly resolve: () => void;
  readonly reject: (error: unknown) => void;
}

type AcceptedFile = Extract<IntakeResult, { kind: 'data' | 'manifest' }>;

export class Coordinator {
  /** Batch mode: sets are only dispatched by tick(true), in dependency order (supporting, reference, samples). */
  holdDispatch = false;
  readonly counts: CoordinatorCounts = { filesAccepted: 0, filesRejected: 0, setsDispatched: 0, setsDone: 0, setsFailed: 0, setsPartial: 0, setsNotCommitted: 0 };
  private readonly config: DriftlightConfig;
  private readonly ledger: Ledger;
  private readonly queue: JobQueue<AnalysisJobPayload, AnalysisOutput>;
  private readonly logger: Logger;
  private readonly stages: readonly ResultStage[];
  private readonly clock: () => Date;
  private readonly rules: AssemblyRules;
  private readonly hash: string;
  private readonly softwareVersion: string;
  private readonly detectorCurve: PayloadFile | undefined;
  private openSets: OpenSets;
  private readonly inFlight = new Set<string>();
  /** Ready sets waiting for queue capacity (backpressure keeps payloads out of memory), in order. */
  private readonly readyWaiting: string[] = [];
  private readonly readyWaitingSet = new Set<string>();
  /** Most jobs handed to the queue and not yet committed: MAX_IN_FLIGHT_PER_WORKER per worker. */
  private readonly maxInFlight: number;
  /** Whether outcomes are committed after the queue slot is released (in-process queue: nothing to acknowledge). */
  private readonly detachCommits: boolean;
  /** Listeners told about each committed result (CLI progress, reprocess diffs, benchmarks). */
  private readonly committedListeners: ((setId: string, resultPath: string | undefined) => void)[] = [];
  /** Bytes of files read at intake, until their set is dispatched. */
  private readonly contents = new ContentCache();
  /** Outcomes waiting for the next group commit. */
  private readonly commitBuffer: PendingCommit[] = [];
  /** Archive moves made and not yet recorded: the next commit's transaction records them (one transaction fewer per batch), else runCommits on its way out. */
  private readonly unrecordedMoves: ArchivedFile[] = [];
  private committing: Promise<void> | undefined;
  /** Outcomes whose commit failed, kept (in flight) until their retry (in-process queue only), by job id. */
  private readonly heldCommits = new Map<string, HeldCommit>();
  /** Set while drain() runs: a failed commit is then let go instead of held. */
  private draining = false;

  constructor(options: CoordinatorOptions) {
    this.config = options.config;
    this.ledger = options.ledger;
    this.queue = options.queue;
    this.logger = options.logger;
    this.stages = options.stages ?? [];
    this.clock = options.clock ?? (() => new Date());
    this.softwareVersion = options.softwareVersion;
    const c = this.config;
    this.maxInFlight = Math.max(MAX_IN_FLIGHT_PER_WORKER, MAX_IN_FLIGHT_PER_WORKER * c.queue.concurrency);
    this.detachCommits = c.queue.backend === 'in-process';
    this.rules = {
      fileNamePatterns: c.assembly.fileNamePatterns.map((p) => new RegExp(p, 'i')),
      referencePatterns: c.references.map((r) => new RegExp(r.sampleIdPattern)),
      controlPatterns: c.controls.map((r) => new RegExp(r.sampleIdPattern)),
      requiredParts: c.assembly.requiredParts,
      referenceRequiredParts: c.assembly.referenceRequiredParts,
      setTimeoutMs: c.assembly.setTimeoutMs,
    };
    const curvePath = c.instrument.detectorCorrectionFile;
    let curveSha: string | undefined;
    if (curvePath !== undefined) {
      const content = readText(curvePath);
      curveSha = createHash('sha256').update(readFileSync(curvePath)).digest('hex');
      this.detectorCurve = { name: basename(curvePath), sha256: curveSha, part: 'detector-curve', role: 'detector-curve', origin: 'config', content };
    }
    this.hash = configHash(c, curveSha);
    this.openSets = OpenSets.load(this.ledger);
    this.queue.onOutcome((outcome) => this.onOutcome(outcome));
  }

  /** Registers a listener called after each set is committed (result path, or undefined when it failed). */
  onCommitted(listener: (setId: string, resultPath: string | undefined) => void): void {
    this.committedListeners.push(listener);
  }

  /** Sets dispatched and not yet committed. */
  get pendingJobs(): number {
    return this.inFlight.size;
  }

  /** Open sets still assembling. */
  get openSetCount(): number {
    return this.openSets.size;
  }

  /** Crash recovery: finishes (or finds) interrupted moves of done/failed files, then re-enqueues queued sets (whose payloads may borrow those files). */
  async recover(): Promise<void> {
    const moves = recoverMoves(this.ledger, this.config, this.clock());
    if (moves.moved + moves.relocated > 0) this.logger.info({ moved: moves.moved, relocated: moves.relocated }, 'recovery: finished interrupted moves and recorded moved files whose location was lost');
    if (moves.failed > 0) this.logger.error({ files: moves.failed, err: moves.firstError }, 'recovery: files could not be moved to the archive or quarantine; they stay in the inbox and are tried again (watch: every watch.rescanIntervalMs)');
    const queued = this.ledger.prepare(`SELECT id FROM sets WHERE state = 'queued' ORDER BY created_at, id`).all() as { id: string }[];
    for (const { id } of queued) await this.enqueue(id);
    this.openSets = OpenSets.load(this.ledger);
    if (queued.length > 0) this.logger.info({ sets: queued.length }, 'recovery: re-enqueued queued sets');
  }

  /**
   * Finishes file moves that failed after their set or file was recorded (an archive or quarantine
   * folder briefly not writable): `watch` calls it every watch.rescanIntervalMs. Cheap when there
   * is nothing to move (one indexed query); skipped while a group commit runs. Returns what it did.
   */
  repairMoves(): MoveRecovery {
    // A commit between its moves and the transaction recording them would look like lost records.
    if (this.committing !== undefined) return { moved: 0, relocated: 0, failed: 0 };
    this.recordMovesNow();
    const moves = recoverMoves(this.ledger, this.config, this.clock());
    if (moves.moved + moves.relocated > 0) this.logger.info({ moved: moves.moved, relocated: moves.relocated }, 'repair: finished file moves that had failed');
    if (moves.failed > 0) this.logger.warn({ files: moves.failed, err: moves.firstError }, 'repair: files still cannot be moved out of the inbox; tried again later');
    return moves;
  }

  /**
   * Takes stable files in order: each is hashed and read (bad ones quarantined), then the accepted
   * ones of a chunk are recorded and placed in their sets in one ledger transaction, and the sets
   * that became ready are dispatched. A crash leaves either nothing of a chunk (the start-up scan
   * reads its files again) or all of it. Returns the files whose intake failed for a reason other
   * than the file itself (an I/O or ledger error, logged): they stay in the inbox, to be taken again.
   */
  async intakeMany(paths: readonly string[]): Promise<string[]> {
    const failed: string[] = [];
    for (let start = 0; start < paths.length; start += INTAKE_CHUNK_FILES) {
      if (start > 0) await new Promise<void>((resolve) => setImmediate(resolve));
      failed.push(...await this.intakeChunk(paths.slice(start, start + INTAKE_CHUNK_FILES)));
    }
    return failed;
  }

  private async intakeChunk(paths: readonly string[]): Promise<string[]> {
    const failed: string[] = [];
    const now = this.clock();
    const accepted: AcceptedFile[] = [];
    const pending = new Map<string, { name: string; path: string }>();
    for (const path of paths) {
      let outcome: IntakeResult;
      try {
        outcome = intakeFile(this.ledger, this.config, path, now, pending);
      } catch (error) {
        this.logger.error({ file: path, err: error }, 'intake failed; the file stays in the inbox and is tried again later');
        failed.push(path);
        continue;
      }
      if (outcome.kind === 'rejected') {
        this.counts.filesRejected += 1;
        this.logger.warn({ file: path }, 'input rejected and quarantined');
      } else if (outcome.kind === 'data' || outcome.kind === 'manifest') {
        accepted.push(outcome);
        pending.set(outcome.file.sha256, { name: outcome.file.name, path: outcome.file.path });
      }
    }
    if (accepted.length === 0) return failed;
    const touched = new Set<OpenSet>();
    const recordedIds: number[] = [];
    try {
      this.ledger.transaction(() => {
        for (const item of accepted) {
          const fileId = item.kind === 'manifest'
            ? this.placeManifest(item.file, item.manifest, now, touched)
            : this.placeData(item.file, item.parsed, item.acquisition, now, touched);
          recordedIds.push(fileId);
        }
      });
    } catch (error) {
      // Rolled back: the in-memory view is rebuilt from the ledger; the files stay in the inbox.
      this.openSets = OpenSets.load(this.ledger);
      this.logger.error({ files: accepted.map((a) => a.file.path), err: error }, 'intake failed; the files stay in the inbox and are tried again later');
      return [...failed, ...accepted.map((a) => a.file.path)];
    }
    accepted.forEach((item, index) => {
      const fileId = recordedIds[index];
      if (fileId !== undefined && item.kind === 'data') this.contents.put(fileId, item.bytes);
    });
    this.counts.filesAccepted += accepted.length;
    await this.dispatchReady([...touched], now);
    return failed;
  }

  /** Records a data file and places it in an open set (inside the intake transaction); returns its file id. */
  private placeData(file: IntakeFile, parsed: ParsedData, acquisition: Acquisition, now: Date, touched: Set<OpenSet>): number {
    const metadata = parsed.type === 'spectrum' ? parsed.spectrum.metadata : parsed.decay.metadata;
    const hasIrfColumn = parsed.type === 'decay' && parsed.decay.irfCounts !== undefined;
    const classification = classifyFile({
      name: file.name, dataType: parsed.type, hasIrfColumn,
      ...(parsed.type === 'spectrum' ? { spectrumKind: parsed.spectrum.kind } : {}),
      ...(metadata.role === undefined ? {} : { metadataRole: metadata.role }),
      ...(metadata.sampleId === undefined ? {} : { metadataSampleId: metadata.sampleId }),
    }, this.rules);
    const candidates = this.openSets.candidatesFor(classification.sampleId).filter((s) => s.manifest === undefined || s.manifest.dir === dirname(file.path));
    const placement = placeFile({ name: file.name, classification }, candidates.map(toView), this.rules);
    let set: OpenSet;
    if (placement.kind === 'join') {
      const found = this.openSets.get(placement.setId);
      if (found === undefined) throw new Error(`open set ${placement.setId} vanished`);
      set = found;
    } else {
      const id = makeSetId(placement.sampleId, file.sha256);
      set = { id, sampleId: placement.sampleId, role: placement.role, createdAt: now, deadlineAt: new Date(now.getTime() + this.rules.setTimeoutMs), files: [], standalone: placement.standalone };
      insertSet(this.ledger, { id: set.id, sampleId: set.sampleId, role: set.role, source: classification.sampleIdSource, createdAt: now, deadlineAt: set.deadlineAt });
      this.openSets.add(set);
    }
    const listed = set.manifest?.manifest.files.find((f) => f.file === file.name);
    const part: SetPart = listed?.part ?? classification.part;
    const role: MeasurementRole = listed?.role ?? classification.role;
    const facts = {
      dataType: parsed.type, part, role, sampleId: classification.sampleId, acquiredAt: acquisition.acquiredAt, acquiredSource: acquisition.source,
      excitationNm: metadata.excitationNm ?? null, solvent: metadata.solvent ?? null, hasIrfColumn,
    };
    let fileId: number;
    if (file.id === undefined) {
      fileId = insertAssembledFile(this.ledger, file, facts, set.id, now);
    } else {
      fileId = file.id;
      assembleRecordedFile(this.ledger, fileId, facts, set.id, now);
    }
    set.files.push({ fileId, name: file.name, path: file.path, part, hasIrfColumn });
    touched.add(set);
    this.logger.debug({ setId: set.id, file: file.name, part }, 'file assembled');
    return fileId;
  }

  /** Records a manifest, opens its set and claims listed files waiting in other open sets (inside the intake transaction); returns its file id. */
  private placeManifest(file: IntakeFile, manifest: SetManifest, now: Date, touched: Set<OpenSet>): number {
    const dir = dirname(file.path);
    const id = makeSetId(manifest.sampleId, file.sha256);
    const set: OpenSet = {
      id, sampleId: manifest.sampleId, role: manifest.role, createdAt: now, deadlineAt: new Date(now.getTime() + this.rules.setTimeoutMs),
      files: [], manifest: { dir, manifest }, standalone: false,
    };
    const manifestJson = JSON.stringify(set.manifest);
    const fileId = file.id ?? insertFileId(this.ledger, file, now);
    insertSet(this.ledger, { id, sampleId: manifest.sampleId, role: manifest.role, source: 'manifest', createdAt: now, deadlineAt: set.deadlineAt, manifestJson });
    assembleRecordedFile(this.ledger, fileId, { dataType: 'manifest', part: null, role: manifest.role, sampleId: manifest.sampleId, acquiredAt: null, excitationNm: manifest.excitationNm ?? null, solvent: manifest.solvent ?? null, hasIrfColumn: false }, id, now);
    // Claim listed files already waiting in other open sets. Only plain sets give files up: a
    // manifest set keeps what its own manifest lists, and lives until complete or timed out, even
    // while it has no files yet (issue 20: a second manifest deleted the first's empty set).
    for (const other of this.openSets.all()) {
      if (other.manifest !== undefined) continue;
      let claimed = 0;
      for (const member of [...other.files]) {
        const listed = manifest.files.find((f) => f.file === member.name);
        if (listed === undefined || dirname(member.path) !== dir) continue;
        const record = getFile(this.ledger, member.fileId);
        if (record === undefined) continue;
        this.ledger.prepare('UPDATE files SET set_id = ?, part = ?, role = COALESCE(?, role) WHERE id = ?').run(id, listed.part, listed.role ?? null, member.fileId);
        other.files.splice(other.files.indexOf(member), 1);
        set.files.push({ ...member, part: listed.part });
        claimed += 1;
      }
      if (claimed > 0 && other.files.length === 0) {
        deleteOpenSet(this.ledger, other.id);
        this.openSets.delete(other.id);
        touched.delete(other);
      }
    }
    this.openSets.add(set);
    touched.add(set);
    this.logger.info({ setId: id, files: manifest.files.length }, 'manifest received');
    return fileId;
  }

  /** Dispatches every open set that is ready (timeouts); with `force`, every open set (end of a batch). */
  async tick(force = false): Promise<void> {
    const now = this.clock();
    const sets = this.openSets.all();
    // Supporting and reference sets first, so samples of the same batch can pair with them.
    const order = (s: OpenSet): number => (s.standalone ? 0 : s.role === 'reference' ? 1 : 2);
    sets.sort((a, b) => order(a) - order(b));
    await this.dispatchReady(sets, now, force);
  }

  /**
   * Dispatches the ready sets among `sets`, in order: pairings are chosen and the sets marked queued
   * in one transaction (each set sees the ones before it as queued), then each is enqueued. Sets
   * beyond the in-flight limit wait for capacity.
   */
  private async dispatchReady(sets: readonly OpenSet[], now: Date, force = false): Promise<void> {
    if (this.holdDispatch && !force) return;
    const empty: OpenSet[] = [];
    const chosen: { set: OpenSet; reason: string; missing: readonly SetPart[]; paired: string[]; own?: FileRecord[] }[] = [];
    for (const set of sets) {
      if (this.openSets.get(set.id) !== set) continue;
      if (set.files.length === 0 && set.manifest === undefined) {
        empty.push(set);
        continue;
      }
      const readiness = setReadiness(toView(set), this.rules, now);
      if (!readiness.ready && !force) continue;
      if (this.inFlight.size + chosen.length >= this.maxInFlight) {
        if (!this.readyWaitingSet.has(set.id)) {
          this.readyWaitingSet.add(set.id);
          this.readyWaiting.push(set.id);
        }
        continue;
      }
      this.readyWaitingSet.delete(set.id);
      chosen.push({ set, reason: readiness.ready ? readiness.reason : 'end-of-batch', missing: readiness.missingParts, paired: [] });
    }
    if (empty.length === 0 && chosen.length === 0) return;
    this.ledger.transaction(() => {
      for (const set of empty) deleteOpenSet(this.ledger, set.id);
      for (const entry of chosen) {
        const { set } = entry;
        entry.own = filesOfSet(this.ledger, set.id);
        const { pairings } = choosePairings(this.ledger, this.config, this.rules, set, partsPresent(toView(set).files), now, entry.own);
        for (const pairing of pairings) insertPairing(this.ledger, pairing);
        markSetQueued(this.ledger, set.id, set.id, now);
        advanceFilesOfSet(this.ledger, set.id, 'assembled', 'queued', now);
        entry.paired = pairings.map((p) => p.part);
      }
    });
    for (const set of empty) this.openSets.delete(set.id);
    for (const { set, reason, missing, paired } of chosen) {
      this.openSets.delete(set.id);
      this.logger.info({ setId: set.id, reason, missing, paired }, 'set dispatched');
    }
    for (const { set, own } of chosen) {
      await this.enqueue(set.id, set.id, own);
      for (const f of set.files) this.contents.delete(f.fileId);
    }
  }

  /**
   * Builds the payload of a set from the ledger and enqueues it (also used by recovery and reprocess).
   * When an input is gone (INPUT_MISSING) a set's first run fails with that reason and its remaining
   * files are quarantined, instead of stopping the pipeline; a re-run (`jobId` ≠ `setId`) leaves the
   * set as it was. `ownFiles`: the set's own files when the caller has just read them. Returns
   * undefined when enqueued, else why not.
   */
  async enqueue(setId: string, jobId: string = setId, ownFiles?: readonly FileRecord[]): Promise<string | undefined> {
    let payload: AnalysisJobPayload;
    try {
      payload = buildPayload({
        ledger: this.ledger, config: this.config, configHash: this.hash, softwareVersion: this.softwareVersion, rules: this.rules,
        ...(this.detectorCurve === undefined ? {} : { detectorCurve: this.detectorCurve }), now: this.clock(),
        contentOf: (file) => this.contents.take(file.id),
        ...(ownFiles === undefined ? {} : { ownFiles }),
      }, setId);
    } catch (error) {
      if (!(error instanceof InputRejected) || error.code !== 'INPUT_MISSING') throw error;
      const log = this.logger.child({ setId });
      if (jobId !== setId) {
        log.warn({ code: error.code, message: error.message }, 'set not re-run: an input is missing');
        return error.message;
      }
      const movesFailed = commitFailure(this.ledger, this.config, setId, { code: error.code, message: error.message, hint: error.hint }, this.clock());
      log.error({ code: error.code, message: error.message }, 'set failed: an input is missing; its other files are quarantined');
      this.logMovesFailed(log, movesFailed);
      this.setFailed(setId);
      return error.message;
    }
    this.inFlight.add(jobId);
    this.counts.setsDispatched += 1;
    await this.queue.enqueue(jobId, payload);
    return undefined;
  }

  /**
   * Takes a job outcome into the next group commit. On the in-process queue nothing is persisted,
   * so the worker slot is freed at once and the commit runs on (tracked in inFlight; a crash before
   * it lands leaves the set queued, re-enqueued at the next start); a commit that fails is held and
   * tried again (holdFailedCommit). On a persistent queue the job is acknowledged only after its
   * commit, and a failed commit leaves the job to the queue's own retries.
   */
  private onOutcome(outcome: JobOutcome<AnalysisOutput>): Promise<void> {
    if (this.detachCommits) {
      this.takeIntoCommit(outcome);
      return Promise.resolve();
    }
    const committed = new Promise<void>((resolve, reject) => this.commitBuffer.push({ outcome, resolve, reject }));
    this.committing ??= this.runCommits();
    return committed;
  }

  /** Puts a detached outcome (in-process queue) into the next group commit; a failure holds it for a retry. */
  private takeIntoCommit(outcome: JobOutcome<AnalysisOutput>): void {
    // Settled once, like a promise: runCommits rejects a whole batch when commitBatch throws,
    // entries it had already resolved included.
    let settled = false;
    this.commitBuffer.push({
      outcome,
      resolve: () => {
        if (settled) return;
        settled = true;
        this.heldCommits.delete(outcome.id);
      },
      reject: (error) => {
        if (settled) return;
        settled = true;
        this.holdFailedCommit(outcome, error);
      },
    });
    this.committing ??= this.runCommits();
  }

  /**
   * A detached outcome whose commit failed is kept, with its in-flight slot, and committed again
   * after COMMIT_RETRY_FIRST_MS, doubling to COMMIT_RETRY_MAX_MS: a results share that is briefly
   * away or a full disk must not leave a set queued until the next start, which for `watch` may be
   * months away. An error that is neither an I/O nor a database error is let go after
   * COMMIT_RETRY_MAX_FAILURES_OTHER failures, and during drain() at once: the set stays queued and
   * is re-run at the next start (as before the retries existed).
   */
  private holdFailedCommit(outcome: JobOutcome<AnalysisOutput>, error: unknown): void {
    const failures = (this.heldCommits.get(outcome.id)?.failures ?? 0) + 1;
    const log = this.logger.child({ setId: setIdOfJob(outcome.id) });
    if (this.draining || (!isEnvironmentError(error) && failures >= COMMIT_RETRY_MAX_FAILURES_OTHER)) {
      this.heldCommits.delete(outcome.id);
      this.counts.setsNotCommitted += 1;
      log.error({ err: error, failures }, 'commit failed; the set stays queued and is re-run at the next start');
      return;
    }
    const retryInMs = Math.min(COMMIT_RETRY_MAX_MS, COMMIT_RETRY_FIRST_MS * 2 ** (failures - 1));
    // The first failure at error level, the repeats of a lasting outage at warn.
    log[failures === 1 ? 'error' : 'warn']({ err: error, failures, retryInMs }, 'commit failed (are the results, outbox and archive folders writable, is the disk full?); the outcome is kept and committed again later');
    const timer = setTimeout(() => this.retryHeldCommit(outcome.id), retryInMs);
    timer.unref();
    this.heldCommits.set(outcome.id, { outcome, failures, timer });
  }

  /** Puts a held outcome into the next group commit (its timer fired, or drain() wants it now). */
  private retryHeldCommit(jobId: string): void {
    const held = this.heldCommits.get(jobId);
    if (held === undefined || held.timer === undefined) return;
    clearTimeout(held.timer);
    held.timer = undefined;
    this.takeIntoCommit(held.outcome);
  }

  /** Outcomes whose commit failed and that wait for a retry. */
  get heldCommitCount(): number {
    return this.heldCommits.size;
  }

  /** Commits buffered outcomes in batches until none is left; outcomes arriving meanwhile join the next batch. */
  private async runCommits(): Promise<void> {
    try {
      // Let outcomes that finish together (several threads, one event-loop turn) join one batch, and
      // while other jobs are still running give them COMMIT_WINDOW_MS to join it.
      await new Promise<void>((resolve) => setImmediate(resolve));
      if (this.inFlight.size > this.commitBuffer.length) await new Promise<void>((resolve) => setTimeout(resolve, COMMIT_WINDOW_MS));
      while (this.commitBuffer.length > 0) {
        const batch = this.commitBuffer.splice(0, COMMIT_BATCH_MAX);
        try {
          await this.commitBatch(batch);
        } catch (error) {
          for (const entry of batch) entry.reject(error);
        }
        for (const { outcome } of batch) {
          if (!this.heldCommits.has(outcome.id)) this.inFlight.delete(outcome.id);
        }
        try {
          await this.dispatchWaiting();
        } catch (error) {
          this.logger.error({ err: error }, 'dispatch of waiting sets failed; they are dispatched at the next tick or start');
        }
      }
    } finally {
      this.recordMovesNow();
      this.committing = undefined;
    }
  }

  /** Records the archive moves no commit has recorded yet (when no batch follows); a failure leaves them to the next commit, recovery and repair. */
  private recordMovesNow(): void {
    if (this.unrecordedMoves.length === 0) return;
    try {
      recordArchiveMoves(this.ledger, this.unrecordedMoves, this.clock());
      this.unrecordedMoves.length = 0;
    } catch (error) {
      this.logger.error({ err: error, files: this.unrecordedMoves.length }, 'archive moves not recorded; the next commit records them, or the repair finds them');
    }
  }

  private async commitBatch(batch: readonly PendingCommit[]): Promise<void> {
    const now = this.clock();
    const context = { ledger: this.ledger, now };
    const toCommit: { entry: PendingCommit; item: CommitItem }[] = [];
    for (const entry of batch) {
      const { outcome } = entry;
      const setId = setIdOfJob(outcome.id);
      const log = this.logger.child({ setId });
      try {
        const rerun = outcome.id !== setId;
        const set = getSet(this.ledger, setId);
        if (set === undefined || (!rerun && (set.state === 'done' || set.state === 'failed'))) {
          log.debug({ jobId: outcome.id }, 'outcome for a finished set ignored (redelivery)');
          entry.resolve();
          continue;
        }
        if (outcome.status === 'failed') {
          const movesFailed = commitFailure(this.ledger, this.config, setId, outcome.failure, now);
          log.error({ code: outcome.failure.code, message: outcome.failure.message }, 'set failed; its files are quarantined');
          this.logMovesFailed(log, movesFailed);
          this.setFailed(setId);
          entry.resolve();
          continue;
        }
        const unreadable = commitUnreadableSet(this.ledger, this.config, setId, outcome.value.rejectedInputs ?? [], now);
        if (unreadable.files > 0) {
          this.counts.filesRejected += unreadable.files;
          this.counts.filesAccepted -= unreadable.files;
          log.warn({ files: unreadable.files }, 'no file of the set could be read; the set failed and its files are quarantined');
          this.logMovesFailed(log, unreadable.movesFailed);
          this.setFailed(setId);
          entry.resolve();
          continue;
        }
        const result = await applyStages(this.stages, outcome.value.result, context);
        toCommit.push({ entry, item: { output: outcome.value, result, setCreatedAt: new Date(set.createdAt) } });
      } catch (error) {
        entry.reject(error);
      }
    }
    if (toCommit.length === 0) return;
    let outcomes;
    const carried = this.unrecordedMoves.splice(0);
    try {
      const done = await commitResults(this.ledger, this.config, toCommit.map((c) => c.item), now, carried);
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
      const { entry, item: { result } } = pending;
      if (!committed.ok) {
        entry.reject(committed.error);
        return;
      }
      const log = this.logger.child({ setId: committed.setId });
      if (committed.filesRejected > 0) {
        this.counts.filesRejected += committed.filesRejected;
        this.counts.filesAccepted -= committed.filesRejected;
        log.warn({ files: committed.filesRejected }, 'inputs rejected by the worker were quarantined');
      }
      this.counts.setsDone += 1;
      if (result.partial) this.counts.setsPartial += 1;
      log.info({ result: committed.path, partial: result.partial, missing: result.missing.map((m) => m.what) }, 'result written');
      this.logMovesFailed(log, committed.movesFailed);
      for (const stage of this.stages) {
        if (stage.afterCommit === undefined) continue;
        Promise.resolve()
          .then(() => stage.afterCommit?.(result, context))
          .catch((error: unknown) => log.error({ stage: stage.name, err: error }, 'result stage afterCommit failed'));
      }
      this.notify(committed.setId, committed.path);
      entry.resolve();
    });
  }

  /** Dispatches ready sets that waited for queue capacity, oldest first. */
  private async dispatchWaiting(): Promise<void> {
    while (this.inFlight.size < this.maxInFlight && this.readyWaiting.length > 0) {
      const room = this.maxInFlight - this.inFlight.size;
      const ids = this.readyWaiting.splice(0, room);
      const sets: OpenSet[] = [];
      for (const id of ids) {
        this.readyWaitingSet.delete(id);
        const set = this.openSets.get(id);
        if (set !== undefined) sets.push(set);
      }
      await this.dispatchReady(sets, this.clock(), true);
    }
  }

  /** Logs file moves that failed after a set was recorded done or failed (error undefined: none failed). */
  private logMovesFailed(log: Logger, error: unknown): void {
    if (error === undefined) return;
    log.error({ err: error }, 'set recorded, but moving its inputs out of the inbox failed; they are moved by the next repair (watch: every watch.rescanIntervalMs; process: its next run)');
  }

  /** Counts a set that failed and tells the listeners (no result path). */
  private setFailed(setId: string): void {
    this.counts.setsFailed += 1;
    this.notify(setId, undefined);
  }

  private notify(setId: string, path: string | undefined): void {
    for (const listener of this.committedListeners) listener(setId, path);
  }

  /**
   * Waits until every dispatched job (and every ready set waiting for capacity) is committed. Held
   * failed commits are tried once more at once; one that fails again is let go (its set stays queued
   * and is re-run at the next start), so a lasting outage cannot keep `watch` from stopping.
   */
  async drain(): Promise<void> {
    this.draining = true;
    try {
      for (const jobId of [...this.heldCommits.keys()]) this.retryHeldCommit(jobId);
      while (this.inFlight.size > 0 || this.readyWaiting.length > 0) {
        if (this.inFlight.size === 0) await this.dispatchWaiting();
        await this.queue.drain();
        if (this.inFlight.size > 0) await new Promise((r) => setTimeout(r, 20));
      }
    } finally {
      this.draining = false;
    }
  }
}
