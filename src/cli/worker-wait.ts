// A pure BullMQ coordinator (queue.runWorker: false) with no worker would wait silently for ever:
// jobs sit in Redis and nothing runs them. While jobs wait and no worker is connected, `process` and
// `watch` say so on stderr and in the log, at once and then every WORKER_WAIT_REPEAT_MS, naming the
// queue and the command that starts a worker (the Redis password is never shown); once a worker is
// there they say it once. Issue 20, item 9.
import { coordinatorRunsWorker } from '../config/sections/queue.js';
import type { Pipeline } from '../pipeline/runtime.js';
import type { JobQueue } from '../queue/job-queue.js';
import { redactRedisUrl } from '../queue/redis-connection.js';
import { REDIS_URL_ENV } from './config-option.js';

/** How often the waiting message is repeated, in ms. */
export const WORKER_WAIT_REPEAT_MS = 30_000;

export interface WorkerWaitOptions {
  /** The command that waits (`process`, `watch`), named in the message. */
  readonly command: string;
  readonly queueName: string;
  readonly prefix: string;
  readonly redisUrl: string;
  /** Default: WORKER_WAIT_REPEAT_MS. */
  readonly intervalMs?: number;
  readonly stderr: { write(text: string): unknown };
  readonly logger: {
    warn(fields: Record<string, unknown>, message: string): void;
    info(fields: Record<string, unknown>, message: string): void;
  };
}

/** Starts looking for workers while jobs wait in `queue` (at once, then every interval); returns stop, which resolves once no check runs. */
export function watchForWorkers(
  queue: Pick<JobQueue<unknown, unknown>, 'stats' | 'connectedWorkers'>,
  options: WorkerWaitOptions,
): () => Promise<void> {
  const redis = redactRedisUrl(options.redisUrl);
  // A URL with a password is not repeated: the worker reads it from the environment instead.
  const redisArgument =
    redis === options.redisUrl ? redis : `env (with $${REDIS_URL_ENV} set to the Redis URL and its password)`;
  const where = { queue: options.queueName, prefix: options.prefix, redisUrl: redis };
  let warned = false;
  let stopped = false;
  let running: Promise<void> = Promise.resolve();
  const check = async (): Promise<void> => {
    const workers = await queue.connectedWorkers?.();
    if (stopped || workers === undefined) return;
    if (workers > 0) {
      if (warned) {
        options.stderr.write(
          `driftlight ${options.command}: a worker connected to queue "${options.queueName}"; continuing\n`,
        );
        options.logger.info({ ...where, workers }, 'a worker connected; jobs run again');
      }
      warned = false;
      return;
    }
    const { waiting } = await queue.stats();
    if (stopped || waiting === 0) return;
    warned = true;
    const message =
      `waiting for workers: ${waiting} job(s) in queue "${options.queueName}" (prefix ${options.prefix}, Redis ${redis}) ` +
      `and no worker is connected. Start one where that Redis is reachable: ` +
      `driftlight worker --prefix ${options.prefix} --queue ${options.queueName} --redis ${redisArgument} ` +
      `(or set queue.runWorker: true to run jobs in this process). Still waiting; said again every ` +
      `${Math.round((options.intervalMs ?? WORKER_WAIT_REPEAT_MS) / 1000)} s.`;
    options.stderr.write(`driftlight ${options.command}: ${message}\n`);
    options.logger.warn({ ...where, waiting, alert: 'no-workers' }, message);
  };
  const run = (): void => {
    running = running
      .then(check)
      .catch((error: unknown) => options.logger.warn({ ...where, err: error }, 'could not look for workers'));
  };
  run();
  const timer = setInterval(run, options.intervalMs ?? WORKER_WAIT_REPEAT_MS);
  timer.unref();
  return async () => {
    stopped = true;
    clearInterval(timer);
    await running;
  };
}

/** Looks for workers while `pipeline` is a pure BullMQ coordinator (queue.runWorker: false), saying so on stderr and in its log; returns stop (a no-op otherwise). */
export function startWorkerWait(pipeline: Pipeline, command: string): () => Promise<void> {
  const { queue: q } = pipeline.config;
  if (q.backend !== 'bullmq' || coordinatorRunsWorker(q)) return () => Promise.resolve();
  return watchForWorkers(pipeline.queue, {
    command,
    queueName: q.queueName,
    prefix: q.prefix,
    redisUrl: q.redisUrl,
    stderr: process.stderr,
    logger: pipeline.logger,
  });
}
