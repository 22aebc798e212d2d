// The JobQueue contract: one narrow interface, two backends (in-process worker-thread pool, BullMQ on
// Redis). Callers (the coordinator) never import a backend directly; they use createJobQueue().
//
// A job is identified by a caller-chosen id (the measurement set's content hash): enqueueing an id
// that is already waiting or running, or finished and still retained (queue.retention: the latest
// 1,000 completed and 5,000 failed by default), does not create a second job. The processor is a
// module file (compiled JS) whose default export is
// `(payload: unknown) => unknown | Promise<unknown>`; it must be stateless so that a job gives the
// same result on any backend. A processor signals "do not retry" by throwing an error whose
// `permanent` property is true or whose `code` is an InputRejected/AnalysisFailed/Config code
// (see toJobFailure in src/queue/job-failure.ts); anything else is retried with backoff.
// Payloads and results must be plain JSON data (objects, arrays, strings, finite numbers, booleans,
// null): the BullMQ backend stores them as JSON, so a typed array or Map would arrive changed.
// Backends and their extra options: src/queue/options.ts; deployment: docs/deployment.md.

/** A failure as it crosses a process or thread boundary: plain data only. */
export interface JobFailure {
  readonly code: string;
  readonly message: string;
  readonly hint?: string;
  /** true: not retried (bad input, failed analysis); false: was retried until attempts ran out. */
  readonly permanent: boolean;
}

export type JobOutcome<Result> =
  | { readonly id: string; readonly status: 'completed'; readonly value: Result; readonly attempts: number }
  | { readonly id: string; readonly status: 'failed'; readonly failure: JobFailure; readonly attempts: number };

/** Counts: waiting includes jobs waiting for a retry; completed/failed count finished jobs (in-process:
 * in this object's lifetime; BullMQ: delivered by this object plus those in Redis not yet delivered). */
export interface JobQueueStats {
  readonly waiting: number;
  readonly active: number;
  readonly completed: number;
  readonly failed: number;
}

export interface JobQueue<Payload, Result> {
  /** Adds a job; a second enqueue of the same id (while known to the queue) is a no-op. */
  enqueue(id: string, payload: Payload): Promise<void>;
  /**
   * Registers the consumer of outcomes. Each finished job is delivered at least once; the listener
   * must be idempotent by job id (the coordinator commits each set once). A listener that throws or
   * rejects causes redelivery later (backends that persist outcomes) or is logged (in-process).
   */
  onOutcome(listener: (outcome: JobOutcome<Result>) => void | Promise<void>): void;
  /** Current counts. */
  stats(): Promise<JobQueueStats>;
  /**
   * Worker processes taking jobs from this queue now (BullMQ: connections to its Redis queue, this
   * process's own worker included); undefined when the backend cannot tell. Backends whose jobs always
   * run in this process leave it out.
   */
  connectedWorkers?(): Promise<number | undefined>;
  /** Resolves when no job is waiting or running and every outcome has been delivered. */
  drain(): Promise<void>;
  /** Stops taking jobs, lets running jobs finish (or hands them back), releases resources. */
  close(): Promise<void>;
}

/** Options shared by every backend; each backend documents the extra ones it takes. */
export interface JobQueueOptions {
  /** Module file (file: URL or absolute path) whose default export processes one payload. */
  readonly processorFile: string | URL;
  /** Jobs run at once (in-process: worker threads; BullMQ: per worker process). Default: CPU cores. */
  readonly concurrency?: number;
  /** Total attempts for transient failures, including the first. Default 3. */
  readonly attempts?: number;
  /** First retry delay in ms, doubled at each further attempt (exponential backoff). Default 500. */
  readonly backoffMs?: number;
  /** Per-job time limit in ms; a job over it fails as transient. Default 300000 (5 min). */
  readonly jobTimeoutMs?: number;
}
