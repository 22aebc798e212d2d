// Log channel: one structured line per QC verdict (category "qc", info level) through the pipeline's
// pino logger (or any logger of the same shape); without one, a JSON line on stderr.
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
  const write =
    (level: string) =>
    (object: object, message: string): void => {
      stream.write(`${JSON.stringify({ level, time: new Date().toISOString(), msg: message, ...object })}\n`);
    };
  return { info: write('info'), warn: write('warn'), error: write('error') };
}

/** The structured fields of a QC verdict's log line: category "qc" and the verdict, without the raw numbers' noise. */
export function qcLogFields(message: AlertMessage): object {
  return {
    category: 'qc',
    qc: {
      type: message.type,
      severity: message.severity,
      controlId: message.controlId,
      ruleId: message.ruleId,
      checks: message.checks,
      metric: message.metric,
      setId: message.setId,
      acquiredAt: message.acquiredAt,
      key: message.key,
      values: message.values,
    },
  };
}

/** One line: "QC CRITICAL teal yield-westgard 1-3s: control yield 0.553 is 8.2 SD below target 0.800 (1-3s)." */
export function qcLogLine(message: AlertMessage): string {
  const tag = message.type === 'recovery' ? 'RECOVERED' : message.severity.toUpperCase();
  const checks = message.checks.length === 0 ? '' : ` ${message.checks.join(', ')}`;
  return `QC ${tag} ${message.controlId} ${message.ruleId}${checks}: ${message.message.replace(/\s*\n\s*/g, ' ')}`;
}

/** Creates the log channel writing through `logger`. */
export function createLogChannel(config: LogChannelConfig, logger: AlertLogger): AlertChannel {
  return {
    id: config.id,
    type: 'log',
    send(message: AlertMessage): Promise<void> {
      // Issue 16.8: a QC verdict is not a program error. It is logged at info level in its own
      // category ("qc"), one line, its QC severity as a field, never at the warn/error levels that
      // report faults of driftlight itself.
      logger.info(qcLogFields(message), qcLogLine(message));
      return Promise.resolve();
    },
  };
}
