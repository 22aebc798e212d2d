// The coordinator: the single writer of the ledger, results, outbox and archive moves. It takes
// stable files (from the watcher or a batch), assembles sets, dispatches ready ones to the job
// queue with self-contained payloads, and commits each outcome exactly once.
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { basename, dirname } from 'node:path';
import type { Logger } from 'pino';
import type { MeasurementRole } from '../model/spectrum.js';
import type { AnalysisJobPayload, AnalysisOutput, PayloadFile } from '../analysis/payload.js';
import type { SetPart } from '../analysis/result.js';
import type { DriftlightConfig } from '../config/resolve.js';
import type { JobOutcome, JobQueue } from '../queue/job-queue.js';
import type { Ledger } from '../store/ledger.js';
import { getFile, insertFile, setFileFacts, setFileState } from '../store/files.js';
import { deleteOpenSet, getSet, insertPairing, insertSet, markSetQueued } from '../store/sets.js';
import { classifyFile, makeSetId, partsPresent, placeFile, setReadiness, type AssemblyRules } from './assemble.js';
import { commitFailure, commitResult } from './commit.js';
import { buildPayload, choosePairings, readText } from './dispatch.js';
import { intakeFile, type IntakeFile, type IntakeResult } from './intake.js';
import { recoverMoves } from './recovery.js';
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
}

/** Parses the set id out of a job id (`SETID` or `SETID~rN` for re-runs). */
export function setIdOfJob(jobId: string): string {
  const cut = jobId.indexOf('~');
  return cut < 0 ? jobId : jobId.slice(0, cut);
}

export class Coordinator {
  /** Batch mode: sets are only dispatched by tick(true), in dependency order (supporting, reference, samples). */
  holdDispatch = false;
  readonly counts: CoordinatorCounts = { filesAccepted: 0, filesRejected: 0, setsDispatched: 0, setsDone: 0, setsFailed: 0, setsPartial: 0 };
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
  /** Most jobs handed to the queue at once: 4 per worker. */
  private readonly maxInFlight: number;
  /** Whether outcomes are committed after the queue slot is released (in-process queue: nothing to acknowledge). */
  private readonly detachCommits: boolean;
  /** Listeners told about each committed result (CLI progress, reprocess diffs, benchmarks). */
  private readonly committedListeners: ((setId: string, resultPath: string | undefined) => void)[] = [];

  constructor(options: CoordinatorOptions) {
    this.config = options.config;
    this.ledger = options.ledger;
    this.queue = options.queue;
    this.logger = options.logger;
    this.stages = options.stages ?? [];
    this.clock = options.clock ?? (() => new Date());
    this.softwareVersion = options.softwareVersion;
    const c = this.config;
    this.maxInFlight = Math.max(4, 4 * c.queue.concurrency);
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

  /** Crash recovery: re-enqueues queued sets; finishing moves of done/failed files happens on intake and here. */
  async recover(): Promise<void> {
    const queued = this.ledger.prepare(`SELECT id FROM sets WHERE state = 'queued' ORDER BY created_at, id`).all() as { id: string }[];
    for (const { id } of queued) await this.enqueue(id);
    recoverMoves(this.ledger, this.config, this.clock());
    this.openSets = OpenSets.load(this.ledger);
    if (queued.length > 0) this.logger.info({ sets: queued.length }, 'recovery: re-enqueued queued sets');
  }

  /** Takes one stable file: records, reads and assembles it (bad files are quarantined). */
  async intake(path: string): Promise<void> {
    const now = this.clock();
    let outcome: IntakeResult;
    try {
      outcome = intakeFile(this.ledger, this.config, path, now);
    } catch (error) {
      this.logger.error({ file: path, err: error }, 'intake failed; the file stays in the inbox and is retried at the next start');
      return;
    }
    if (outcome.kind === 'rejected') {
      this.counts.filesRejected += 1;
      this.logger.warn({ file: path }, 'input rejected and quarantined');
      return;
    }
    if (outcome.kind === 'gone' || outcome.kind === 'known') return;
    this.counts.filesAccepted += 1;
    if (outcome.kind === 'manifest') await this.assembleManifest(outcome.file, outcome.manifest, now);
    else await this.assembleData(outcome.file, outcome.parsed, now);
  }

  private async assembleData(file: IntakeFile, parsed: ParsedData, now: Date): Promise<void> {
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
    let created = false;
    if (placement.kind === 'join') {
      const found = this.openSets.get(placement.setId);
      if (found === undefined) throw new Error(`open set ${placement.setId} vanished`);
      set = found;
    } else {
      const id = makeSetId(placement.sampleId, file.sha256);
      set = { id, sampleId: placement.sampleId, role: placement.role, createdAt: now, deadlineAt: new Date(now.getTime() + this.rules.setTimeoutMs), files: [], standalone: placement.standalone };
      created = true;
    }
    const listed = set.manifest?.manifest.files.find((f) => f.file === file.name);
    const part: SetPart = listed?.part ?? classification.part;
    const role: MeasurementRole = listed?.role ?? classification.role;
    // One transaction records the file and puts it in its set: a crash leaves either nothing (the
    // start-up scan reads the file again) or the file in its set.
    const fileId = this.ledger.transaction(() => {
      const id = file.id ?? insertFile(this.ledger, file, now).id;
      if (created) insertSet(this.ledger, { id: set.id, sampleId: set.sampleId, role: set.role, source: classification.sampleIdSource, createdAt: now, deadlineAt: set.deadlineAt });
      setFileFacts(this.ledger, id, {
        dataType: parsed.type, part, role, sampleId: classification.sampleId, acquiredAt: metadata.acquiredAt ?? null,
        excitationNm: metadata.excitationNm ?? null, solvent: metadata.solvent ?? null, hasIrfColumn,
      }, now);
      setFileState(this.ledger, id, 'assembled', now, set.id);
      return id;
    });
    if (created) this.openSets.add(set);
    set.files.push({ fileId, name: file.name, path: file.path, part, hasIrfColumn });
    this.logger.debug({ setId: set.id, file: file.name, part }, 'file assembled');
    await this.dispatchIfReady(set, now);
  }

  private async assembleManifest(file: IntakeFile, manifest: SetManifest, now: Date): Promise<void> {
    const dir = dirname(file.path);
    const id = makeSetId(manifest.sampleId, file.sha256);
    const set: OpenSet = {
      id, sampleId: manifest.sampleId, role: manifest.role, createdAt: now, deadlineAt: new Date(now.getTime() + this.rules.setTimeoutMs),
      files: [], manifest: { dir, manifest }, standalone: false,
    };
    const manifestJson = JSON.stringify(set.manifest);
    this.ledger.transaction(() => {
      const fileId = file.id ?? insertFile(this.ledger, file, now).id;
      insertSet(this.ledger, { id, sampleId: manifest.sampleId, role: manifest.role, source: 'manifest', createdAt: now, deadlineAt: set.deadlineAt, manifestJson });
      setFileFacts(this.ledger, fileId, { dataType: 'manifest', part: null, role: manifest.role, sampleId: manifest.sampleId, acquiredAt: null, excitationNm: manifest.excitationNm ?? null, solvent: manifest.solvent ?? null, hasIrfColumn: false }, now);
      setFileState(this.ledger, fileId, 'assembled', now, id);
      // Claim listed files already waiting in other open sets.
      for (const other of this.openSets.all()) {
        for (const member of [...other.files]) {
          const listed = manifest.files.find((f) => f.file === member.name);
          if (listed === undefined || dirname(member.path) !== dir) continue;
          const record = getFile(this.ledger, member.fileId);
          if (record === undefined) continue;
          this.ledger.prepare('UPDATE files SET set_id = ?, part = ?, role = COALESCE(?, role) WHERE id = ?').run(id, listed.part, listed.role ?? null, member.fileId);
          other.files.splice(other.files.indexOf(member), 1);
          set.files.push({ ...member, part: listed.part });
        }
        if (other.files.length === 0) {
          deleteOpenSet(this.ledger, other.id);
          this.openSets.delete(other.id);
        }
      }
    });
    this.openSets.add(set);
    this.logger.info({ setId: id, files: manifest.files.length }, 'manifest received');
    await this.dispatchIfReady(set, now);
  }

  /** Dispatches every open set that is ready (timeouts); with `force`, every open set (end of a batch). */
  async tick(force = false): Promise<void> {
    const now = this.clock();
    const sets = this.openSets.all();
    // Supporting and reference sets first, so samples of the same batch can pair with them.
    const order = (s: OpenSet): number => (s.standalone ? 0 : s.role === 'reference' ? 1 : 2);
    sets.sort((a, b) => order(a) - order(b));
    for (const set of sets) await this.dispatchIfReady(set, now, force);
  }

  private async dispatchIfReady(set: OpenSet, now: Date, force = false): Promise<void> {
    if (this.holdDispatch && !force) return;
    if (set.files.length === 0 && set.manifest === undefined) {
      this.ledger.transaction(() => deleteOpenSet(this.ledger, set.id));
      this.openSets.delete(set.id);
      return;
    }
    const readiness = setReadiness(toView(set), this.rules, now);
    if (!readiness.ready && !force) return;
    if (this.inFlight.size >= this.maxInFlight) {
      if (!this.readyWaitingSet.has(set.id)) {
        this.readyWaitingSet.add(set.id);
        this.readyWaiting.push(set.id);
      }
      return;
    }
    this.readyWaitingSet.delete(set.id);
    const present = partsPresent(toView(set).files);
    const { pairings } = choosePairings(this.ledger, this.config, this.rules, set, present, now);
    const jobId = set.id;
    this.ledger.transaction(() => {
      for (const pairing of pairings) insertPairing(this.ledger, pairing);
      markSetQueued(this.ledger, set.id, jobId, now);
      for (const f of set.files) setFileState(this.ledger, f.fileId, 'queued', now);
    });
    this.openSets.delete(set.id);
    this.logger.info({ setId: set.id, reason: readiness.ready ? readiness.reason : 'end-of-batch', missing: readiness.missingParts, paired: pairings.map((p) => p.part) }, 'set dispatched');
    await this.enqueue(set.id, jobId);
  }

  /** Builds the payload of a set from the ledger and enqueues it (also used by recovery and reprocess). */
  async enqueue(setId: string, jobId: string = setId): Promise<void> {
    const payload = buildPayload({
      ledger: this.ledger, config: this.config, configHash: this.hash, softwareVersion: this.softwareVersion, rules: this.rules,
      ...(this.detectorCurve === undefined ? {} : { detectorCurve: this.detectorCurve }), now: this.clock(),
    }, setId);
    this.inFlight.add(jobId);
    this.counts.setsDispatched += 1;
    await this.queue.enqueue(jobId, payload);
  }

  /**
   * Takes a job outcome. On the in-process queue nothing is persisted, so the worker slot is freed at
   * once and the commit runs on (tracked in inFlight; a crash before it lands leaves the set queued,
   * re-enqueued at the next start). On a persistent queue the job is acknowledged only after the commit.
   */
  private onOutcome(outcome: JobOutcome<AnalysisOutput>): Promise<void> {
    if (!this.detachCommits) return this.commitOutcome(outcome);
    this.commitOutcome(outcome).catch((error: unknown) => {
      this.logger.error({ setId: setIdOfJob(outcome.id), err: error }, 'commit failed; the set stays queued and is re-run at the next start');
    });
    return Promise.resolve();
  }

  private async commitOutcome(outcome: JobOutcome<AnalysisOutput>): Promise<void> {
    const setId = setIdOfJob(outcome.id);
    const log = this.logger.child({ setId });
    const rerun = outcome.id !== setId;
    try {
      const set = getSet(this.ledger, setId);
      if (set === undefined || (!rerun && (set.state === 'done' || set.state === 'failed'))) {
        log.debug({ jobId: outcome.id }, 'outcome for a finished set ignored (redelivery)');
        return;
      }
      const now = this.clock();
      if (outcome.status === 'failed') {
        commitFailure(this.ledger, this.config, setId, outcome.failure, now);
        this.counts.setsFailed += 1;
        log.error({ code: outcome.failure.code, message: outcome.failure.message }, 'set failed; its files are quarantined');
        this.notify(setId, undefined);
        return;
      }
      const context = { ledger: this.ledger, now };
      const result = await applyStages(this.stages, outcome.value.result, context);
      const { path, filesRejected } = await commitResult(this.ledger, this.config, outcome.value, result, now);
      if (filesRejected > 0) {
        this.counts.filesRejected += filesRejected;
        this.counts.filesAccepted -= filesRejected;
        log.warn({ files: filesRejected }, 'inputs rejected by the worker were quarantined');
      }
      this.counts.setsDone += 1;
      if (result.partial) this.counts.setsPartial += 1;
      log.info({ result: path, partial: result.partial, missing: result.missing.map((m) => m.what) }, 'result written');
      for (const stage of this.stages) {
        if (stage.afterCommit === undefined) continue;
        Promise.resolve()
          .then(() => stage.afterCommit?.(result, context))
          .catch((error: unknown) => log.error({ stage: stage.name, err: error }, 'result stage afterCommit failed'));
      }
      this.notify(setId, path);
    } finally {
      this.inFlight.delete(outcome.id);
      await this.dispatchWaiting();
    }
  }

  /** Dispatches ready sets that waited for queue capacity, oldest first. */
  private async dispatchWaiting(): Promise<void> {
    while (this.inFlight.size < this.maxInFlight && this.readyWaiting.length > 0) {
      const id = this.readyWaiting.shift();
      if (id === undefined) break;
      const set = this.openSets.get(id);
      if (set === undefined) {
        this.readyWaitingSet.delete(id);
        continue;
      }
      await this.dispatchIfReady(set, this.clock(), true);
    }
  }

  private notify(setId: string, path: string | undefined): void {
    for (const listener of this.committedListeners) listener(setId, path);
  }

  /** Waits until every dispatched job (and every ready set waiting for capacity) is committed. */
  async drain(): Promise<void> {
    while (this.inFlight.size > 0 || this.readyWaiting.length > 0) {
      if (this.inFlight.size === 0) await this.dispatchWaiting();
      await this.queue.drain();
      if (this.inFlight.size > 0) await new Promise((r) => setTimeout(r, 20));
    }
  }
}
