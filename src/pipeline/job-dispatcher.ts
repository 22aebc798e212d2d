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
import type { SetPart } from '../analysis/result.js';
import type { DriftlightConfig } from '../config/resolve.js';
import type { JobQueue } from '../queue/job-queue.js';
import type { Ledger } from '../store/ledger.js';
import { advanceFilesOfSet, filesOfSet, type FileRecord } from '../store/files.js';
import { deleteOpenSet, insertPairing, markSetQueued } from '../store/sets.js';
import { partsPresent, setReadiness, type AssemblyRules } from './assemble.js';
import { commitFailure } from './commit.js';
import type { ContentCache } from './content-cache.js';
import { buildPayload, choosePairings, readText } from './dispatch.js';
import { InFlightSlots } from './in-flight.js';
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
  return { rules, configHash: configHash(config, sha256), detectorCurve: { name: basename(curvePath), sha256, part: 'detector-curve', role: 'detector-curve', origin: 'config', content } };
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

  constructor(private readonly options: JobDispatcherOptions) {
    this.slots = new InFlightSlots(Math.max(MAX_IN_FLIGHT_PER_WORKER, MAX_IN_FLIGHT_PER_WORKER * options.config.queue.concurrency));
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
    const { ledger, config, openSets, logger, settings: { rules } } = this.options;
    const empty: OpenSet[] = [];
    const chosen: { set: OpenSet; reason: string; missing: readonly SetPart[]; paired: string[]; own?: FileRecord[] }[] = [];
    for (const set of sets) {
      if (openSets.get(set.id) !== set) continue;
      if (set.files.length === 0 && set.manifest === undefined) {
        empty.push(set);
        continue;
      }
      const readiness = setReadiness(toView(set), rules, now);
      if (!readiness.ready && !force) continue;
      if (this.slots.room(chosen.length) === 0) {
        this.slots.wait(set.id);
        continue;
      }
      this.slots.dispatched(set.id);
      chosen.push({ set, reason: readiness.ready ? readiness.reason : 'end-of-batch', missing: readiness.missingParts, paired: [] });
    }
    if (empty.length === 0 && chosen.length === 0) return;
    ledger.transaction(() => {
      for (const set of empty) deleteOpenSet(ledger, set.id);
      for (const entry of chosen) {
        const { set } = entry;
        entry.own = filesOfSet(ledger, set.id);
        const { pairings } = choosePairings(ledger, config, rules, set, partsPresent(toView(set).files), now, entry.own);
        for (const pairing of pairings) insertPairing(ledger, pairing);
        markSetQueued(ledger, set.id, set.id, now);
        advanceFilesOfSet(ledger, set.id, 'assembled', 'queued', now);
        entry.paired = pairings.map((p) => p.part);
      }
    });
    for (const set of empty) openSets.delete(set.id);
    for (const { set, reason, missing, paired } of chosen) {
      openSets.delete(set.id);
      logger.info({ setId: set.id, reason, missing, paired }, 'set dispatched');
    }
    for (const { set, own } of chosen) {
      await this.enqueue(set.id, set.id, own);
      for (const f of set.files) this.options.contents.delete(f.fileId);
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
   * files are quarantined, instead of stopping the pipeline; a re-run (`jobId` ≠ `setId`) leaves the
   * set as it was. `ownFiles`: the set's own files when the caller has just read them. Returns
   * undefined when enqueued, else why not.
   */
  async enqueue(setId: string, jobId: string = setId, ownFiles?: readonly FileRecord[]): Promise<string | undefined> {
    const { ledger, config, settings, clock, contents } = this.options;
    let payload: AnalysisJobPayload;
    try {
      payload = buildPayload({
        ledger, config, configHash: settings.configHash, softwareVersion: this.options.softwareVersion, rules: settings.rules,
        ...(settings.detectorCurve === undefined ? {} : { detectorCurve: settings.detectorCurve }), now: clock(),
        contentOf: (file) => contents.take(file.id),
        ...(ownFiles === undefined ? {} : { ownFiles }),
      }, setId);
    } catch (error) {
      if (!(error instanceof InputRejected) || error.code !== 'INPUT_MISSING') throw error;
      const log = this.options.logger.child({ setId });
      if (jobId !== setId) {
        log.warn({ code: error.code, message: error.message }, 'set not re-run: an input is missing');
        return error.message;
      }
      const movesFailed = commitFailure(ledger, config, setId, { code: error.code, message: error.message, hint: error.hint }, clock());
      log.error({ code: error.code, message: error.message }, 'set failed: an input is missing; its other files are quarantined');
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
