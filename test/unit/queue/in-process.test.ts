// The JobQueue contract against the in-process (worker-thread) backend, plus its own behaviour.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { tempDir } from '../../helpers/temp-dir.js';
import { createJobQueue, resolveQueueOptions } from '../../../src/queue/index.js';
import {
  COMPUTE_PROCESSOR,
  describeJobQueueContract,
  outcomeRecorder,
  type ComputePayload,
  type ComputeResult,
} from './contract.js';

describeJobQueueContract('in-process', (options) =>
  createJobQueue<ComputePayload, ComputeResult>({
    backend: 'in-process',
    processorFile: COMPUTE_PROCESSOR,
    ...options,
  }),
);

describe('in-process backend', () => {
  it('never runs more jobs at once than its concurrency', async () => {
    const queue = createJobQueue<ComputePayload, ComputeResult>({ processorFile: COMPUTE_PROCESSOR, concurrency: 2 });
    const recorder = outcomeRecorder();
    queue.onOutcome(recorder.listener);
    let maxActive = 0;
    for (let n = 0; n < 6; n += 1) await queue.enqueue(`c-${n}`, { id: `c-${n}`, n, sleepMs: 100 });
    const sampler = setInterval(() => {
      void queue.stats().then((stats) => {
        maxActive = Math.max(maxActive, stats.active);
      });
    }, 10);
    await queue.drain();
    clearInterval(sampler);
    await queue.close();
    expect(maxActive).toBe(2);
    expect(recorder.byId.size).toBe(6);
  });

  it('logs a listener that throws and still delivers to the others', async () => {
    const lines: string[] = [];
    const { pino } = await import('pino');
    const logger = pino({ level: 'warn' }, { write: (line: string) => lines.push(line) });
    const queue = createJobQueue<ComputePayload, ComputeResult>({
      processorFile: COMPUTE_PROCESSOR,
      concurrency: 1,
      logger,
    });
    const recorder = outcomeRecorder();
    queue.onOutcome(() => {
      throw new Error('commit failed');
    });
    queue.onOutcome(recorder.listener);
    await queue.enqueue('x', { id: 'x', n: 2 });
    await queue.drain();
    await queue.close();
    expect(recorder.byId.get('x')).toMatchObject({ status: 'completed' });
    expect(lines.join('')).toContain('job outcome listener failed');
  });

  it('hands a backlog out in shares: a share over its time limit costs none of its jobs an attempt, and each then runs alone under its own limit', async () => {
    // One thread: 'first' runs alone (nothing else waits yet); the next three go as one share with
    // 3 × 1.5 s, which 'hang' (a 6 s spin) overruns. Each of the three then runs alone: 'hang' fails
    // with JOB_TIMEOUT after its one attempt, the other two complete on their first counted attempt.
    const queue = createJobQueue<ComputePayload, ComputeResult>({
      processorFile: COMPUTE_PROCESSOR,
      concurrency: 1,
      attempts: 1,
      jobTimeoutMs: 1_500,
    });
    const recorder = outcomeRecorder();
    queue.onOutcome(recorder.listener);
    const logFile = join(tempDir('dl-share-'), 'starts.log');
    await queue.enqueue('first', { id: 'first', n: 1, sleepMs: 100, logFile });
    await queue.enqueue('before', { id: 'before', n: 2, logFile });
    await queue.enqueue('hang', { id: 'hang', n: 3, spinMs: 6_000, logFile });
    await queue.enqueue('after', { id: 'after', n: 4, logFile });
    await queue.drain();
    await queue.close();
    const starts = readFileSync(logFile, 'utf8')
      .split('\n')
      .filter((line) => line.includes(' start '))
      .map((line) => line.split(' ')[0]);
    // In the share: before, hang (stopped there); then each alone.
    expect(starts).toEqual(['first', 'before', 'hang', 'before', 'hang', 'after']);
    expect(recorder.byId.get('first')).toMatchObject({ status: 'completed', attempts: 1, value: { square: 1 } });
    expect(recorder.byId.get('before')).toMatchObject({ status: 'completed', attempts: 1, value: { square: 4 } });
    expect(recorder.byId.get('after')).toMatchObject({ status: 'completed', attempts: 1, value: { square: 16 } });
    expect(recorder.byId.get('hang')).toMatchObject({
      status: 'failed',
      attempts: 1,
      failure: { code: 'JOB_TIMEOUT', permanent: false },
    });
    expect([...recorder.deliveries.values()].every((n) => n === 1)).toBe(true);
  });

  it('keeps each job of a share its own outcome: a permanent failure in the middle fails that job only', async () => {
    const queue = createJobQueue<ComputePayload, ComputeResult>({
      processorFile: COMPUTE_PROCESSOR,
      concurrency: 1,
      attempts: 3,
      backoffMs: 10,
    });
    const recorder = outcomeRecorder();
    queue.onOutcome(recorder.listener);
    await queue.enqueue('lead', { id: 'lead', n: 1, sleepMs: 100 });
    for (let n = 2; n <= 5; n += 1)
      await queue.enqueue(`j-${n}`, n === 3 ? { id: `j-${n}`, n, fail: 'permanent-code' } : { id: `j-${n}`, n });
    const during = await queue.stats();
    await queue.drain();
    await queue.close();
    // While 'lead' runs alone, the four others wait.
    expect(during).toMatchObject({ active: 1, waiting: 4 });
    expect(recorder.byId.get('j-3')).toMatchObject({
      status: 'failed',
      attempts: 1,
      failure: { code: 'NON_NUMERIC', permanent: true },
    });
    for (const n of [2, 4, 5])
      expect(recorder.byId.get(`j-${n}`)).toMatchObject({ status: 'completed', attempts: 1, value: { square: n * n } });
  });

  it('remembers only as many finished ids as queue.retention keeps, so months of watch do not grow it without end', async () => {
    // Retention 2 completed / 1 failed: after c-1, c-2, c-3 complete and f-1, f-2 fail, c-1 and f-1
    // are forgotten (enqueued again, they run again) while c-2, c-3 and f-2 are still known (no-op).
    const queue = createJobQueue<ComputePayload, ComputeResult>({
      processorFile: COMPUTE_PROCESSOR,
      concurrency: 1,
      retention: { completedCount: 2, failedCount: 1 },
    });
    const recorder = outcomeRecorder();
    queue.onOutcome(recorder.listener);
    const logFile = join(tempDir('dl-retain-'), 'starts.log');
    for (const id of ['c-1', 'c-2', 'c-3']) {
      await queue.enqueue(id, { id, n: 1, logFile });
      await queue.drain();
    }
    for (const id of ['f-1', 'f-2']) {
      await queue.enqueue(id, { id, n: 1, fail: 'permanent-code', logFile });
      await queue.drain();
    }
    for (const id of ['c-1', 'c-2', 'c-3']) await queue.enqueue(id, { id, n: 1, logFile });
    for (const id of ['f-1', 'f-2']) await queue.enqueue(id, { id, n: 1, fail: 'permanent-code', logFile });
    await queue.drain();
    await queue.close();
    const starts = readFileSync(logFile, 'utf8')
      .split('\n')
      .filter((line) => line.includes(' start '))
      .map((line) => line.split(' ')[0]);
    expect(starts).toEqual(['c-1', 'c-2', 'c-3', 'f-1', 'f-2', 'c-1', 'f-1']);
    expect(recorder.deliveries.get('c-1')).toBe(2);
    expect(recorder.deliveries.get('c-2')).toBe(1);
    expect(recorder.deliveries.get('f-1')).toBe(2);
    expect(recorder.deliveries.get('f-2')).toBe(1);
  });

  it('reports a crashed worker thread as a transient WORKER_LOST failure', async () => {
    const crashing = new URL('../../fixtures/queue/crash.mjs', import.meta.url);
    const queue = createJobQueue<ComputePayload, ComputeResult>({
      processorFile: crashing,
      concurrency: 1,
      attempts: 2,
      backoffMs: 10,
    });
    const recorder = outcomeRecorder();
    queue.onOutcome(recorder.listener);
    await queue.enqueue('boom', { id: 'boom', n: 1 });
    await queue.drain();
    await queue.close();
    expect(recorder.byId.get('boom')).toMatchObject({
      status: 'failed',
      attempts: 2,
      failure: { code: 'WORKER_LOST', permanent: false },
    });
  });
});

describe('resolveQueueOptions', () => {
  it('fills the documented defaults and freezes the result', () => {
    const resolved = resolveQueueOptions({ processorFile: '/tmp/p.js' });
    expect(resolved).toMatchObject({
      backend: 'in-process',
      processorHref: 'file:///tmp/p.js',
      attempts: 3,
      backoffMs: 500,
      jobTimeoutMs: 300_000,
      redisUrl: 'redis://127.0.0.1:6379',
      prefix: 'driftlight',
      queueName: 'analyze',
      retention: { completedCount: 1000, failedCount: 5000 },
      runWorker: false,
    });
    expect(resolved.concurrency).toBeGreaterThanOrEqual(1);
    expect(Object.isFrozen(resolved)).toBe(true);
  });

  it.each([
    [{ concurrency: 0 }, 'queue.concurrency'],
    [{ backend: 'kafka' }, 'queue.backend'],
    [{ redisUrl: 'http://localhost' }, 'queue.redisUrl'],
    [{ prefix: 'a:b' }, 'queue.prefix'],
    [{ retention: { completedCount: -1 } }, 'queue.retention.completedCount'],
  ])('rejects %j naming %s', (bad, path) => {
    expect(() => resolveQueueOptions({ processorFile: '/tmp/p.js', ...(bad as object) })).toThrow(
      expect.objectContaining({ code: 'CONFIG_INVALID', configPath: path }),
    );
  });

  it('fails at creation when the processor file does not exist', () => {
    expect(() => createJobQueue({ processorFile: '/nonexistent/processor.js' })).toThrow(
      expect.objectContaining({ code: 'CONFIG_INVALID' }),
    );
  });
});
