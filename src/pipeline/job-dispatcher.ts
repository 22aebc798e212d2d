// Dispatch with back-pressure: ready open sets are marked queued (pairings chosen, in one ledger
// transaction), their self-contained payloads built (dispatch.ts) and handed to the job queue, as
// long as in-flight slots are free; the others wait in line (InFlightSlots) and go out as commits
// release slots. A set whose input vanished fails here with INPUT_MISSING instead of stopping the
// pipeline.
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { basename } from 'node:path';
import type { Logger } from 'pino';
import { InputRejected } from '../model/errors.js';
import type { AnalysisJobPayload, AnalysisOutput, PayloadFile } from '../analysis/payload.js';
import type { Reanalysis, SetPart } from '../analysis/result.js';
import type { DriftlightConfig } from '../config/resolve.js';
import type { JobQueue } from '../queue/job-queue.js';
import type { Ledger } from '../store/ledger.js';
import { advanceFilesOfSet, filesOfSet, type FileRecord } from '../store/files.js';
import { getResult } from '../store/results.js';
import {
  deleteOpenSet,
  deletePairingsOfSet,
  doneSampleSetIdsMeasuredBetween,
  getSet,
  insertPairing,
  markSetQueued,
  pairingsOfSet,
} from '../store/sets.js';
import { isoFromEpochMs } from '../model/acquisition-time.js';
import { partsPresent, setReadiness, type AssemblyRules } from './assemble.js';
import { commitFailure } from './commit.js';
import type { ContentCache } from './content-cache.js';
import {
  buildPayload,
  choosePairings,
  needsSessionReference,
  readText,
  sessionReferenceSetId,
  setAcquisition,
  setMeasuredAtOr,
} from './dispatch.js';
import { InFlightSlots } from './in-flight.js';
import {
  isUnfulfilledManifestSet,
  quarantineUnfulfilledManifest,
  recordUnfulfilledManifest,
  unfulfilledManifestError,
} from './manifest-unfulfilled.js';
import { isRerunJob, versionedJobId } from './input-versions.js';
import { versionCountOfSet } from '../store/file-versions.js';
import { toView, type OpenSet } from './open-sets.js';
import { logMovesFailed, type RunReport } from './run-report.js';
import { configHash } from './settings.js';

/**
 * Jobs dispatched and not yet committed, per worker (back-pressure; room for a commit group while
 * the threads work on their next shares). 16 rather than 8: with 8, dispatch stalled behind commits
 * under a backlog (measurements in docs/benchmarks.md).
 */
export const MAX_IN_FLIGHT_PER_WORKER = 16;

/** The open sets dispatch takes from: the set assembly's current view. */
export interface OpenSetLookup {
  get(id: string): OpenSet | undefined;
  delete(id: string): void;
}

/** What every payload carries besides the set: the assembly rules, the config hash and the configured detector curve. */
export interface DispatchSettings {
  readonly rules: AssemblyRules;
  readonly configHash: string;
  readonly detectorCurve: PayloadFile | undefined;
}

/** Reads the configured detector-correction curve (if any) and hashes the config with it. */
export function dispatchSettingsFrom(config: DriftlightConfig, rules: AssemblyRules): DispatchSettings {
  const curvePath = config.instrument.detectorCorrectionFile;
  if (curvePath === undefined) return { rules, configHash: configHash(config, undefined), detectorCurve: undefined };
  const content = readText(curvePath);
  const sha256 = createHash('sha256').update(readFileSync(curvePath)).digest('hex');
  return {
    rules,
    configHash: configHash(config, sha256),
    detectorCurve: {
      name: basename(curvePath),
      sha256,
      part: 'detector-curve',
      role: 'detector-curve',
      origin: 'config',
      content,
    },
  };
}

export interface JobDispatcherOptions {
  readonly config: DriftlightConfig;
  readonly ledger: Ledger;
  readonly queue: JobQueue<AnalysisJobPayload, AnalysisOutput>;
  readonly logger: Logger;
  readonly clock: () => Date;
  readonly softwareVersion: string;
  readonly settings: DispatchSettings;
  readonly openSets: OpenSetLookup;
  /** Bytes read at intake, taken for the payload instead of reading the file again. */
  readonly contents: ContentCache;
  readonly report: RunReport;
}

export class JobDispatcher {
  /** Batch mode: sets are only dispatched with `force` (tick(true)), in dependency order. */
  holdDispatch = false;
  private readonly slots: InFlightSlots;
  /** Complete sets waiting for the reference standard of their session (issue 16.4), until it comes or their deadline passes. */
  private readonly awaitingReference = new Set<string>();

  constructor(private readonly options: JobDispatcherOptions) {
    this.slots = new InFlightSlots(
      Math.max(MAX_IN_FLIGHT_PER_WORKER, MAX_IN_FLIGHT_PER_WORKER * options.config.queue.concurrency),
    );
  }

  /** Jobs dispatched and not yet committed. */
  get inFlight(): number {
    return this.slots.size;
  }

  /** Ready sets waiting for an in-flight slot. */
  get waiting(): number {
    return this.slots.waitingCount;
  }

  /** Frees the slot of a job whose commit is done or let go. */
  release(jobId: string): void {
    this.slots.release(jobId);
  }

  /** Resolves once no job is in flight. */
  whenNoneInFlight(): Promise<void> {
    return this.slots.whenEmpty();
  }

  /**
   * Dispatches the ready sets among `sets`, in order: pairings are chosen and the sets marked queued
   * in one transaction (each set sees the ones before it as queued), then each is enqueued. Sets
   * beyond the in-flight limit wait for capacity. With `force`, sets not ready go too (end of a batch).
   */
  async dispatchReady(sets: readonly OpenSet[], now: Date, force = false): Promise<void> {
    if (this.holdDispatch && !force) return;
    const {
      ledger,
      config,
      openSets,
      logger,
      settings: { rules },
    } = this.options;
    const empty: OpenSet[] = [];
    const unfulfilled: { set: OpenSet; error: InputRejected; manifests?: FileRecord[] }[] = [];
    const chosen: {
      set: OpenSet;
      reason: string;
      missing: readonly SetPart[];
      paired: string[];
      own?: FileRecord[];
      jobId?: string;
    }[] = [];
    for (const set of sets) {
      if (openSets.get(set.id) !== set) continue;
      if (set.files.length === 0 && set.manifest === undefined) {
        empty.push(set);
        continue;
      }
      const readiness = setReadiness(toView(set), rules, now);
      if (!readiness.ready && !force) continue;
      // A manifest set none of whose files came is rejected, not analysed empty.
      if (isUnfulfilledManifestSet(set)) {
        unfulfilled.push({ set, error: unfulfilledManifestError(ledger, set, rules.setTimeoutMs, !readiness.ready) });
        continue;
      }
      // A complete sample or control waits for its session's reference until its deadline (a timeout or the end of a batch sends it on).
      if (!force && now.getTime() < set.deadlineAt.getTime() && this.waitsForReference(set, now)) {
        if (!this.awaitingReference.has(set.id))
          logger.info(
            { setId: set.id, until: set.deadlineAt.toISOString() },
            'set complete; waiting for the reference standard of its session',
          );
        this.awaitingReference.add(set.id);
        continue;
      }
      this.awaitingReference.delete(set.id);
      if (this.slots.room(chosen.length) === 0) {
        this.slots.wait(set.id);
        continue;
      }
      this.slots.dispatched(set.id);
      chosen.push({
        set,
        reason: readiness.ready ? readiness.reason : 'end-of-batch',
        missing: readiness.missingParts,
        paired: [],
      });
    }
    if (empty.length === 0 && chosen.length === 0 && unfulfilled.length === 0) return;
    ledger.transaction(() => {
      for (const set of empty) deleteOpenSet(ledger, set.id);
      for (const entry of unfulfilled)
        entry.manifests = recordUnfulfilledManifest(ledger, entry.set.id, entry.error, now);
      for (const entry of chosen) {
        const { set } = entry;
        entry.own = filesOfSet(ledger, set.id);
        const { pairings } = choosePairings(
          ledger,
          config,
          rules,
          set,
          partsPresent(toView(set).files),
          now,
          entry.own,
        );
        for (const pairing of pairings) insertPairing(ledger, pairing);
        // A set run again after a new version of an input gets a new job id (a queue may keep finished ids).
        entry.jobId = versionedJobId(set.id, versionCountOfSet(ledger, set.id));
        markSetQueued(ledger, set.id, entry.jobId, now);
        advanceFilesOfSet(ledger, set.id, 'assembled', 'queued', now);
        entry.paired = pairings.map((p) => p.part);
      }
    });
    for (const set of empty) openSets.delete(set.id);
    for (const { set, error, manifests } of unfulfilled) {
      openSets.delete(set.id);
      const log = logger.child({ setId: set.id });
      log.warn({ code: error.code, message: error.message }, 'manifest rejected: none of its files could be used');
      logMovesFailed(log, quarantineUnfulfilledManifest(ledger, config, set.id, manifests ?? [], error, now));
      this.options.report.setFailed(set.id);
    }
    for (const { set, reason, missing, paired } of chosen) {
      openSets.delete(set.id);
      logger.info({ setId: set.id, reason, missing, paired }, 'set dispatched');
    }
    for (const { set, own, jobId } of chosen) {
      await this.enqueue(set.id, jobId ?? set.id, own);
      for (const f of set.files) this.options.contents.delete(f.fileId);
    }
    const references = chosen.filter((entry) => entry.set.role === 'reference').map((entry) => entry.set.id);
    if (references.length === 0) return;
    // A reference is in the ledger now: the sets waiting for their session's reference look again,
    // and sets already analysed without one of their session are analysed again.
    const waiting = [...this.awaitingReference].flatMap((id) => openSets.get(id) ?? []);
    if (waiting.length > 0) await this.dispatchReady(waiting, now);
    for (const referenceSetId of references) await this.reanalyseForReference(referenceSetId);
  }

  /** Whether a complete set needs a reference (needsSessionReference) and none of its session is queued or done yet. */
  private waitsForReference(set: OpenSet, now: Date): boolean {
    const { ledger, config } = this.options;
    if (!needsSessionReference(config, set.role, partsPresent(toView(set).files))) return false;
    return (
      sessionReferenceSetId(ledger, config, setMeasuredAtOr(filesOfSet(ledger, set.id), now), set.id) === undefined
    );
  }

  /**
   * Issue 16.4: re-analyses the sample and control sets done without a reference of their session
   * that `referenceSetId` (just dispatched) belongs to: their reference pairing is chosen again and
   * the set re-run (job id SETID~ref-REFERENCE); the newer result supersedes the older, and its
   * provenance.reanalysis says why and what it replaced. Sets with their own reference are left alone.
   */
  private async reanalyseForReference(referenceSetId: string): Promise<void> {
    const {
      ledger,
      config,
      logger,
      settings: { rules },
      clock,
    } = this.options;
    const sessionMs = config.assembly.referenceSessionHours * 3_600_000;
    const reference = setAcquisition(filesOfSet(ledger, referenceSetId));
    if (sessionMs <= 0 || reference === undefined) return;
    const candidates = doneSampleSetIdsMeasuredBetween(
      ledger,
      isoFromEpochMs(reference.epochMs - sessionMs),
      isoFromEpochMs(reference.epochMs + sessionMs),
    );
    for (const setId of candidates) {
      const set = getSet(ledger, setId);
      const own = filesOfSet(ledger, setId);
      const measured = setAcquisition(own);
      const previous = getResult(ledger, setId);
      if (set === undefined || measured === undefined || previous === undefined) continue;
      const present = partsPresent(
        own.flatMap((f) =>
          f.part === null || f.state === 'rejected'
            ? []
            : [{ name: f.name, part: f.part as SetPart, hasIrfColumn: f.hasIrfColumn }],
        ),
      );
      if (!needsSessionReference(config, set.role, present)) continue;
      const pairedFrom =
        pairingsOfSet(ledger, setId).find((p) => p.part === 'reference-emission')?.fromSetId ?? undefined;
      const pairedAt = pairedFrom === undefined ? undefined : setAcquisition(filesOfSet(ledger, pairedFrom));
      if (pairedAt !== undefined && Math.abs(pairedAt.epochMs - measured.epochMs) <= sessionMs) continue; // already has one of its session
      let chosenFrom: string | undefined;
      ledger.transaction(() => {
        deletePairingsOfSet(ledger, setId, ['reference-emission', 'reference-absorbance']);
        const { pairings } = choosePairings(
          ledger,
          config,
          rules,
          { id: setId, sampleId: set.sampleId, role: set.role as OpenSet['role'] },
          present,
          clock(),
          own,
        );
        for (const pairing of pairings) {
          if (pairing.part === 'reference-emission' || pairing.part === 'reference-absorbance')
            insertPairing(ledger, pairing);
        }
        chosenFrom = pairings.find((p) => p.part === 'reference-emission')?.fromSetId ?? undefined;
      });
      if (chosenFrom === undefined || chosenFrom === pairedFrom) continue;
      const reanalysis: Reanalysis = {
        reason: 'reference-arrived',
        referenceSetId: chosenFrom,
        supersedes: {
          analyzedAt: previous.analyzedAt,
          resultSha256: previous.resultSha256,
          ...(pairedFrom === undefined ? {} : { referenceSetId: pairedFrom }),
          ...(previous.quantumYield === null ? {} : { quantumYield: previous.quantumYield }),
        },
      };
      logger.info(
        { setId, referenceSetId: chosenFrom, supersedes: previous.resultSha256 },
        're-analysing a set: the reference standard of its session arrived after it was analysed',
      );
      await this.enqueue(setId, `${setId}~ref-${chosenFrom}`, own, reanalysis);
    }
  }

  /** Dispatches ready sets that waited for queue capacity, oldest first. */
  async dispatchWaiting(): Promise<void> {
    while (this.slots.room() > 0 && this.slots.waitingCount > 0) {
      const sets: OpenSet[] = [];
      for (const id of this.slots.takeWaiting(this.slots.room())) {
        const set = this.options.openSets.get(id);
        if (set !== undefined) sets.push(set);
      }
      await this.dispatchReady(sets, this.options.clock(), true);
    }
  }

  /**
   * Builds the payload of a set from the ledger and enqueues it (also used by recovery and reprocess).
   * When an input is gone (INPUT_MISSING) a set's first run fails with that reason and its remaining
   * files are quarantined, instead of stopping the pipeline; a re-run on request (`~r` job id)
   * leaves the set as it was. `ownFiles`: the set's own files when the caller has just read them. Returns
   * undefined when enqueued, else why not.
   */
  async enqueue(
    setId: string,
    jobId: string = setId,
    ownFiles?: readonly FileRecord[],
    reanalysis?: Reanalysis,
  ): Promise<string | undefined> {
    const { ledger, config, settings, clock, contents } = this.options;
    let payload: AnalysisJobPayload;
    try {
      payload = buildPayload(
        {
          ledger,
          config,
          configHash: settings.configHash,
          softwareVersion: this.options.softwareVersion,
          rules: settings.rules,
          ...(settings.detectorCurve === undefined ? {} : { detectorCurve: settings.detectorCurve }),
          now: clock(),
          contentOf: (file) => contents.take(file.id),
          ...(ownFiles === undefined ? {} : { ownFiles }),
          ...(reanalysis === undefined ? {} : { reanalysis }),
        },
        setId,
      );
    } catch (error) {
      if (!(error instanceof InputRejected) || error.code !== 'INPUT_MISSING') throw error;
      const log = this.options.logger.child({ setId });
      if (isRerunJob(jobId)) {
        log.warn({ code: error.code, message: error.message }, 'set not re-run: an input is missing');
        return error.message;
      }
      const movesFailed = commitFailure(
        ledger,
        config,
        setId,
        { code: error.code, message: error.message, hint: error.hint },
        clock(),
      );
      log.error(
        { code: error.code, message: error.message },
        'set failed: an input is missing; its other files are quarantined',
      );
      logMovesFailed(log, movesFailed);
      this.options.report.setFailed(setId);
      return error.message;
    }
    this.slots.take(jobId);
    this.options.report.setDispatched();
    await this.options.queue.enqueue(jobId, payload);
    return undefined;
  }
}
