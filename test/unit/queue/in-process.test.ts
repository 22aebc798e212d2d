// The JobQueue contract against the in-process (worker-thread) backend, plus its own behaviour.
import { describe, expect, it } from 'vitest';
import { createJobQueue, resolveQueueOptions } from '../../../src/queue/index.js';
import { COMPUTE_PROCESSOR, describeJobQueueContract, outcomeRecorder, type ComputePayload, type ComputeResult } from './contract.js';

describeJobQueueContract('in-process', (options) =>
  createJobQueue<ComputePayload, ComputeResult>({ backend: 'in-process', processorFile: COMPUTE_PROCESSOR, ...options }),
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
    const queue = createJobQueue<ComputePayload, ComputeResult>({ processorFile: COMPUTE_PROCESSOR, concurrency: 1, logger });
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

  it('reports a crashed worker thread as a transient WORKER_LOST failure', async () => {
    const crashing = new URL('../../fixtures/queue/crash.mjs', import.meta.url);
    const queue = createJobQueue<ComputePayload, ComputeResult>({ processorFile: crashing, concurrency: 1, attempts: 2, backoffMs: 10 });
    const recorder = outcomeRecorder();
    queue.onOutcome(recorder.listener);
    await queue.enqueue('boom', { id: 'boom', n: 1 });
    await queue.drain();
    await queue.close();
    expect(recorder.byId.get('boom')).toMatchObject({ status: 'failed', attempts: 2, failure: { code: 'WORKER_LOST', permanent: false } });
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
    expect(() => createJobQueue({ processorFile: '/nonexistent/processor.js' })).toThrow(expect.objectContaining({ code: 'CONFIG_INVALID' }));
  });
});
