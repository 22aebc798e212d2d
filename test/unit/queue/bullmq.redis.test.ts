// The JobQueue contract against the BullMQ backend on real Redis (a worker runs inside the test
// process via runWorker), plus what only a persistent backend does: redelivery after a listener
// failure and retention. Each test uses its own random prefix, removed afterwards.
import { Redis } from 'ioredis';
import { afterEach, beforeEach, expect, it } from 'vitest';
import { createJobQueue, type QueueBackendOptions } from '../../../src/queue/index.js';
import { cleanupQueue, describeRedis, randomPrefix, REDIS_URL } from '../../helpers/redis.js';
import {
  COMPUTE_PROCESSOR,
  describeJobQueueContract,
  outcomeRecorder,
  waitFor,
  type ComputePayload,
  type ComputeResult,
} from './contract.js';

const QUEUE_NAME = 'contract';

describeRedis('BullMQ backend', () => {
  let prefix = '';
  beforeEach(() => {
    prefix = randomPrefix();
  });
  afterEach(async () => {
    await cleanupQueue(prefix, QUEUE_NAME);
  });

  const bullmq = (options: Partial<QueueBackendOptions>) =>
    createJobQueue<ComputePayload, ComputeResult>({
      backend: 'bullmq',
      processorFile: COMPUTE_PROCESSOR,
      redisUrl: REDIS_URL,
      prefix,
      queueName: QUEUE_NAME,
      runWorker: true,
      lockDurationMs: 2_000,
      stalledIntervalMs: 1_000,
      outcomeSweepMs: 500,
      ...options,
    });

  describeJobQueueContract('bullmq', bullmq);

  it('redelivers an outcome whose listener failed, and removes the job once acknowledged', async () => {
    const queue = bullmq({ processorFile: COMPUTE_PROCESSOR, concurrency: 1 });
    let calls = 0;
    const committed: string[] = [];
    queue.onOutcome((outcome) => {
      calls += 1;
      if (calls === 1) throw new Error('ledger busy');
      committed.push(outcome.id);
    });
    await queue.enqueue('retry-commit', { id: 'retry-commit', n: 3 });
    await queue.drain();
    await queue.close();
    expect(calls).toBe(2);
    expect(committed).toEqual(['retry-commit']);
    const redis = new Redis(REDIS_URL);
    try {
      expect(await redis.exists(`${prefix}:${QUEUE_NAME}:retry-commit`)).toBe(0);
    } finally {
      redis.disconnect();
    }
  });

  it('keeps finished jobs in Redis until a coordinator listens, capped by retention', async () => {
    const producer = bullmq({
      processorFile: COMPUTE_PROCESSOR,
      concurrency: 1,
      retention: { completedCount: 3, failedCount: 3 },
    });
    for (let n = 0; n < 5; n += 1) await producer.enqueue(`r-${n}`, { id: `r-${n}`, n });
    await waitFor(
      async () => {
        const stats = await producer.stats();
        return stats.waiting === 0 && stats.active === 0;
      },
      20_000,
      'jobs to finish',
    );
    await producer.close();
    const consumer = bullmq({ processorFile: COMPUTE_PROCESSOR, runWorker: false });
    const recorder = outcomeRecorder();
    consumer.onOutcome(recorder.listener);
    await consumer.drain();
    await consumer.close();
    // retention 3: the two oldest completed jobs were trimmed before anyone acknowledged them
    expect(recorder.byId.size).toBe(3);
    expect([...recorder.byId.keys()].sort()).toEqual(['r-2', 'r-3', 'r-4']);
  });
});
