// The result of one attempt at one job, as plain data: a value, or a JobFailure.
import type { JobFailure } from './job-queue.js';

export type TaskResult =
  { readonly ok: true; readonly value: unknown } | { readonly ok: false; readonly failure: JobFailure };

/** Marks a pool task that carries several payloads (the in-process backend under a backlog). */
export const BATCH_TASK = 'driftlight.pool-batch/1';

/** A pool task of several payloads, run one after the other in one thread; its answer is one TaskResult per payload, in order. */
export interface BatchTask {
  readonly kind: typeof BATCH_TASK;
  readonly payloads: readonly unknown[];
}

/** Whether a pool task is a BatchTask. */
export function isBatchTask(task: unknown): task is BatchTask {
  return (
    typeof task === 'object' &&
    task !== null &&
    (task as { kind?: unknown }).kind === BATCH_TASK &&
    Array.isArray((task as { payloads?: unknown }).payloads)
  );
}
