// The default backend: jobs run in a worker-thread pool (piscina) inside this process. Nothing is
// persisted: after a restart the coordinator re-enqueues what its ledger has not committed.
// Retries use exponential backoff for transient failures; permanent failures finish at once.
// Under a backlog, a thread is handed several jobs in one task (see MAX_JOBS_PER_TASK).
import { DriftlightError } from '../model/errors.js';
import { assertJobId } from './job-id.js';
import type { JobOutcome, JobQueue, JobQueueStats } from './job-queue.js';
import type { ResolvedQueueOptions } from './options.js';
import { OutcomeHub, type OutcomeListener } from './outcome-hub.js';
import { queueFailure } from './job-failure.js';
import { createTaskPool, type TaskPool } from './task-pool.js';
import type { TaskResult } from './task-result.js';
import { exponentialBackoffMs } from './backoff.js';

/**
 * Most jobs handed to one thread in one task. While jobs wait, each free thread takes its share of
 * them (ready jobs / threads, rounded up) up to this many, so a backlog costs one message each way
 * per share instead of per job; with few jobs waiting (steady arrivals) every job goes alone and no
 * outcome waits for another job. Each job keeps its own attempt, outcome and time limit (a share's
 * limit is the sum of its jobs'). 4 was chosen with bench/pipeline's burst (docs/benchmarks.md).
 */
export const MAX_JOBS_PER_TASK = 4;

interface PendingJob<Payload> {
  readonly id: string;
  readonly payload: Payload;
  attemptsMade: number;
  /** Set when a share holding this job was stopped as a whole: from then on it runs alone. */
  alone?: boolean;
}

class InProcessJobQueue<Payload, Result> implements JobQueue<Payload, Result> {
  private readonly pool: TaskPool;
  private readonly hub: OutcomeHub<Result>;
  /**
   * Ids this queue knows (de-duplication): every job waiting, retrying or running, and the latest
   * finished ones, as many as queue.retention keeps (BullMQ keeps that many finished jobs too).
   * Bounded, so months of `watch` do not grow it without end.
   */
  private readonly known = new Set<string>();
  /** Finished ids still remembered, oldest first, by how they finished. */
  private readonly finishedIds: Record<'completed' | 'failed', string[]> = { completed: [], failed: [] };
  private readonly ready: PendingJob<Payload>[] = [];
  private readonly retryTimers = new Map<string, NodeJS.Timeout>();
  private readonly running = new Set<Promise<void>>();
  /** Jobs in the running tasks (a task holds one job, or a share of several run one after the other). */
  private jobsInTasks = 0;
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
      // One job per running task executes; the rest of its share waits in its thread.
      waiting: this.ready.length + this.retryTimers.size + this.jobsInTasks - this.running.size,
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
      const jobs = this.takeShare();
      const first = jobs[0];
      if (first === undefined) break;
      this.jobsInTasks += jobs.length;
      const attempt = (jobs.length === 1 ? this.attempt(first) : this.attemptShare(jobs)).finally(() => {
        this.jobsInTasks -= jobs.length;
        this.running.delete(attempt);
        this.pump();
        this.checkIdle();
      });
      this.running.add(attempt);
    }
  }

  /** The next jobs for one free thread: its share of the ready jobs, at most MAX_JOBS_PER_TASK; a job marked `alone` goes by itself. */
  private takeShare(): PendingJob<Payload>[] {
    const first = this.ready.shift();
    if (first === undefined) return [];
    const jobs = [first];
    if (first.alone === true) return jobs;
    const share = Math.min(MAX_JOBS_PER_TASK, Math.ceil((this.ready.length + 1) / this.options.concurrency));
    while (jobs.length < share && this.ready[0] !== undefined && this.ready[0].alone !== true) {
      const next = this.ready.shift();
      if (next !== undefined) jobs.push(next);
    }
    return jobs;
  }

  private async attempt(job: PendingJob<Payload>): Promise<void> {
    await this.settle(job, await this.pool.run(job.payload));
  }

  /**
   * Runs several jobs in one task. When the task is stopped as a whole (over its summed time limit,
   * or its thread died), no attempt is counted: which job was to blame is unknown, so each goes back
   * to the front of the line to run alone, where its own limit and attempts apply.
   */
  private async attemptShare(jobs: readonly PendingJob<Payload>[]): Promise<void> {
    const results = await this.pool.runBatch(jobs.map((job) => job.payload));
    if (results === undefined) {
      if (this.closed) return; // handed back: the coordinator re-enqueues them after restart
      for (const job of jobs) job.alone = true;
      this.ready.unshift(...jobs);
      return;
    }
    await Promise.all(
      jobs.map((job, i) =>
        this.settle(
          job,
          results[i] ?? { ok: false, failure: queueFailure('WORKER_LOST', 'no result came back for this job') },
        ),
      ),
    );
  }

  /** Counts one attempt of `job` with `result`: delivers its outcome, or schedules a retry with backoff. */
  private async settle(job: PendingJob<Payload>, result: TaskResult): Promise<void> {
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
    const delayMs = exponentialBackoffMs(this.options.backoffMs, job.attemptsMade);
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
    this.rememberFinished(outcome.id, outcome.status);
    await this.hub.deliver(outcome);
  }

  /** Keeps a finished id among the remembered ones, forgetting the oldest beyond queue.retention's count for its status. */
  private rememberFinished(id: string, status: 'completed' | 'failed'): void {
    const ids = this.finishedIds[status];
    ids.push(id);
    const keep = status === 'completed' ? this.options.retention.completedCount : this.options.retention.failedCount;
    while (ids.length > keep) {
      const oldest = ids.shift();
      if (oldest !== undefined) this.known.delete(oldest);
    }
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
