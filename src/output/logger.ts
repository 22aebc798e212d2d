// The pipeline's logger: pino NDJSON to the log file and to stdout (pretty on a terminal).
// Use `logger.child({ setId })` so every line about a set carries its id.
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

/** Creates the logger for `logging` config writing to `logFile`; stdout lines go to `stdoutStream`. */
export function createLogger(
  logging: LoggingConfig,
  logFile: string,
  stdoutStream: NodeJS.WritableStream = process.stdout,
): Logger {
  mkdirSync(dirname(logFile), { recursive: true });
  const level: Level = logging.level === 'silent' ? 'fatal' : logging.level;
  const file = pino.destination({ dest: logFile, sync: false, mkdir: true });
  openLogFiles.add(file);
  file.once('close', () => openLogFiles.delete(file));
  const streams: StreamEntry[] = [{ level, stream: file }];
  const isTty = (stdoutStream as NodeJS.WriteStream).isTTY === true;
  const mode = logging.stdout === 'auto' ? (isTty ? 'pretty' : 'json') : logging.stdout;
  if (mode === 'json') streams.push({ level, stream: stdoutStream });
  if (mode === 'pretty') {
    streams.push({
      level,
      stream: pino.transport({
        target: 'pino-pretty',
        options: { colorize: true, destination: 1 },
      }) as unknown as NodeJS.WritableStream,
    });
  }
  return pino(
    { level: logging.level, base: { app: 'driftlight' }, timestamp: pino.stdTimeFunctions.isoTime },
    pino.multistream(streams),
  );
}
