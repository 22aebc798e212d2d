// `driftlight watch`: runs unattended until SIGINT/SIGTERM — watches the inbox, assembles sets,
// dispatches them, commits results; on a signal it stops watching, drains running jobs and exits.
// On bullmq it does not wait for the Redis backlog: queued jobs persist there and their outcomes
// are swept in at the next start, so it only closes the queue.
import { existsSync } from 'node:fs';
import type { Command } from 'commander';
import { reopenLogFiles } from '../output/logger.js';
import { EmptyInboxFolders } from '../pipeline/empty-folders.js';
import { batchStableFiles } from '../pipeline/intake-batcher.js';
import { missingFolders, openPipeline, requiredFolders, type Pipeline } from '../pipeline/runtime.js';
import { watchInbox } from '../pipeline/watcher.js';
import type { CommandModule } from './command-module.js';
import { startWorkerWait } from './worker-wait.js';
import { configFromOptions, withConfigOption, withRedisOption, type ConfigCliOptions } from './config-option.js';
import { softwareVersion } from './version.js';
import { startWatchDigest } from './digest.js';
import { startHttp, untilSignal, withHttpOptions, type HttpCliOptions } from './serve.js';

/** How often time-based result-stage checks run while watching, in ms. */
const CLOCK_CHECK_INTERVAL_MS = 60_000;

/** What an in-process caller (the demo) may change about the watch loop; the CLI passes none. */
export interface WatchRuntimeOptions {
  /** The clock the pipeline reads (set deadlines, QC times, alert cooldowns). Default: the system clock. */
  readonly clock?: () => Date;
  /** How often time-based QC checks run, in ms of real time. Default: 60000 */
  readonly clockCheckIntervalMs?: number;
  /** How often open sets' deadlines are checked, in ms of real time. Default: assembly.setTimeoutMs / 4, within 50–1000 */
  readonly tickIntervalMs?: number;
  /** Called once the watcher has listed the inbox and reports new files. */
  readonly onReady?: (pipeline: Pipeline) => void;
}

/** Runs the watch loop until `stop` resolves (the CLI resolves it on SIGINT/SIGTERM). */
export async function runWatch(
  options: ConfigCliOptions & HttpCliOptions,
  stop: Promise<string>,
  runtime: WatchRuntimeOptions = {},
): Promise<void> {
  const config = configFromOptions(options);
  const clock = runtime.clock ?? ((): Date => new Date());
  const pipeline = openPipeline(config, {
    softwareVersion: softwareVersion(),
    command: 'watch',
    requireFolders: requiredFolders(config),
    ...(runtime.clock === undefined ? {} : { clock: runtime.clock }),
  });
  const { coordinator, logger } = pipeline;
  await coordinator.recover();
  const stopWorkerWait = startWorkerWait(pipeline, 'watch');
  const digestSchedule = startWatchDigest(pipeline);
  // --http: the status page over this process's ledger (the same routes as `driftlight serve`).
  const http =
    options.http === undefined
      ? undefined
      : await startHttp(options, config, pipeline.ledger).catch(async (error: unknown) => {
          await digestSchedule?.stop();
          await pipeline.close();
          throw error;
        });
  if (http !== undefined) logger.info({ url: http.url }, `status page at ${http.url}`);
  let chain: Promise<void> = Promise.resolve();
  const serial = (work: () => Promise<void>): void => {
    chain = chain.then(work).catch((error: unknown) => logger.error({ err: error }, 'pipeline step failed'));
  };
  // Files whose intake failed for a reason other than the file (an I/O or ledger error) are taken
  // again every watch.rescanIntervalMs while they are still in the inbox, and file moves that
  // failed after their commit (archive or quarantine folder not writable) are finished then too.
  const intakeAgain = new Set<string>();
  // Folders emptied of the files taken (an instrument's day folders) are removed once quiet.
  const emptyFolders = new EmptyInboxFolders(config.folders.inbox, config.watch.stabilityWindowMs, logger);
  const intake = async (paths: readonly string[]): Promise<void> => {
    for (const path of paths) emptyFolders.taken(path);
    for (const path of await coordinator.intakeMany(paths)) intakeAgain.add(path);
  };
  // The inbox or results folder vanishing while running (a share unmounted) is an error logged once
  // per rescan interval while it lasts; dispatch pauses (results would land in a new local folder)
  // and everything resumes by itself when the folder is back.
  let foldersMissing: string[] = [];
  const checkFolders = (): boolean => {
    const missing = missingFolders(config);
    if (missing.length > 0) {
      logger.error(
        { alert: 'folder-missing', folders: missing, retryInMs: config.watch.rescanIntervalMs },
        `${missing.join(' and ')} missing (unmounted share?); dispatch paused, checked again every watch.rescanIntervalMs`,
      );
      coordinator.holdDispatch = true;
    } else if (foldersMissing.length > 0) {
      logger.warn({ folders: foldersMissing }, 'missing folders are back; resuming');
      coordinator.holdDispatch = false;
    }
    foldersMissing = missing;
    return missing.length === 0;
  };
  const retryTimer = setInterval(() => {
    if (!checkFolders()) return;
    const paths = [...intakeAgain].filter((path) => existsSync(path));
    intakeAgain.clear();
    if (paths.length > 0) serial(() => intake(paths));
    serial(async () => {
      coordinator.repairMoves();
      emptyFolders.sweep(Date.now());
    });
  }, config.watch.rescanIntervalMs);
  const watcher = watchInbox(config.folders.inbox, config.watch, {
    onFile: batchStableFiles(serial, intake),
    onReady: () => {
      logger.info({ inbox: config.folders.inbox }, 'watching');
      runtime.onReady?.(pipeline);
    },
    onError: (error) => logger.error({ err: error }, 'watcher error'),
    onMissed: (paths) =>
      logger.warn(
        { files: paths.length, first: paths[0] },
        'the periodic rescan found files whose OS events were lost (taken now); on Linux raise fs.inotify.max_queued_events if this repeats',
      ),
  });
  // SIGHUP (sent by logrotate after it renamed the log file) reopens the log file; without a
  // handler the signal would end the process.
  const onHangup = (): void => {
    reopenLogFiles();
    logger.info('log file reopened (SIGHUP)');
  };
  process.on('SIGHUP', onHangup);
  const tickMs = runtime.tickIntervalMs ?? Math.max(50, Math.min(1000, Math.floor(config.assembly.setTimeoutMs / 4)));
  const timer = setInterval(() => serial(() => coordinator.tick()), tickMs);
  // Time-based QC (a control not measured by its deadline) is checked once a minute.
  const clockTimer = setInterval(
    () => serial(async () => pipeline.clockTick(clock())),
    runtime.clockCheckIntervalMs ?? CLOCK_CHECK_INTERVAL_MS,
  );
  const signal = await stop;
  const persistentQueue = config.queue.backend === 'bullmq';
  logger.info(
    { signal },
    persistentQueue
      ? 'stopping: jobs left in Redis are picked up at the next start'
      : 'stopping: draining running jobs',
  );
  clearInterval(timer);
  clearInterval(clockTimer);
  clearInterval(retryTimer);
  await stopWorkerWait();
  process.off('SIGHUP', onHangup);
  await digestSchedule?.stop();
  await http?.close();
  await watcher.close();
  logger.debug('watcher closed');
  await chain;
  logger.debug('intake finished');
  if (persistentQueue) {
    // Ready sets not yet queued stay open in the ledger and are dispatched at the next start.
    coordinator.holdDispatch = true;
  } else {
    await coordinator.drain();
    logger.debug('jobs drained');
  }
  await pipeline.close();
}

export const watchCommand: CommandModule = {
  register(program: Command) {
    withHttpOptions(
      withRedisOption(
        withConfigOption(
          program.command('watch').description('watch the inbox and analyse every new file until SIGINT/SIGTERM'),
        ),
      ),
      'also serve the status page, /healthz and /metrics on this address',
    ).action(async (options: ConfigCliOptions & HttpCliOptions) => {
      await runWatch(options, untilSignal());
      // Everything is drained and closed; a stray library handle (file-system poll timers) must not
      // keep the process alive. Unref'd: when nothing is left the process exits at once anyway.
      setTimeout(() => process.exit(process.exitCode ?? 0), 500).unref();
    });
  },
};
