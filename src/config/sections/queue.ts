// Config section `queue`: which JobQueue backend runs the analyses and how (see src/queue).
import { availableParallelism } from 'node:os';
import { z } from 'zod';

export const queueSection = z
  .strictObject({
    backend: z.enum(['in-process', 'bullmq']).default('in-process')
      .describe('in-process = worker-thread pool in this process; bullmq = Redis queue with separate workers. Default: in-process'),
    concurrency: z.number().int().min(0).max(256).default(0)
      .transform((n) => (n === 0 ? availableParallelism() : n))
      .describe('Jobs run at once; 0 = the number of CPU cores. Default: 0 (CPU cores)'),
    attempts: z.number().int().min(1).max(100).default(3)
      .describe('Total attempts for transient failures, including the first. Default: 3'),
    backoffMs: z.number().int().min(0).default(500)
      .describe('First retry delay in ms, doubled at each further attempt. Default: 500'),
    jobTimeoutMs: z.number().int().min(100).default(300_000)
      .describe('Per-job time limit in ms. Default: 300000'),
    redisUrl: z.string().min(1).default('redis://127.0.0.1:6379')
      .describe('Redis connection URL (bullmq backend). Default: redis://127.0.0.1:6379'),
    prefix: z.string().min(1).default('driftlight').describe('Redis key prefix (bullmq). Default: driftlight'),
    queueName: z.string().min(1).default('analyze').describe('Queue name (bullmq). Default: analyze'),
    retention: z
      .strictObject({
        completedCount: z.number().int().min(0).default(1000).describe('Completed jobs kept (bullmq). Default: 1000'),
        failedCount: z.number().int().min(0).default(5000).describe('Failed jobs kept (bullmq). Default: 5000'),
      })
      .prefault({}),
  })
  .prefault({});

export type QueueConfig = z.output<typeof queueSection>;
