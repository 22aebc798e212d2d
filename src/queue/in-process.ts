// The default backend: jobs run in a worker-thread pool (piscina) inside this process. Nothing is
// persisted: after a restart the coordinator re-enqueues what its ledger has not committed.
// Retries use exponential backoff for transient failures; permanent failures finish at once.
import { DriftlightError } from '../model/errors.js';
import { assertJobId } from './job-id.js';
import type { JobOutcome, JobQueue, JobQueueStats } from './job-queue.js';
import type { ResolvedQueueOptions } from './options.js';
import { OutcomeHub, type OutcomeListener } from './outcome-hub.js';
import { createTaskPool, type TaskPool } from './task-pool.js';

interface PendingJob<Payload> {
  readonly id: string;
  readonly payload: Payload;
  attemptsMade: number;
}

class InProcessJobQueue<Payload, Result> implements JobQueue<Payload, Result> {
  private readonly pool: TaskPool;
  private readonly hub: OutcomeHub<Result>;
  /** Every id enqueued in this queue's lifetime (de-duplication). */
  private readonly known = new Set<string>();
  private readonly ready: PendingJob<Payload>[] = [];
  private readonly retryTimers = new Map<string, NodeJS.Timeout>();
  private readonly running = new Set<Promise<void>>();
  private completed = 0;
  private failed = 0;
  private closed = false;
  private closing: Promise<void> | undefined;
  private idleWaiters: (() => void)[] = [];

  constructor(private readonly options: ResolvedQueueOptions) {
    this.pool = createTaskPool(options);
    this.hub = new OutcomeHub<Result>(options.logger, () => this.checkIdle());
  }

  async enqueue(id: string, payload: Payload): Promise<void> {
    if (this.closed) throw new DriftlightError('QUEUE_CLOSED', `cannot enqueue job ${id}: the queue is closed`);
    assertJobId(id);
    if (this.known.has(id)) return;
    this.known.add(id);
    this.ready.push({ id, payload, attemptsMade: 0 });
    this.pump();
  }

  onOutcome(listener: OutcomeListener<Result>): void {
    this.hub.add(listener);
  }

  async stats(): Promise<JobQueueStats> {
    return {
      waiting: this.ready.length + this.retryTimers.size,
      active: this.running.size,
      completed: this.completed,
      failed: this.failed,
    };
  }

  drain(): Promise<void> {
    return new Promise((resolve) => {
      this.idleWaiters.push(resolve);
      this.checkIdle();
    });
  }

  close(): Promise<void> {
    this.closing ??= (async () => {
      this.closed = true;
      this.ready.length = 0;
      for (const timer of this.retryTimers.values()) clearTimeout(timer);
      this.retryTimers.clear();
      await Promise.all(this.running);
      await this.pool.close();
      this.checkIdle();
    })();
    return this.closing;
  }

  private pump(): void {
    while (!this.closed && this.running.size < this.options.concurrency) {
      const job = this.ready.shift();
      if (job === undefined) break;
      const attempt = this.attempt(job).finally(() => {
        this.running.delete(attempt);
        this.pump();
        this.checkIdle();
      });
      this.running.add(attempt);
    }
  }

  private async attempt(job: PendingJob<Payload>): Promise<void> {
    const result = await this.pool.run(job.payload);
    job.attemptsMade += 1;
    if (result.ok) {
      this.completed += 1;
      await this.finish({ id: job.id, status: 'completed', value: result.value as Result, attempts: job.attemptsMade });
      return;
    }
    const exhausted = result.failure.permanent || job.attemptsMade >= this.options.attempts;
    if (exhausted) {
      this.failed += 1;
      await this.finish({ id: job.id, status: 'failed', failure: result.failure, attempts: job.attemptsMade });
      return;
    }
    if (this.closed) return; // handed back: the coordinator re-enqueues it after restart
    const delayMs = this.options.backoffMs * 2 ** (job.attemptsMade - 1);
    this.retryTimers.set(
      job.id,
      setTimeout(() => {
        this.retryTimers.delete(job.id);
        this.ready.push(job);
        this.pump();
      }, delayMs),
    );
  }

  private async finish(outcome: JobOutcome<Result>): Promise<void> {
    await this.hub.deliver(outcome);
  }

  private checkIdle(): void {
    const busy = this.ready.length + this.retryTimers.size + this.running.size + this.hub.pending;
    if (busy > 0 && !this.closed) return;
    if (busy > 0 && this.running.size > 0) return;
    for (const resolve of this.idleWaiters.splice(0)) resolve();
  }
}

/** Creates the in-process (worker-thread pool) backend. */
export function createInProcessQueue<Payload, Result>(options: ResolvedQueueOptions): JobQueue<Payload, Result> {
  return new InProcessJobQueue<Payload, Result>(options);
}
