// A BullMQ worker: takes jobs from one queue in Redis and runs them in a local thread pool. Used by
// `driftlight worker` processes (any machine with Node) and by the BullMQ backend when runWorker is
// set. Transient failures are thrown as plain errors (BullMQ retries them with backoff); permanent
// ones as UnrecoverableError. The failure's data travels in the error message (see job-failure.ts).
import { performance } from 'node:perf_hooks';
import { UnrecoverableError, Worker, type Job } from 'bullmq';
import type { Logger } from 'pino';
import { decodeFailure, encodeFailure } from './job-failure.js';
import { bullmqConnection } from './redis-connection.js';
import { createTaskPool } from './task-pool.js';

/** What a queue worker needs; the resolved queue options satisfy it. */
export interface QueueWorkerOptions {
  readonly redisUrl: string;
  readonly prefix: string;
  readonly queueName: string;
  readonly processorHref: string;
  readonly concurrency: number;
  readonly jobTimeoutMs: number;
  readonly lockDurationMs: number;
  readonly stalledIntervalMs: number;
  readonly maxStalledCount: number;
  readonly logger: Logger;
  /** Period of the heartbeat log line in ms; 0 turns it off. Default 0. */
  readonly heartbeatMs?: number;
}

export interface QueueWorker {
  /** Stops taking jobs, waits for the jobs in hand, then stops the threads. */
  close(): Promise<void>;
  /** Resolves once the worker is connected and waiting for jobs. */
  ready(): Promise<void>;
}

/** Starts a BullMQ worker on `queueName` that runs the processor file in a thread pool. */
export function startQueueWorker(options: QueueWorkerOptions): QueueWorker {
  const { logger } = options;
  const pool = createTaskPool(options);
  const startedAtMs = new Map<string, number>();
  let completedTotal = 0;
  let failedTotal = 0;

  const processJob = async (job: Job): Promise<unknown> => {
    const result = await pool.run(job.data);
    if (result.ok) return result.value;
    const message = encodeFailure(result.failure);
    throw result.failure.permanent ? new UnrecoverableError(message) : new Error(message);
  };

  const worker = new Worker(options.queueName, processJob, {
    connection: bullmqConnection(options.redisUrl),
    prefix: options.prefix,
    concurrency: options.concurrency,
    lockDuration: options.lockDurationMs,
    stalledInterval: options.stalledIntervalMs,
    maxStalledCount: options.maxStalledCount,
  });

  const durationMs = (id: string | undefined): number | undefined => {
    const start = id === undefined ? undefined : startedAtMs.get(id);
    if (id !== undefined) startedAtMs.delete(id);
    return start === undefined ? undefined : Math.round(performance.now() - start);
  };
  worker.on('active', (job) => {
    if (job.id !== undefined) startedAtMs.set(job.id, performance.now());
    logger.info({ event: 'job.started', jobId: job.id, attempt: job.attemptsMade + 1 }, 'job started');
  });
  worker.on('completed', (job) => {
    completedTotal += 1;
    logger.info(
      { event: 'job.completed', jobId: job.id, attempts: job.attemptsMade, durationMs: durationMs(job.id) },
      'job completed',
    );
  });
  worker.on('failed', (job, error) => {
    failedTotal += 1;
    const failure = decodeFailure(error.message);
    const willRetry = job !== undefined && !failure.permanent && job.attemptsMade < (job.opts.attempts ?? 1);
    logger.warn(
      {
        event: 'job.failed',
        jobId: job?.id,
        attempts: job?.attemptsMade,
        durationMs: durationMs(job?.id),
        code: failure.code,
        permanent: failure.permanent,
        willRetry,
      },
      `job failed: ${failure.message}`,
    );
  });
  worker.on('stalled', (jobId) =>
    logger.warn({ event: 'job.stalled', jobId }, 'job stalled (its worker stopped renewing the lock); it runs again'),
  );
  worker.on('error', (error) => logger.error({ event: 'redis.error', err: error }, `worker error: ${error.message}`));

  const heartbeatMs = options.heartbeatMs ?? 0;
  const heartbeat =
    heartbeatMs > 0
      ? setInterval(() => {
          logger.info(
            { event: 'heartbeat', running: worker.isRunning(), active: startedAtMs.size, completedTotal, failedTotal },
            'heartbeat',
          );
        }, heartbeatMs)
      : undefined;
  heartbeat?.unref();

  return {
    async close() {
      if (heartbeat !== undefined) clearInterval(heartbeat);
      await worker.close();
      await pool.close();
    },
    async ready() {
      await worker.waitUntilReady();
    },
  };
}
