// Fault tests of the BullMQ backend against real Redis and real `driftlight worker` processes:
// a worker killed mid-job, the coordinator restarted mid-flight, Redis itself killed and restarted,
// and 200 jobs through two worker processes. The coordinator side is a JobQueue whose listener
// commits idempotently by id, as the pipeline's coordinator does.
import { mkdirSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pino } from 'pino';
import { afterEach, beforeEach, expect, it } from 'vitest';
import { createJobQueue, type QueueBackendOptions } from '../../src/queue/index.js';
import { cleanupQueue, describeRedis, randomPrefix, REDIS_URL } from '../helpers/redis.js';
import { numericWork } from '../fixtures/queue/compute.mjs';
import {
  COMPUTE_PROCESSOR,
  outcomeRecorder,
  waitFor,
  type ComputePayload,
  type ComputeQueue,
  type ComputeResult,
} from '../unit/queue/contract.js';
import { freePort, killHard, spawnWorker, startRedisServer, type WorkerProcess } from './queue-processes.js';

const QUEUE_NAME = 'faults';

describeRedis('BullMQ faults with real processes', () => {
  let prefix = '';
  let tempDir = '';
  let workers: WorkerProcess[] = [];
  let queues: ComputeQueue[] = [];

  const coordinator = (options: Partial<QueueBackendOptions> = {}): ComputeQueue => {
    const queue = createJobQueue<ComputePayload, ComputeResult>({
      backend: 'bullmq',
      processorFile: COMPUTE_PROCESSOR,
      redisUrl: REDIS_URL,
      prefix,
      queueName: QUEUE_NAME,
      outcomeSweepMs: 500,
      backoffMs: 100,
      ...options,
    });
    queues.push(queue);
    return queue;
  };
  const worker = (concurrency: number, redisUrl: string = REDIS_URL): WorkerProcess => {
    const started = spawnWorker({ redisUrl, prefix, queue: QUEUE_NAME, concurrency });
    workers.push(started);
    return started;
  };
  const executions = (logFile: string, id: string, phase: 'start' | 'done'): string[] =>
    readFileSync(logFile, 'utf8')
      .split('\n')
      .filter((line) => line.startsWith(`${id} ${phase} `))
      .map((line) => line.split(' ')[2] ?? '');

  beforeEach(() => {
    prefix = randomPrefix();
    tempDir = mkdtempSync(join(tmpdir(), 'driftlight-faults-'));
  });
  afterEach(async () => {
    await Promise.all(queues.map((queue) => queue.close()));
    await Promise.all(workers.map((w) => w.stop('SIGKILL')));
    queues = [];
    workers = [];
    await cleanupQueue(prefix, QUEUE_NAME);
    rmSync(tempDir, { recursive: true, force: true });
  });

  it('a worker killed with SIGKILL mid-job: the job runs again elsewhere, one outcome is recorded', async () => {
    const queue = coordinator();
    const recorder = outcomeRecorder();
    queue.onOutcome(recorder.listener);
    const first = worker(1);
    await first.waitForLine((line) => line.event === 'worker.started', 15_000, 'start');
    const logFile = join(tempDir, 'executions.log');
    await queue.enqueue('victim', { id: 'victim', n: 9, sleepMs: 2_500, logFile });
    await first.waitForLine((line) => line.event === 'job.started' && line.jobId === 'victim', 15_000, 'job start');
    const second = worker(1);
    await second.waitForLine((line) => line.event === 'worker.started', 15_000, 'start');
    expect(await first.stop('SIGKILL')).toBe('SIGKILL');

    await second.waitForLine(
      (line) => line.event === 'job.completed' && line.jobId === 'victim',
      30_000,
      'recovered job',
    );
    await queue.drain();
    const starts = executions(logFile, 'victim', 'start');
    expect(starts).toHaveLength(2);
    expect(starts[0]).toBe(String(first.child.pid));
    expect(starts[1]).toBe(String(second.child.pid));
    expect(executions(logFile, 'victim', 'done')).toEqual([String(second.child.pid)]);
    expect(recorder.deliveries.get('victim')).toBe(1);
    expect(recorder.byId.get('victim')).toMatchObject({ status: 'completed', value: { n: 9, square: 81 } });
  });

  it('the coordinator restarted mid-flight: no job lost, none run or committed twice', async () => {
    const ids = Array.from({ length: 30 }, (_, n) => `set-${n}`);
    const logFile = join(tempDir, 'executions.log');
    const payload = (n: number): ComputePayload => ({ id: `set-${n}`, n, sleepMs: 80, logFile });
    const committed = outcomeRecorder();
    worker(2);
    worker(2);

    const before = coordinator();
    before.onOutcome(committed.listener);
    for (const [n, id] of ids.entries()) await before.enqueue(id, payload(n));
    await waitFor(() => committed.byId.size >= 8, 30_000, 'the first outcomes');
    await before.close();
    const committedAtClose = committed.byId.size;
    expect(committedAtClose).toBeLessThan(ids.length);
    await new Promise((resolve) => setTimeout(resolve, 300)); // jobs keep finishing while nobody listens

    const after = coordinator();
    after.onOutcome(committed.listener);
    // On restart the coordinator re-enqueues every set its ledger has not committed.
    for (const [n, id] of ids.entries()) if (!committed.byId.has(id)) await after.enqueue(id, payload(n));
    await after.drain();

    expect(committed.byId.size).toBe(ids.length);
    for (const [n, id] of ids.entries()) {
      expect(committed.deliveries.get(id)).toBe(1);
      expect(committed.byId.get(id)).toMatchObject({ status: 'completed', value: { n, square: n * n } });
      expect(executions(logFile, id, 'start')).toHaveLength(1);
    }
  });

  it('Redis killed with SIGKILL and restarted on its AOF: nothing is lost', async () => {
    const port = await freePort();
    const redisDir = join(tempDir, 'redis');
    const redisUrl = `redis://127.0.0.1:${port}`;
    mkdirSync(redisDir);
    let redis = await startRedisServer(port, redisDir);
    try {
      const logLines: string[] = [];
      const logger = pino({ level: 'warn' }, { write: (line: string) => logLines.push(line) });
      const queue = coordinator({ redisUrl, logger });
      const committed = outcomeRecorder();
      queue.onOutcome(committed.listener);
      const ids = Array.from({ length: 20 }, (_, n) => `aof-${n}`);
      for (const [n, id] of ids.entries()) await queue.enqueue(id, { id, n, sleepMs: 150 });
      const redisWorker = worker(2, redisUrl);
      await waitFor(() => committed.byId.size >= 4, 30_000, 'the first outcomes');

      await killHard(redis);
      expect(committed.byId.size).toBeLessThan(ids.length);
      await new Promise((resolve) => setTimeout(resolve, 500));
      redis = await startRedisServer(port, redisDir);

      await waitFor(() => committed.byId.size === ids.length, 60_000, 'every outcome after the restart');
      await queue.drain();
      for (const [n, id] of ids.entries()) {
        expect(committed.byId.get(id)).toMatchObject({ status: 'completed', value: { n, square: n * n } });
      }
      expect(logLines.join('')).toContain('"event":"redis.error"');
      expect(redisWorker.lines.some((line) => line.event === 'redis.error')).toBe(true);
    } finally {
      await Promise.all(queues.map((queue) => queue.close()));
      queues = [];
      await Promise.all(workers.map((w) => w.stop('SIGKILL')));
      workers = [];
      await killHard(redis);
    }
  });

  it('200 jobs through 2 worker processes: every result exactly once', async () => {
    const queue = coordinator();
    const committed = outcomeRecorder();
    queue.onOutcome(committed.listener);
    const first = worker(2);
    const second = worker(2);
    for (const w of [first, second]) await w.waitForLine((line) => line.event === 'worker.started', 15_000, 'start');
    const count = 200;
    // 10 ms of sleep per job keeps both workers busy (without it one worker can drain the queue alone)
    for (let n = 0; n < count; n += 1)
      await queue.enqueue(`bulk-${n}`, { id: `bulk-${n}`, n, iterations: 20_000, sleepMs: 10 });
    await queue.drain();

    expect(committed.byId.size).toBe(count);
    for (let n = 0; n < count; n += 1) {
      expect(committed.deliveries.get(`bulk-${n}`)).toBe(1);
      expect(committed.byId.get(`bulk-${n}`)).toMatchObject({
        status: 'completed',
        value: { n, square: n * n, work: numericWork(n, 20_000) },
      });
    }
    const completedBy = (w: WorkerProcess): number => w.lines.filter((line) => line.event === 'job.completed').length;
    expect(completedBy(first) + completedBy(second)).toBe(count);
    expect(completedBy(first)).toBeGreaterThan(0);
    expect(completedBy(second)).toBeGreaterThan(0);
    expect(await queue.stats()).toEqual({ waiting: 0, active: 0, completed: count, failed: 0 });
  });
});
