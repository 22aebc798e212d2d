// The queue's public entry: createJobQueue() builds the configured backend; callers never import a
// backend (or Redis) directly.
import { QUEUE_BACKEND_TABLE } from './backends.js';
import type { JobQueue } from './job-queue.js';
import { resolveQueueOptions, type QueueBackendOptions } from './options.js';

export type { JobFailure, JobOutcome, JobQueue, JobQueueOptions, JobQueueStats } from './job-queue.js';
export {
  QUEUE_BACKENDS,
  QUEUE_DEFAULTS,
  resolveQueueOptions,
  type QueueBackendName,
  type QueueBackendOptions,
  type QueueRetention,
  type ResolvedQueueOptions,
} from './options.js';
export { startQueueWorker, type QueueWorker, type QueueWorkerOptions } from './bullmq-worker.js';

/** Creates the job queue of the configured backend (default: in-process worker threads). */
export function createJobQueue<Payload, Result>(options: QueueBackendOptions): JobQueue<Payload, Result> {
  const resolved = resolveQueueOptions(options);
  return QUEUE_BACKEND_TABLE[resolved.backend]<Payload, Result>(resolved);
}
