// `driftlight worker`: a BullMQ worker process for scale-out. Runs on any machine with Node, takes
// jobs from the coordinator's queue in Redis, and logs its health as pino JSON lines on stdout
// (started, job started/completed/failed with ids and durations, heartbeat, Redis errors).
// SIGTERM/SIGINT finish the jobs in hand, then exit; a second signal exits at once.
import { availableParallelism, hostname } from 'node:os';
import { fileURLToPath } from 'node:url';
import { InvalidArgumentError, type Command } from 'commander';
import { pino } from 'pino';
import { QUEUE_DEFAULTS, resolveQueueOptions, startQueueWorker } from '../queue/index.js';
import { redactRedisUrl } from '../queue/redis-connection.js';
import { REDIS_URL_ENV, redisUrlFrom } from './config-option.js';
import type { CommandModule } from './command-module.js';
import { EXIT_CODES } from './exit-codes.js';

/** The pipeline's job entry, compiled next to this file's dist/src/cli/. */
const DEFAULT_PROCESSOR = fileURLToPath(new URL('../../workers/analyze-job.js', import.meta.url));
const DEFAULT_HEARTBEAT_MS = 30_000;

interface WorkerCliOptions {
  readonly redis?: string;
  readonly concurrency?: number;
  readonly prefix: string;
  readonly queue: string;
  readonly processor: string;
  readonly jobTimeoutMs: number;
  readonly lockDurationMs: number;
  readonly stalledIntervalMs: number;
  readonly maxStalledCount: number;
  readonly heartbeatMs: number;
}

function integer(minimum: number): (text: string) => number {
  return (text) => {
    const value = Number(text);
    if (!Number.isInteger(value) || value < minimum)
      throw new InvalidArgumentError(`expected an integer >= ${minimum}`);
    return value;
  };
}

/** Runs the worker until SIGTERM/SIGINT; resolves after a graceful shutdown. */
async function runWorker(cli: WorkerCliOptions): Promise<void> {
  const options = resolveQueueOptions({
    backend: 'bullmq',
    processorFile: cli.processor,
    // --redis (a URL, @FILE or env), else $DRIFTLIGHT_REDIS_URL, else the default: no password in `ps`.
    redisUrl: redisUrlFrom(cli.redis ?? ((process.env[REDIS_URL_ENV] ?? '') === '' ? QUEUE_DEFAULTS.redisUrl : 'env')),
    prefix: cli.prefix,
    queueName: cli.queue,
    jobTimeoutMs: cli.jobTimeoutMs,
    lockDurationMs: cli.lockDurationMs,
    stalledIntervalMs: cli.stalledIntervalMs,
    maxStalledCount: cli.maxStalledCount,
    ...(cli.concurrency === undefined ? {} : { concurrency: cli.concurrency }),
  });
  const logger = pino({ name: 'driftlight-worker', base: { pid: process.pid, host: hostname() } });
  const worker = startQueueWorker({ ...options, logger, heartbeatMs: cli.heartbeatMs });
  const where = { redisUrl: redactRedisUrl(options.redisUrl), prefix: options.prefix, queue: options.queueName };
  logger.info(
    { event: 'worker.starting', ...where, concurrency: options.concurrency, processor: options.processorHref },
    'worker starting',
  );

  await new Promise<void>((resolve) => {
    let stopping = false;
    const stop = (signal: NodeJS.Signals): void => {
      if (stopping) {
        logger.warn({ event: 'worker.forced', signal }, 'second signal: exiting without waiting for the jobs in hand');
        process.exit(EXIT_CODES.internal.code);
      }
      stopping = true;
      logger.info({ event: 'worker.stopping', signal }, 'finishing the jobs in hand, then exiting');
      worker.close().then(
        () => {
          logger.info({ event: 'worker.stopped' }, 'worker stopped');
          resolve();
        },
        (error: unknown) => {
          logger.error({ event: 'worker.stop-failed', err: error }, 'worker did not stop cleanly');
          process.exitCode = EXIT_CODES.internal.code;
          resolve();
        },
      );
    };
    process.on('SIGTERM', stop);
    process.on('SIGINT', stop);
    void worker.ready().then(
      () => logger.info({ event: 'worker.started', ...where, concurrency: options.concurrency }, 'worker started'),
      () => undefined, // connection problems are logged as redis.error events
    );
  });
}

export const workerCommand: CommandModule = {
  register(program: Command): void {
    program
      .command('worker')
      .description('Run analysis jobs from a Redis (BullMQ) queue; start any number, on any machine with Node.')
      .option(
        '--redis <url>',
        `Redis URL of the queue; @FILE reads it from FILE, env from $${REDIS_URL_ENV} (default: $${REDIS_URL_ENV} when set, else ${QUEUE_DEFAULTS.redisUrl})`,
      )
      .option('--concurrency <n>', `jobs run at once (default: CPU cores, here ${availableParallelism()})`, integer(1))
      .option('--prefix <prefix>', 'Redis key prefix of the queue', QUEUE_DEFAULTS.prefix)
      .option('--queue <name>', 'queue name (one per coordinator)', QUEUE_DEFAULTS.queueName)
      .option('--processor <file>', 'compiled processor module (default export: payload → result)', DEFAULT_PROCESSOR)
      .option('--job-timeout-ms <ms>', 'time limit of one job attempt in ms', integer(1), QUEUE_DEFAULTS.jobTimeoutMs)
      .option(
        '--lock-duration-ms <ms>',
        'job lock in ms; a silent worker loses its job after this',
        integer(1),
        QUEUE_DEFAULTS.lockDurationMs,
      )
      .option(
        '--stalled-interval-ms <ms>',
        'how often stalled jobs are looked for, in ms',
        integer(1),
        QUEUE_DEFAULTS.stalledIntervalMs,
      )
      .option(
        '--max-stalled-count <n>',
        'stalls allowed before a job fails as WORKER_LOST',
        integer(0),
        QUEUE_DEFAULTS.maxStalledCount,
      )
      .option(
        '--heartbeat-ms <ms>',
        'period of the heartbeat log line in ms (0: off)',
        integer(0),
        DEFAULT_HEARTBEAT_MS,
      )
      .action(async (options: WorkerCliOptions) => {
        await runWorker(options);
      });
  },
};
