// The backend table: one row per backend. Add a backend by adding a file and a row (and its name
// to QUEUE_BACKENDS in options.ts).
import { createBullmqQueue } from './bullmq.js';
import { createInProcessQueue } from './in-process.js';
import type { JobQueue } from './job-queue.js';
import type { QueueBackendName, ResolvedQueueOptions } from './options.js';

type BackendFactory = <Payload, Result>(options: ResolvedQueueOptions) => JobQueue<Payload, Result>;

export const QUEUE_BACKEND_TABLE: Readonly<Record<QueueBackendName, BackendFactory>> = Object.freeze({
  'in-process': createInProcessQueue,
  bullmq: createBullmqQueue,
});
