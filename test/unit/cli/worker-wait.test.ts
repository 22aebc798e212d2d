// `process` and `watch` with a pure BullMQ coordinator and no worker say so (issue 20, item 9): at
// once and then every interval, on stderr and in the log, naming the queue and how to start a
// worker; once a worker is there they say it once and stop repeating. The queue here is a stand-in
// whose counts the test sets (the real one is exercised in process-no-worker.redis.test.ts).
import { describe, expect, it } from 'vitest';
import { watchForWorkers } from '../../../src/cli/worker-wait.js';
import type { JobQueueStats } from '../../../src/queue/job-queue.js';

const until = async (what: string, condition: () => boolean): Promise<void> => {
  for (let i = 0; i < 500 && !condition(); i++) await new Promise((r) => setTimeout(r, 10));
  if (!condition()) throw new Error(`never: ${what}`);
};

function setup(): {
  state: { waiting: number; workers: number | undefined };
  stderr: string[];
  warnings: string[];
  stop: () => Promise<void>;
} {
  const state: { waiting: number; workers: number | undefined } = { waiting: 3, workers: 0 };
  const stderr: string[] = [];
  const warnings: string[] = [];
  const queue = {
    stats: async (): Promise<JobQueueStats> => ({ waiting: state.waiting, active: 0, completed: 0, failed: 0 }),
    connectedWorkers: async (): Promise<number | undefined> => state.workers,
  };
  const stop = watchForWorkers(queue, {
    command: 'process',
    queueName: 'analyze',
    prefix: 'lab-a',
    redisUrl: 'redis://:secret@redis.lab:6379',
    intervalMs: 30,
    stderr: { write: (text: string) => stderr.push(text) },
    logger: { warn: (_fields, message) => warnings.push(message), info: () => undefined },
  });
  return { state, stderr, warnings, stop };
}

describe('waiting for workers', () => {
  it('says at once and then periodically that it waits, with the queue and the worker command, never the password', async () => {
    const { stderr, warnings, stop } = setup();
    await until('the first message', () => stderr.length >= 1);
    const [first] = stderr;
    expect(first).toContain('waiting for workers');
    expect(first).toContain('3 job(s)');
    expect(first).toContain('queue "analyze"');
    expect(first).toContain('driftlight worker --prefix lab-a --queue analyze --redis env');
    expect(first).toContain('DRIFTLIGHT_REDIS_URL');
    expect(first).toContain('queue.runWorker: true');
    expect(first).not.toContain('secret');
    await until('a repeat', () => stderr.length >= 3);
    expect(warnings.length).toBeGreaterThanOrEqual(3);
    await stop();
  });

  it('says once that a worker came, then is quiet; says nothing while no job waits', async () => {
    const { state, stderr, stop } = setup();
    await until('the first message', () => stderr.length >= 1);
    state.workers = 1;
    await until('the worker noticed', () => stderr.some((line) => line.includes('worker connected')));
    const count = stderr.length;
    state.workers = 0;
    state.waiting = 0;
    await new Promise((r) => setTimeout(r, 150));
    expect(stderr).toHaveLength(count);
    await stop();
  });

  it('says nothing when the backend cannot count workers', async () => {
    const { state, stderr, stop } = setup();
    state.workers = undefined;
    await new Promise((r) => setTimeout(r, 150));
    expect(stderr).toEqual([]);
    await stop();
  });
});
