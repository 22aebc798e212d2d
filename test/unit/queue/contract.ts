// The JobQueue contract as one test suite, run against every backend by swapping the factory.
// Each backend's test file calls describeJobQueueContract(name, factory); queues a test creates are
// closed after it. Jobs use test/fixtures/queue/compute.mjs (deterministic arithmetic).
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import type { JobOutcome, JobQueue, QueueBackendOptions } from '../../../src/queue/index.js';

export const COMPUTE_PROCESSOR = new URL('../../fixtures/queue/compute.mjs', import.meta.url);

/** Payload understood by the compute fixture. */
export interface ComputePayload {
  readonly id: string;
  readonly n: number;
  readonly iterations?: number;
  readonly sleepMs?: number;
  readonly spinMs?: number;
  readonly fail?: 'permanent-code' | 'permanent-flag' | 'transient';
  readonly failTimes?: number;
  readonly stateFile?: string;
  readonly logFile?: string;
}

/** Value returned by the compute fixture. */
export interface ComputeResult {
  readonly n: number;
  readonly square: number;
  readonly work: number;
}

export type ComputeQueue = JobQueue<ComputePayload, ComputeResult>;

/** Builds a queue of the backend under test; options override the suite's defaults. */
export type QueueFactory = (options: Partial<QueueBackendOptions>) => ComputeQueue;

/** Collects outcomes by id (an idempotent "commit") and counts deliveries. */
export function outcomeRecorder(): {
  readonly byId: Map<string, JobOutcome<ComputeResult>>;
  readonly deliveries: Map<string, number>;
  readonly listener: (outcome: JobOutcome<ComputeResult>) => void;
} {
  const byId = new Map<string, JobOutcome<ComputeResult>>();
  const deliveries = new Map<string, number>();
  return {
    byId,
    deliveries,
    listener: (outcome) => {
      deliveries.set(outcome.id, (deliveries.get(outcome.id) ?? 0) + 1);
      if (!byId.has(outcome.id)) byId.set(outcome.id, outcome);
    },
  };
}

/** Polls `condition` every 50 ms until it holds or `timeoutMs` passes (then throws). */
export async function waitFor(
  condition: () => boolean | Promise<boolean>,
  timeoutMs: number,
  what: string,
): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (!(await condition())) {
    if (Date.now() > deadline) throw new Error(`timed out after ${timeoutMs} ms waiting for ${what}`);
    await new Promise((resolve) => setTimeout(resolve, 50));
  }
}

/** Registers the JobQueue contract tests for one backend. */
export function describeJobQueueContract(name: string, factory: QueueFactory): void {
  describe(`JobQueue contract: ${name}`, () => {
    let open: ComputeQueue[] = [];
    let tempDir = '';
    const make = (options: Partial<QueueBackendOptions> = {}): ComputeQueue => {
      const queue = factory({ processorFile: COMPUTE_PROCESSOR, concurrency: 2, backoffMs: 50, ...options });
      open.push(queue);
      return queue;
    };

    beforeEach(() => {
      tempDir = mkdtempSync(join(tmpdir(), 'driftlight-queue-'));
    });
    afterEach(async () => {
      await Promise.all(open.map((queue) => queue.close()));
      open = [];
      rmSync(tempDir, { recursive: true, force: true });
    });

    it('runs every job and delivers each outcome with the processor value', async () => {
      const queue = make();
      const recorder = outcomeRecorder();
      queue.onOutcome(recorder.listener);
      for (let n = 1; n <= 12; n += 1) await queue.enqueue(`job-${n}`, { id: `job-${n}`, n });
      await queue.drain();
      expect(recorder.byId.size).toBe(12);
      for (let n = 1; n <= 12; n += 1) {
        const outcome = recorder.byId.get(`job-${n}`);
        expect(outcome).toMatchObject({ status: 'completed', attempts: 1, value: { n, square: n * n } });
        expect(recorder.deliveries.get(`job-${n}`)).toBe(1);
      }
      expect(await queue.stats()).toEqual({ waiting: 0, active: 0, completed: 12, failed: 0 });
    });

    it('does not create a second job for an id it already knows', async () => {
      const queue = make();
      const recorder = outcomeRecorder();
      queue.onOutcome(recorder.listener);
      const logFile = join(tempDir, 'executions.log');
      await queue.enqueue('same', { id: 'same', n: 3, sleepMs: 100, logFile });
      await queue.enqueue('same', { id: 'same', n: 3, sleepMs: 100, logFile });
      await queue.drain();
      await queue.enqueue('same', { id: 'same', n: 3, logFile });
      await queue.drain();
      expect(recorder.deliveries.get('same')).toBe(1);
      expect(readFileSync(logFile, 'utf8').match(/same start/g)).toHaveLength(1);
    });

    it('retries transient failures with backoff until they succeed', async () => {
      const queue = make({ attempts: 3, backoffMs: 100 });
      const recorder = outcomeRecorder();
      queue.onOutcome(recorder.listener);
      const startedMs = Date.now();
      await queue.enqueue('flaky', { id: 'flaky', n: 4, failTimes: 2, stateFile: join(tempDir, 'flaky.state') });
      await queue.drain();
      // backoff 100 ms, doubled: at least 100 + 200 ms pass before the third attempt
      expect(Date.now() - startedMs).toBeGreaterThanOrEqual(300);
      expect(recorder.byId.get('flaky')).toMatchObject({ status: 'completed', attempts: 3, value: { square: 16 } });
    });

    it('fails a job whose transient failures exhaust the attempts', async () => {
      const queue = make({ attempts: 2, backoffMs: 20 });
      const recorder = outcomeRecorder();
      queue.onOutcome(recorder.listener);
      await queue.enqueue('down', { id: 'down', n: 1, fail: 'transient' });
      await queue.drain();
      expect(recorder.byId.get('down')).toMatchObject({
        status: 'failed',
        attempts: 2,
        failure: { code: 'TRANSIENT', message: 'always transient', permanent: false },
      });
      expect((await queue.stats()).failed).toBe(1);
    });

    it('does not retry permanent failures and keeps their code and hint', async () => {
      const queue = make({ attempts: 3 });
      const recorder = outcomeRecorder();
      queue.onOutcome(recorder.listener);
      await queue.enqueue('bad-code', { id: 'bad-code', n: 7, fail: 'permanent-code' });
      await queue.enqueue('bad-flag', { id: 'bad-flag', n: 8, fail: 'permanent-flag' });
      await queue.drain();
      expect(recorder.byId.get('bad-code')).toMatchObject({
        status: 'failed',
        attempts: 1,
        failure: { code: 'NON_NUMERIC', message: 'value 7 rejected', hint: 'fixture hint', permanent: true },
      });
      expect(recorder.byId.get('bad-flag')).toMatchObject({
        status: 'failed',
        attempts: 1,
        failure: { code: 'FIXTURE_BAD', permanent: true },
      });
    });

    it('stops a job that runs over jobTimeoutMs and reports JOB_TIMEOUT', async () => {
      const queue = make({ attempts: 1, jobTimeoutMs: 2_000 });
      const recorder = outcomeRecorder();
      queue.onOutcome(recorder.listener);
      const logFile = join(tempDir, 'timeout.log');
      await queue.enqueue('slow', { id: 'slow', n: 1, spinMs: 20_000, logFile });
      await queue.enqueue('quick', { id: 'quick', n: 2, logFile });
      await queue.drain();
      // The slow job was stopped, not waited out: it started and never reached its end (the fixture logs
      // "done" after the spin), while the quick one ran to its end.
      const log = readFileSync(logFile, 'utf8');
      expect(log).toMatch(/^slow start /m);
      expect(log).not.toMatch(/^slow done /m);
      expect(log).toMatch(/^quick done /m);
      expect(recorder.byId.get('slow')).toMatchObject({
        status: 'failed',
        failure: { code: 'JOB_TIMEOUT', permanent: false },
      });
      expect(recorder.byId.get('quick')).toMatchObject({ status: 'completed', value: { square: 4 } });
    });

    it('holds outcomes that finish before a listener is registered', async () => {
      const queue = make();
      await queue.enqueue('early', { id: 'early', n: 5 });
      await waitFor(async () => (await queue.stats()).completed === 1, 20_000, 'the job to complete');
      const recorder = outcomeRecorder();
      queue.onOutcome(recorder.listener);
      await queue.drain();
      expect(recorder.byId.get('early')).toMatchObject({ status: 'completed', value: { square: 25 } });
      expect(recorder.deliveries.get('early')).toBe(1);
    });

    it('close() lets the running job finish; its outcome is delivered exactly once', async () => {
      const first = make({ concurrency: 1 });
      const recorder = outcomeRecorder();
      first.onOutcome(recorder.listener);
      const logFile = join(tempDir, 'executions.log');
      await first.enqueue('running', { id: 'running', n: 6, sleepMs: 700, logFile });
      await waitFor(async () => (await first.stats()).active === 1, 20_000, 'the job to start');
      await first.close();
      expect(readFileSync(logFile, 'utf8')).toContain('running done');
      // A persistent backend hands the outcome to the next queue object; in-process delivered it already.
      const second = make({ concurrency: 1 });
      second.onOutcome(recorder.listener);
      await second.drain();
      expect(recorder.byId.get('running')).toMatchObject({ status: 'completed', value: { square: 36 } });
      expect(recorder.deliveries.get('running')).toBe(1);
    });

    it('rejects job ids that some backend could not store', async () => {
      const queue = make();
      for (const bad of ['', 'a:b', '12345']) {
        await expect(queue.enqueue(bad, { id: bad, n: 1 })).rejects.toMatchObject({ code: 'INTERNAL' });
      }
      expect(await queue.stats()).toMatchObject({ waiting: 0, active: 0 });
    });

    it('rejects enqueue after close with QUEUE_CLOSED; close() twice is harmless', async () => {
      const queue = make();
      await queue.close();
      await queue.close();
      await expect(queue.enqueue('late', { id: 'late', n: 1 })).rejects.toMatchObject({ code: 'QUEUE_CLOSED' });
    });
  });
}
