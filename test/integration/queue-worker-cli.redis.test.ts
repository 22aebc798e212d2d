// `driftlight worker` as a real process: graceful shutdown on SIGTERM/SIGINT finishes the job in
// hand, health is visible as pino JSON lines (started, job events with ids and durations,
// heartbeat), and a missing processor is a usage error.
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { createJobQueue } from '../../src/queue/index.js';
import { runDriftlight } from '../helpers/cli.js';
import { cleanupQueue, describeRedis, randomPrefix, REDIS_URL } from '../helpers/redis.js';
import {
  COMPUTE_PROCESSOR,
  outcomeRecorder,
  type ComputePayload,
  type ComputeQueue,
  type ComputeResult,
} from '../unit/queue/contract.js';
import { spawnWorker, type WorkerProcess } from './queue-processes.js';

const QUEUE_NAME = 'cli';

describe('driftlight worker (no Redis needed)', () => {
  it('exits with the usage code and names the file when the processor is missing', () => {
    const run = runDriftlight([
      'worker',
      '--processor',
      '/nonexistent/analyze-job.js',
      '--redis',
      'redis://127.0.0.1:1',
    ]);
    expect(run.status).toBe(2);
    expect(run.stderr).toContain('CONFIG_INVALID');
    expect(run.stderr).toContain('/nonexistent/analyze-job.js');
  });

  it('rejects a non-integer concurrency as a usage error', () => {
    const run = runDriftlight(['worker', '--concurrency', 'lots']);
    expect(run.status).toBe(2);
    expect(run.stderr).toContain('--concurrency');
  });
});

describeRedis('driftlight worker process', () => {
  let prefix = '';
  let tempDir = '';
  let workers: WorkerProcess[] = [];
  let queue: ComputeQueue | undefined;

  beforeEach(() => {
    prefix = randomPrefix();
    tempDir = mkdtempSync(join(tmpdir(), 'driftlight-worker-cli-'));
    queue = createJobQueue<ComputePayload, ComputeResult>({
      backend: 'bullmq',
      processorFile: COMPUTE_PROCESSOR,
      redisUrl: REDIS_URL,
      prefix,
      queueName: QUEUE_NAME,
      outcomeSweepMs: 500,
    });
  });
  afterEach(async () => {
    await queue?.close();
    await Promise.all(workers.map((w) => w.stop('SIGKILL')));
    workers = [];
    await cleanupQueue(prefix, QUEUE_NAME);
    rmSync(tempDir, { recursive: true, force: true });
  });
  const start = (heartbeatMs = 0): WorkerProcess => {
    const worker = spawnWorker({ redisUrl: REDIS_URL, prefix, queue: QUEUE_NAME, concurrency: 1, heartbeatMs });
    workers.push(worker);
    return worker;
  };

  it('SIGTERM mid-job: finishes the job in hand, logs it, exits 0; the job ran once', async () => {
    if (queue === undefined) throw new Error('no queue');
    const recorder = outcomeRecorder();
    queue.onOutcome(recorder.listener);
    const worker = start();
    await worker.waitForLine((line) => line.event === 'worker.started', 15_000, 'start');
    const logFile = join(tempDir, 'executions.log');
    await queue.enqueue('in-hand', { id: 'in-hand', n: 12, sleepMs: 1_200, logFile });
    await worker.waitForLine((line) => line.event === 'job.started' && line.jobId === 'in-hand', 15_000, 'job start');

    expect(await worker.stop('SIGTERM')).toBe(0);
    const events = worker.lines.map((line) => line.event);
    expect(events.indexOf('worker.stopping')).toBeLessThan(events.indexOf('job.completed'));
    expect(events.indexOf('job.completed')).toBeLessThan(events.indexOf('worker.stopped'));
    const completed = worker.lines.find((line) => line.event === 'job.completed');
    expect(completed).toMatchObject({ jobId: 'in-hand', attempts: 1, pid: worker.child.pid });
    expect(completed?.['durationMs']).toBeGreaterThanOrEqual(1_200);

    await queue.drain();
    expect(recorder.byId.get('in-hand')).toMatchObject({ status: 'completed', attempts: 1, value: { square: 144 } });
    expect(readFileSync(logFile, 'utf8').match(/in-hand start/g)).toHaveLength(1);
  });

  it('logs heartbeats and failed jobs with their code; SIGINT stops an idle worker', async () => {
    if (queue === undefined) throw new Error('no queue');
    queue.onOutcome(() => undefined);
    const worker = start(200);
    await worker.waitForLine((line) => line.event === 'heartbeat', 15_000, 'heartbeat');
    await queue.enqueue('rejected', { id: 'rejected', n: 1, fail: 'permanent-code' });
    const failed = await worker.waitForLine((line) => line.event === 'job.failed', 15_000, 'job failure');
    expect(failed).toMatchObject({ jobId: 'rejected', code: 'NON_NUMERIC', permanent: true, willRetry: false });
    expect(await worker.stop('SIGINT')).toBe(0);
    expect(worker.lines.at(-1)).toMatchObject({ event: 'worker.stopped' });
  });
});
