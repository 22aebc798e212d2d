// The scale-out backend: jobs live in Redis (BullMQ); `driftlight worker` processes run them.
// This object is the coordinator's side: it adds jobs (job id = caller's id, so a re-queued set is
// not a second job) and delivers outcomes. A finished job stays in Redis until its outcome has been
// delivered and every listener resolved; then it is removed (the acknowledgement). Delivery is
// triggered by QueueEvents for speed and by a periodic sweep of the completed/failed sets for
// safety, so outcomes that finished while no coordinator was listening (restart, lost events) are
// delivered later: at least once, and the coordinator's commit must be idempotent by id.
import { Queue, QueueEvents, type Job } from 'bullmq';
import { DriftlightError } from '../model/errors.js';
import { startQueueWorker, type QueueWorker } from './bullmq-worker.js';
import { decodeFailure } from './job-failure.js';
import { assertJobId } from './job-id.js';
import type { JobOutcome, JobQueue, JobQueueStats } from './job-queue.js';
import type { ResolvedQueueOptions } from './options.js';
import { OutcomeHub, type OutcomeListener } from './outcome-hub.js';
import { bullmqConnection, redactRedisUrl } from './redis-connection.js';
import { assertProcessorExists } from './task-pool.js';

const JOB_NAME = 'analyze';
const SWEEP_PAGE = 500;
const DRAIN_POLL_MS = 100;

class BullmqJobQueue<Payload, Result> implements JobQueue<Payload, Result> {
  private readonly queue: Queue;
  private readonly events: QueueEvents;
  private readonly worker: QueueWorker | undefined;
  private readonly hub: OutcomeHub<Result>;
  private readonly delivering = new Map<string, Promise<void>>();
  /** Ids enqueued by this object: not re-added even after their job was acknowledged and removed. */
  private readonly known = new Set<string>();
  private sweepTimer: NodeJS.Timeout | undefined;
  private sweeping: Promise<void> | undefined;
  private ackedCompleted = 0;
  private ackedFailed = 0;
  private closed = false;
  private closing: Promise<void> | undefined;

  constructor(private readonly options: ResolvedQueueOptions) {
    const { logger } = options;
    const connection = bullmqConnection(options.redisUrl);
    this.queue = new Queue(options.queueName, {
      connection,
      prefix: options.prefix,
      defaultJobOptions: {
        attempts: options.attempts,
        backoff: { type: 'exponential', delay: options.backoffMs },
        removeOnComplete: { count: options.retention.completedCount },
        removeOnFail: { count: options.retention.failedCount },
      },
    });
    this.events = new QueueEvents(options.queueName, { connection, prefix: options.prefix });
    const where = { redisUrl: redactRedisUrl(options.redisUrl), queue: options.queueName };
    this.queue.on('error', (error) =>
      logger.error({ ...where, event: 'redis.error', err: error }, `queue error: ${error.message}`),
    );
    this.events.on('error', (error) =>
      logger.error({ ...where, event: 'redis.error', err: error }, `queue events error: ${error.message}`),
    );
    this.events.on('completed', ({ jobId }) => this.deliverById(jobId));
    this.events.on('failed', ({ jobId }) => this.deliverById(jobId));
    this.hub = new OutcomeHub<Result>(logger, () => undefined);
    if (options.runWorker) {
      this.worker = startQueueWorker({ ...options, logger: logger.child({ component: 'worker' }) });
    } else {
      assertProcessorExists(options.processorHref);
      this.worker = undefined;
    }
  }

  async enqueue(id: string, payload: Payload): Promise<void> {
    if (this.closed) throw new DriftlightError('QUEUE_CLOSED', `cannot enqueue job ${id}: the queue is closed`);
    assertJobId(id);
    if (this.known.has(id)) return;
    await this.queue.add(JOB_NAME, payload, { jobId: id });
    this.known.add(id);
  }

  onOutcome(listener: OutcomeListener<Result>): void {
    this.hub.add(listener);
    this.sweepTimer ??= setInterval(() => void this.sweep(), this.options.outcomeSweepMs);
    void this.sweep();
  }

  async stats(): Promise<JobQueueStats> {
    const counts = await this.queue.getJobCounts(
      'wait',
      'delayed',
      'prioritized',
      'waiting-children',
      'active',
      'completed',
      'failed',
    );
    const count = (name: string): number => counts[name] ?? 0;
    return {
      waiting: count('wait') + count('delayed') + count('prioritized') + count('waiting-children'),
      active: count('active'),
      completed: count('completed') + this.ackedCompleted,
      failed: count('failed') + this.ackedFailed,
    };
  }

  async connectedWorkers(): Promise<number | undefined> {
    try {
      return await this.queue.getWorkersCount();
    } catch (error) {
      // CLIENT LIST may be refused (a managed Redis): the count is unknown, not zero.
      this.options.logger.debug({ err: error }, 'could not count the workers of the queue (CLIENT LIST)');
      return undefined;
    }
  }

  async drain(): Promise<void> {
    for (;;) {
      const counts = await this.queue.getJobCounts(
        'wait',
        'delayed',
        'prioritized',
        'waiting-children',
        'active',
        'completed',
        'failed',
      );
      const total = Object.values(counts).reduce((sum, value) => sum + value, 0);
      if (total === 0 && this.delivering.size === 0) return;
      if (this.closed) return;
      if ((counts['completed'] ?? 0) + (counts['failed'] ?? 0) > 0 && this.hub.hasListener) await this.sweep();
      await new Promise((resolve) => setTimeout(resolve, DRAIN_POLL_MS));
    }
  }

  close(): Promise<void> {
    this.closing ??= (async () => {
      this.closed = true;
      if (this.sweepTimer !== undefined) clearInterval(this.sweepTimer);
      await this.worker?.close();
      await this.events.close();
      await this.sweeping;
      await Promise.all(this.delivering.values());
      await this.queue.close();
    })();
    return this.closing;
  }

  /** Delivers every finished job still in Redis (each not already being delivered). */
  private sweep(): Promise<void> {
    this.sweeping ??= (async () => {
      try {
        for (const state of ['completed', 'failed'] as const) {
          const jobs = await this.queue.getJobs([state], 0, SWEEP_PAGE - 1, true);
          for (const job of jobs) {
            if (this.closed) return;
            if (job.id !== undefined) await this.deliverById(job.id);
          }
        }
      } catch (error) {
        this.options.logger.warn({ err: error }, 'outcome sweep failed; retried at the next sweep');
      } finally {
        this.sweeping = undefined;
      }
    })();
    return this.sweeping;
  }

  /** Delivers one finished job's outcome, then removes the job (the acknowledgement). */
  private deliverById(id: string): Promise<void> {
    const running = this.delivering.get(id);
    if (running !== undefined) return running;
    if (this.closed || !this.hub.hasListener) return Promise.resolve();
    const delivery = this.deliver(id).finally(() => this.delivering.delete(id));
    this.delivering.set(id, delivery);
    return delivery;
  }

  private async deliver(id: string): Promise<void> {
    try {
      const job = (await this.queue.getJob(id)) as Job | undefined;
      if (job === undefined) return;
      const state = await job.getState();
      if (state !== 'completed' && state !== 'failed') return;
      const outcome: JobOutcome<Result> =
        state === 'completed'
          ? { id, status: 'completed', value: job.returnvalue as Result, attempts: job.attemptsMade }
          : { id, status: 'failed', failure: decodeFailure(job.failedReason), attempts: job.attemptsMade };
      if (!(await this.hub.deliver(outcome))) return; // a listener failed: redelivered by a later sweep
      await job.remove();
      if (state === 'completed') this.ackedCompleted += 1;
      else this.ackedFailed += 1;
    } catch (error) {
      this.options.logger.warn({ err: error, jobId: id }, 'outcome delivery failed; retried at the next sweep');
    }
  }
}

/** Creates the BullMQ backend (coordinator side; workers run as `driftlight worker` or runWorker). */
export function createBullmqQueue<Payload, Result>(options: ResolvedQueueOptions): JobQueue<Payload, Result> {
  return new BullmqJobQueue<Payload, Result>(options);
}
