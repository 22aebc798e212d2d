// Config section `queue`: which JobQueue backend runs the analyses and how (see src/queue). Defaults
// come from QUEUE_DEFAULTS (src/queue/options.ts), their one source; only runWorker differs: a
// bullmq coordinator runs a worker itself unless told not to (coordinatorRunsWorker), so one
// machine works alone.
import { availableParallelism } from 'node:os';
import { z } from 'zod';
import { QUEUE_BACKENDS, QUEUE_DEFAULTS as D } from '../../queue/options.js';

export const queueSection = z
  .strictObject({
    backend: z
      .enum(QUEUE_BACKENDS)
      .default(D.backend)
      .describe(
        `in-process = worker-thread pool in this process; bullmq = Redis queue with separate workers (\`--redis URL\` selects it). Default: ${D.backend}`,
      ),
    concurrency: z
      .number()
      .int()
      .min(0)
      .max(256)
      .default(0)
      .transform((n) => (n === 0 ? availableParallelism() : n))
      .describe(
        'Jobs run at once (in-process pool, or the worker inside a bullmq coordinator); 0 = the number of CPU cores. Default: 0 (CPU cores)',
      ),
    attempts: z
      .number()
      .int()
      .min(1)
      .max(100)
      .default(D.attempts)
      .describe(`Total attempts for transient failures, including the first. Default: ${D.attempts}`),
    backoffMs: z
      .number()
      .int()
      .min(0)
      .default(D.backoffMs)
      .describe(`First retry delay in ms, doubled at each further attempt. Default: ${D.backoffMs}`),
    jobTimeoutMs: z
      .number()
      .int()
      .min(100)
      .default(D.jobTimeoutMs)
      .describe(
        `Per-job time limit in ms (in-process: a share of waiting jobs handed to one thread together gets the sum of theirs). Default: ${D.jobTimeoutMs}`,
      ),
    redisUrl: z
      .string()
      .min(1)
      .default(D.redisUrl)
      .describe(`Redis connection URL (bullmq backend; \`--redis URL\` overrides it). Default: ${D.redisUrl}`),
    prefix: z.string().min(1).default(D.prefix).describe(`Redis key prefix (bullmq). Default: ${D.prefix}`),
    queueName: z.string().min(1).default(D.queueName).describe(`Queue name (bullmq). Default: ${D.queueName}`),
    retention: z
      .strictObject({
        completedCount: z
          .number()
          .int()
          .min(0)
          .default(D.retention.completedCount)
          .describe(
            `Completed jobs remembered: enqueueing one of their ids again runs nothing (bullmq keeps the jobs in Redis; in-process only their ids). Default: ${D.retention.completedCount}`,
          ),
        failedCount: z
          .number()
          .int()
          .min(0)
          .default(D.retention.failedCount)
          .describe(`Failed jobs remembered, as completedCount. Default: ${D.retention.failedCount}`),
      })
      .prefault({}),
    runWorker: z
      .boolean()
      .optional()
      .describe(
        'bullmq: also run jobs inside the coordinator; false = a pure coordinator (only `driftlight worker` processes run jobs). Default: true with bullmq',
      ),
    lockDurationMs: z
      .number()
      .int()
      .min(1)
      .default(D.lockDurationMs)
      .describe(
        `bullmq, the coordinator's own worker: job lock in ms; a silent worker loses its job after this. Default: ${D.lockDurationMs}`,
      ),
    stalledIntervalMs: z
      .number()
      .int()
      .min(1)
      .default(D.stalledIntervalMs)
      .describe(
        `bullmq, the coordinator's own worker: how often stalled jobs are looked for, in ms. Default: ${D.stalledIntervalMs}`,
      ),
    maxStalledCount: z
      .number()
      .int()
      .min(0)
      .default(D.maxStalledCount)
      .describe(
        `bullmq, the coordinator's own worker: times a job may stall (its worker died) before it fails as WORKER_LOST. Default: ${D.maxStalledCount}`,
      ),
    outcomeSweepMs: z
      .number()
      .int()
      .min(1)
      .default(D.outcomeSweepMs)
      .describe(
        `bullmq: period in ms of the sweep that delivers finished jobs whose events were missed. Default: ${D.outcomeSweepMs}`,
      ),
  })
  .prefault({});

export type QueueConfig = z.output<typeof queueSection>;

/** Whether the coordinator runs jobs itself: runWorker if set, else true exactly for bullmq. */
export function coordinatorRunsWorker(queue: Pick<QueueConfig, 'backend' | 'runWorker'>): boolean {
  return queue.runWorker ?? queue.backend === 'bullmq';
}
