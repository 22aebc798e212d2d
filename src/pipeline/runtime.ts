// Wires one pipeline instance: ledger, logger, job queue (createJobQueue with the config's queue
// section and workers/analyze-job.js as processor) and the coordinator. Used by the CLI commands.
import { existsSync, mkdirSync, statSync } from 'node:fs';
import { DriftlightError } from '../model/errors.js';
import type { Logger } from 'pino';
import type { AnalysisJobPayload, AnalysisOutput } from '../analysis/payload.js';
import type { DriftlightConfig } from '../config/resolve.js';
import { coordinatorRunsWorker } from '../config/sections/queue.js';
import { createLogger, flushLogger } from '../output/logger.js';
import { createJobQueue } from '../queue/index.js';
import type { JobQueue } from '../queue/job-queue.js';
import { openLedger, type Ledger } from '../store/ledger.js';
import { Coordinator } from './coordinator.js';
import { acquireInstanceLock, processAlive } from './instance-lock.js';
import { removeStaleTempFiles } from '../output/stale-temp.js';
import type { ResultStage } from './result-stage.js';
import { defaultResultStages } from './stage-table.js';

/** The compiled job processor: beside dist/src/pipeline when built; from the TypeScript sources (vitest), the build output in dist/ (`npm run build` must have run). */
export const ANALYZE_PROCESSOR_URL = ((): URL => {
  const sibling = new URL('../../workers/analyze-job.js', import.meta.url);
  return existsSync(sibling) ? sibling : new URL('../../dist/workers/analyze-job.js', import.meta.url);
})();

export interface Pipeline {
  readonly config: DriftlightConfig;
  readonly ledger: Ledger;
  readonly logger: Logger;
  readonly queue: JobQueue<AnalysisJobPayload, AnalysisOutput>;
  readonly coordinator: Coordinator;
  /** The result stages the coordinator runs (QC rules and alerts by default). */
  readonly stages: readonly ResultStage[];
  /** Runs the stages' time-based checks at `now` (watch calls it about once a minute); failures are logged. */
  clockTick(now: Date): void;
  /** Closes the queue (letting running jobs finish), then the ledger, then flushes the log. */
  close(): Promise<void>;
}

type FolderName = keyof DriftlightConfig['folders'];

/**
 * Folders that must exist before `watch` starts, so an unmounted share is not replaced by a new
 * empty folder: the inbox, and the results folder when the config names it (the default `results`
 * beside the config file is driftlight's own and is created).
 */
export function requiredFolders(config: DriftlightConfig): FolderName[] {
  return config.configuredFolders.includes('results') ? ['inbox', 'results'] : ['inbox'];
}

/** The folders among `names` that are missing (or not folders), as `folders.NAME (path)`. */
export function missingFolders(
  config: DriftlightConfig,
  names: readonly FolderName[] = requiredFolders(config),
): string[] {
  return names
    .filter((name) => {
      try {
        return !statSync(config.folders[name]).isDirectory();
      } catch {
        return true;
      }
    })
    .map((name) => `folders.${name} (${config.folders[name]})`);
}

/**
 * Opens the pipeline for `config`: takes the state folder's instance lock, creates the other
 * folders (`requireFolders` must exist already: FOLDER_MISSING), opens the ledger, starts the
 * queue; stages default to the stage table.
 */
export function openPipeline(
  config: DriftlightConfig,
  options: {
    softwareVersion: string;
    stages?: readonly ResultStage[];
    logger?: Logger;
    clock?: () => Date;
    command?: string;
    requireFolders?: readonly FolderName[];
  },
): Pipeline {
  const missing = missingFolders(config, options.requireFolders ?? []);
  if (missing.length > 0) {
    throw new DriftlightError(
      'FOLDER_MISSING',
      `${missing.join(' and ')} ${missing.length > 1 ? 'do' : 'does'} not exist; not started (it is not created, so an unmounted share is not replaced by an empty folder)`,
      {
        hint: 'Mount the share or create the folder (mkdir), or fix folders.* in the config; `driftlight config check` lists the folders.',
      },
    );
  }
  mkdirSync(config.folders.state, { recursive: true });
  const lock = acquireInstanceLock(config.folders.state, options.command ?? 'pipeline');
  for (const dir of Object.values(config.folders)) mkdirSync(dir, { recursive: true });
  const logger = options.logger ?? createLogger(config.logging, config.logFile);
  // Temporary files of writes a killed run left half done (never renamed into place).
  const f = config.folders;
  const stale = removeStaleTempFiles([f.results, f.outbox, f.quarantine, f.state], processAlive);
  if (stale.length > 0)
    logger.info({ files: stale.length, first: stale[0] }, 'removed temporary files of interrupted writes');
  let ledger: Ledger;
  try {
    ledger = openLedger(config.folders.state);
  } catch (error) {
    lock.release();
    throw error;
  }
  const q = config.queue;
  const queue = createJobQueue<AnalysisJobPayload, AnalysisOutput>({
    processorFile: ANALYZE_PROCESSOR_URL,
    backend: q.backend,
    concurrency: q.concurrency,
    attempts: q.attempts,
    backoffMs: q.backoffMs,
    jobTimeoutMs: q.jobTimeoutMs,
    redisUrl: q.redisUrl,
    prefix: q.prefix,
    queueName: q.queueName,
    retention: q.retention,
    runWorker: coordinatorRunsWorker(q),
    lockDurationMs: q.lockDurationMs,
    stalledIntervalMs: q.stalledIntervalMs,
    maxStalledCount: q.maxStalledCount,
    outcomeSweepMs: q.outcomeSweepMs,
    logger,
  });
  const stages = options.stages ?? defaultResultStages(config, logger, options.clock);
  const coordinator = new Coordinator({
    config,
    ledger,
    queue,
    logger,
    softwareVersion: options.softwareVersion,
    stages,
    ...(options.clock === undefined ? {} : { clock: options.clock }),
  });
  let closed = false;
  return {
    config,
    ledger,
    logger,
    queue,
    coordinator,
    stages,
    clockTick(now: Date) {
      for (const stage of stages) {
        try {
          stage.onClock?.({ ledger, now });
        } catch (error) {
          logger.error({ err: error, stage: stage.name }, 'clock check failed');
        }
      }
    },
    async close() {
      if (closed) return;
      closed = true;
      coordinator.close();
      await queue.close();
      logger.debug('queue closed');
      await Promise.all(stages.map((stage) => stage.idle?.()));
      logger.debug('stages idle');
      ledger.close();
      lock.release();
      logger.debug('ledger closed');
      // Bounded: a stream that never drains must not keep the process from exiting.
      await flushLogger(logger);
    },
  };
}
