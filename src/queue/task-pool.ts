// A piscina worker-thread pool that runs a processor file, one attempt per call, with a time limit.
// Shared by the in-process backend and by BullMQ worker processes, so jobs run off the main thread
// everywhere (on BullMQ this keeps the event loop free to renew job locks during long fits).
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { Piscina } from 'piscina';
import { ConfigInvalid } from '../model/errors.js';
import { queueFailure } from './job-failure.js';
import { BATCH_TASK, type BatchTask, type TaskResult } from './task-result.js';

/**
 * Young-generation limit of each pool thread's V8 heap (MiB). The analysis allocates briskly and V8's
 * default lets each thread's young generation grow far larger; this bound kept the 10,000-file
 * backlog's peak RSS at 342–359 MB instead of ~406 MB on the 2-core bench machine (bench/pipeline),
 * with no measurable change in throughput.
 */
export const POOL_THREAD_YOUNG_GENERATION_MB = 16;

export interface TaskPoolOptions {
  /** file: URL of the processor module (default export: payload → result). */
  readonly processorHref: string;
  /** Worker threads, i.e. attempts running at once. */
  readonly concurrency: number;
  /** Time limit of one attempt in ms; the thread is terminated when it is exceeded. */
  readonly jobTimeoutMs: number;
}

export interface TaskPool {
  /** Runs one attempt; never rejects (timeouts and crashed threads come back as transient failures). */
  run(payload: unknown): Promise<TaskResult>;
  /**
   * Runs one attempt of each payload, one after the other in one thread (one message each way instead
   * of one per payload), with the sum of their time limits. Returns one result per payload, in order;
   * undefined when the batch as a whole was stopped (over its time limit, or its thread died): which
   * payload was to blame is unknown then, so the caller runs each again alone. Never rejects.
   */
  runBatch(payloads: readonly unknown[]): Promise<TaskResult[] | undefined>;
  /** Waits for running attempts, then stops the threads. */
  close(): Promise<void>;
  /** Stops the threads at once, abandoning running attempts. */
  destroy(): Promise<void>;
}

/**
 * The compiled thread entry. Under the TypeScript sources (vitest) the sibling .js file does not
 * exist, so the build output in dist/ is used; `npm run build` must have run.
 */
function threadEntryPath(): string {
  const sibling = fileURLToPath(new URL('./pool-task.js', import.meta.url));
  if (existsSync(sibling)) return sibling;
  const built = fileURLToPath(new URL('../../dist/src/queue/pool-task.js', import.meta.url));
  if (existsSync(built)) return built;
  throw new ConfigInvalid(`the compiled pool thread entry is missing (${sibling})`, {
    hint: 'Run `npm run build` in the driftlight folder.',
  });
}

/** Checks that the processor file exists, so a wrong path fails at start and not at the first job. */
export function assertProcessorExists(processorHref: string): void {
  const path = processorHref.startsWith('file:') ? fileURLToPath(processorHref) : processorHref;
  if (!existsSync(path)) {
    throw new ConfigInvalid(`processor file not found: ${path}`, {
      configPath: 'queue.processorFile',
      hint: 'Build driftlight (`npm run build`) or pass the path of a compiled processor module.',
    });
  }
}

/** Starts a pool of `concurrency` threads running the processor file. */
export function createTaskPool(options: TaskPoolOptions): TaskPool {
  assertProcessorExists(options.processorHref);
  const pool = new Piscina({
    filename: threadEntryPath(),
    minThreads: options.concurrency,
    maxThreads: options.concurrency,
    idleTimeout: 60_000,
    resourceLimits: { maxYoungGenerationSizeMb: POOL_THREAD_YOUNG_GENERATION_MB },
    workerData: { processorHref: options.processorHref },
    // No run/wait-time histograms: nothing reads them, and they cost the main thread per task.
    recordTiming: false,
  });
  return {
    async run(payload) {
      const signal = AbortSignal.timeout(options.jobTimeoutMs);
      try {
        return (await pool.run(payload, { signal })) as TaskResult;
      } catch (error) {
        if (signal.aborted) {
          return { ok: false, failure: queueFailure('JOB_TIMEOUT', `job exceeded ${options.jobTimeoutMs} ms`) };
        }
        const message = error instanceof Error ? error.message : String(error);
        return { ok: false, failure: queueFailure('WORKER_LOST', `worker thread died: ${message}`) };
      }
    },
    async runBatch(payloads) {
      const task: BatchTask = { kind: BATCH_TASK, payloads };
      try {
        const results = (await pool.run(task, {
          signal: AbortSignal.timeout(options.jobTimeoutMs * payloads.length),
        })) as TaskResult[];
        return results.length === payloads.length ? results : undefined;
      } catch {
        return undefined;
      }
    },
    close: () => pool.close(),
    destroy: () => pool.destroy(),
  };
}
