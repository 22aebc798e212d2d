// Log channel: one structured line per alert through the pipeline's pino logger (or any logger of
// the same shape); without one, a JSON line on stderr.
import type { LogChannelConfig } from '../../config/sections/alerts.js';
import type { AlertChannel } from './alert-channel.js';
import type { AlertMessage } from './alert-message.js';

/** The part of a pino logger the log channel uses. */
export interface AlertLogger {
  info(object: object, message: string): void;
  warn(object: object, message: string): void;
  error(object: object, message: string): void;
}

/** A logger writing JSON lines to a stream (default stderr). */
export function jsonLineLogger(stream: NodeJS.WritableStream = process.stderr): AlertLogger {
  const write = (level: string) => (object: object, message: string): void => {
    stream.write(`${JSON.stringify({ level, time: new Date().toISOString(), msg: message, ...object })}\n`);
  };
  return { info: write('info'), warn: write('warn'), error: write('error') };
}

/** Creates the log channel writing through `logger`. */
export function createLogChannel(config: LogChannelConfig, logger: AlertLogger): AlertChannel {
  return {
    id: config.id,
    type: 'log',
    send(message: AlertMessage): Promise<void> {
      const fields = { alert: { ...message } };
      if (message.type === 'recovery' || message.severity === 'info') logger.info(fields, message.message);
      else if (message.severity === 'warning') logger.warn(fields, message.message);
      else logger.error(fields, message.message);
      return Promise.resolve();
    },
  };
}
