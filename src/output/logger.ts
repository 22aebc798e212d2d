// The pipeline's logger: pino NDJSON to the log file and to stdout (pretty on a terminal).
// Use `logger.child({ setId })` so every line about a set carries its id. The log file is written
// synchronously (one write per line, a few microseconds): a line is in the file when the call
// returns, so every committed set has its line even when the process exits at once or is killed
// right after (an asynchronous file stream lost all its pending lines when close() had resolved and
// the process then ended; its flush(cb) does not wait with pino's defaults). Issue 20, item 9.
import { mkdirSync } from 'node:fs';
import { dirname } from 'node:path';
import { pino, type Level, type Logger, type StreamEntry } from 'pino';
import type { LoggingConfig } from '../config/sections/logging.js';

/** Log file streams opened by createLogger and not closed, for reopenLogFiles(). */
const openLogFiles = new Set<ReturnType<typeof pino.destination>>();

/**
 * Reopens every log file this process writes (after `logrotate` renamed it: the usual SIGHUP
 * convention; `watch` calls it on SIGHUP). Lines go on to the file at the configured path, created
 * anew if it was moved away.
 */
export function reopenLogFiles(): void {
  for (const destination of openLogFiles) destination.reopen();
}

/** How to flush each logger createLogger made (its stdout stream or pretty-printing worker). */
const flushers = new WeakMap<Logger, () => Promise<void>>();

/**
 * Resolves once every line `logger` took is written: the log file at once (written synchronously),
 * stdout once drained, the pretty-printing worker once flushed; never waits more than `timeoutMs`
 * (a stream that never drains must not keep the process from exiting). Call before exit.
 */
export async function flushLogger(logger: Logger, timeoutMs = 1000): Promise<void> {
  const flush =
    flushers.get(logger) ??
    (() =>
      new Promise<void>((resolve) => {
        logger.flush(() => resolve());
      }));
  let timer: NodeJS.Timeout | undefined;
  await Promise.race([
    flush(),
    new Promise<void>((resolve) => {
      timer = setTimeout(resolve, timeoutMs);
      timer.unref();
    }),
  ]);
  clearTimeout(timer);
}

/** Resolves once `stream` has no buffered output (at once if it has none). */
function drained(stream: NodeJS.WritableStream): Promise<void> {
  const writable = stream as Partial<NodeJS.WriteStream>;
  if (writable.writableNeedDrain !== true) return Promise.resolve();
  return new Promise((resolve) => stream.once('drain', () => resolve()));
}

/** Creates the logger for `logging` config writing to `logFile`; stdout lines go to `stdoutStream`. */
export function createLogger(
  logging: LoggingConfig,
  logFile: string,
  stdoutStream: NodeJS.WritableStream = process.stdout,
): Logger {
  mkdirSync(dirname(logFile), { recursive: true });
  const level: Level = logging.level === 'silent' ? 'fatal' : logging.level;
  const file = pino.destination({ dest: logFile, sync: true, mkdir: true });
  openLogFiles.add(file);
  file.once('close', () => openLogFiles.delete(file));
  const streams: StreamEntry[] = [{ level, stream: file }];
  const isTty = (stdoutStream as NodeJS.WriteStream).isTTY === true;
  const mode = logging.stdout === 'auto' ? (isTty ? 'pretty' : 'json') : logging.stdout;
  const pending: (() => Promise<void>)[] = [];
  if (mode === 'json') {
    streams.push({ level, stream: stdoutStream });
    pending.push(() => drained(stdoutStream));
  }
  if (mode === 'pretty') {
    const pretty = pino.transport({ target: 'pino-pretty', options: { colorize: true, destination: 1 } });
    streams.push({ level, stream: pretty });
    pending.push(() => new Promise((resolve) => pretty.flush(() => resolve())));
  }
  const logger = pino(
    { level: logging.level, base: { app: 'driftlight' }, timestamp: pino.stdTimeFunctions.isoTime },
    pino.multistream(streams),
  );
  flushers.set(logger, async () => {
    await Promise.all(pending.map((flush) => flush()));
  });
  return logger;
}
