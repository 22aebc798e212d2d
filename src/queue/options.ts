// Queue options: the partial type callers write (QueueBackendOptions) and the one resolver that
// validates it, fills defaults and freezes it. Every option's unit and default is documented here.
import { availableParallelism } from 'node:os';
import { pathToFileURL } from 'node:url';
import { pino, type Logger } from 'pino';
import { z } from 'zod';
import { ConfigInvalid } from '../model/errors.js';
import type { JobQueueOptions } from './job-queue.js';

/** The backends createJobQueue() can build; see the table in backends.ts. */
export const QUEUE_BACKENDS = ['in-process', 'bullmq'] as const;
export type QueueBackendName = (typeof QUEUE_BACKENDS)[number];

/** How many finished jobs Redis keeps at most (BullMQ removeOnComplete/removeOnFail counts). */
export interface QueueRetention {
  /** Completed jobs kept at most. Default 1000. */
  readonly completedCount: number;
  /** Failed jobs kept at most. Default 5000. */
  readonly failedCount: number;
}

/** What callers pass to createJobQueue(): the shared JobQueueOptions plus backend choice and tuning. */
export type QueueBackendOptions = JobQueueOptions & {
  /** Which backend runs the jobs. Default 'in-process' (worker threads, nothing to install). */
  readonly backend?: QueueBackendName;
  /** BullMQ: Redis URL (redis:// or rediss://). Default redis://127.0.0.1:6379. */
  readonly redisUrl?: string;
  /** BullMQ: prefix of every Redis key of the queue. Default 'driftlight'. */
  readonly prefix?: string;
  /** BullMQ: queue name; one per coordinator (instrument). Default 'analyze'. */
  readonly queueName?: string;
  /** Finished jobs remembered (de-duplication of their ids; BullMQ: also the cap on finished jobs kept in Redis before the coordinator acknowledges them). Default 1000/5000. */
  readonly retention?: Partial<QueueRetention>;
  /** BullMQ: also run a worker inside this process (else only `driftlight worker` runs jobs). Default false. */
  readonly runWorker?: boolean;
  /** BullMQ: worker lock duration in ms; a worker silent for longer loses the job. Default 30000. */
  readonly lockDurationMs?: number;
  /** BullMQ: how often workers look for stalled jobs (lock expired), in ms. Default 30000. */
  readonly stalledIntervalMs?: number;
  /** BullMQ: times a job may stall (its worker died) before it fails as WORKER_LOST. Default 1. */
  readonly maxStalledCount?: number;
  /** BullMQ: period in ms of the sweep that delivers finished jobs whose events were missed. Default 5000. */
  readonly outcomeSweepMs?: number;
  /** Logger for queue warnings (listener failures, Redis errors). Default: pino at 'warn' to stderr. */
  readonly logger?: Logger;
};

/** The one table of queue defaults (CLI help and docs read it from here). concurrency: CPU cores. */
export const QUEUE_DEFAULTS = Object.freeze({
  backend: 'in-process',
  attempts: 3,
  backoffMs: 500,
  jobTimeoutMs: 300_000,
  redisUrl: 'redis://127.0.0.1:6379',
  prefix: 'driftlight',
  queueName: 'analyze',
  retention: Object.freeze({ completedCount: 1000, failedCount: 5000 }),
  runWorker: false,
  lockDurationMs: 30_000,
  stalledIntervalMs: 30_000,
  maxStalledCount: 1,
  outcomeSweepMs: 5_000,
} as const);

const D = QUEUE_DEFAULTS;
const positiveInt = z.number().int().min(1);

const schema = z.object({
  backend: z.enum(QUEUE_BACKENDS).default(D.backend),
  processorFile: z.union([z.string().min(1), z.instanceof(URL)]),
  concurrency: positiveInt.max(1024).optional(),
  attempts: positiveInt.max(100).default(D.attempts),
  backoffMs: z.number().int().min(0).default(D.backoffMs),
  jobTimeoutMs: positiveInt.default(D.jobTimeoutMs),
  redisUrl: z
    .string()
    .regex(/^rediss?:\/\//, 'must start with redis:// or rediss://')
    .default(D.redisUrl),
  prefix: z
    .string()
    .min(1)
    .regex(/^[^:{}\s]+$/, 'no ":", braces or spaces')
    .default(D.prefix),
  queueName: z
    .string()
    .min(1)
    .regex(/^[^:{}\s]+$/, 'no ":", braces or spaces')
    .default(D.queueName),
  retention: z
    .object({
      completedCount: z.number().int().min(0).default(D.retention.completedCount),
      failedCount: z.number().int().min(0).default(D.retention.failedCount),
    })
    .prefault({}),
  runWorker: z.boolean().default(D.runWorker),
  lockDurationMs: positiveInt.default(D.lockDurationMs),
  stalledIntervalMs: positiveInt.default(D.stalledIntervalMs),
  maxStalledCount: z.number().int().min(0).default(D.maxStalledCount),
  outcomeSweepMs: positiveInt.default(D.outcomeSweepMs),
  logger: z.custom<Logger>((value) => typeof value === 'object' && value !== null && 'warn' in value).optional(),
});

/** Queue options after validation: every field present, processorFile as a file: URL string. */
export interface ResolvedQueueOptions {
  readonly backend: QueueBackendName;
  readonly processorHref: string;
  readonly concurrency: number;
  readonly attempts: number;
  readonly backoffMs: number;
  readonly jobTimeoutMs: number;
  readonly redisUrl: string;
  readonly prefix: string;
  readonly queueName: string;
  readonly retention: QueueRetention;
  readonly runWorker: boolean;
  readonly lockDurationMs: number;
  readonly stalledIntervalMs: number;
  readonly maxStalledCount: number;
  readonly outcomeSweepMs: number;
  readonly logger: Logger;
}

/** Validates queue options, fills defaults, returns a frozen copy; throws ConfigInvalid naming the path. */
export function resolveQueueOptions(options: QueueBackendOptions): ResolvedQueueOptions {
  const parsed = schema.safeParse(options);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    const path = issue === undefined ? 'queue' : ['queue', ...issue.path.map(String)].join('.');
    throw new ConfigInvalid(`invalid queue option: ${issue?.message ?? 'unknown problem'}`, { configPath: path });
  }
  const value = parsed.data;
  return Object.freeze({
    backend: value.backend,
    processorHref: toFileHref(value.processorFile),
    concurrency: value.concurrency ?? availableParallelism(),
    attempts: value.attempts,
    backoffMs: value.backoffMs,
    jobTimeoutMs: value.jobTimeoutMs,
    redisUrl: value.redisUrl,
    prefix: value.prefix,
    queueName: value.queueName,
    retention: Object.freeze({ ...value.retention }),
    runWorker: value.runWorker,
    lockDurationMs: value.lockDurationMs,
    stalledIntervalMs: value.stalledIntervalMs,
    maxStalledCount: value.maxStalledCount,
    outcomeSweepMs: value.outcomeSweepMs,
    logger: value.logger ?? pino({ name: 'driftlight-queue', level: 'warn' }, pino.destination(2)),
  });
}

/** A processor given as a path or URL, as a file: URL string that import() accepts. */
export function toFileHref(file: string | URL): string {
  if (file instanceof URL) return file.href;
  return file.startsWith('file:') ? new URL(file).href : pathToFileURL(file).href;
}
