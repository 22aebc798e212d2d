// Turning a thrown value into a JobFailure (plain data that crosses threads, processes and Redis) and
// back. Permanence follows the job-queue contract: `permanent: true` on the error, or an error code
// whose kind is input, config or analysis. Everything else (including unknown errors) is transient.
import { ERROR_CODES, type ErrorCode } from '../model/error-codes.js';
import type { JobFailure } from './job-queue.js';

const PERMANENT_KINDS: ReadonlySet<string> = new Set(['input', 'config', 'analysis']);

function isKnownCode(code: unknown): code is ErrorCode {
  return typeof code === 'string' && Object.hasOwn(ERROR_CODES, code);
}

/** A JobFailure from any thrown value (DriftlightError, plain Error, string, ...). */
export function toJobFailure(error: unknown): JobFailure {
  const record = typeof error === 'object' && error !== null ? (error as Record<string, unknown>) : {};
  const message =
    error instanceof Error ? error.message : typeof record['message'] === 'string' ? record['message'] : String(error);
  const code = typeof record['code'] === 'string' ? record['code'] : 'TRANSIENT';
  const kindIsPermanent = isKnownCode(code) && PERMANENT_KINDS.has(ERROR_CODES[code].kind);
  const permanent = record['permanent'] === true || kindIsPermanent;
  const hint =
    typeof record['hint'] === 'string' ? record['hint'] : isKnownCode(code) ? ERROR_CODES[code].hint : undefined;
  return hint === undefined ? { code, message, permanent } : { code, message, hint, permanent };
}

/** A failure raised by the queue itself (timeout, lost worker), always transient. */
export function queueFailure(code: 'JOB_TIMEOUT' | 'WORKER_LOST', message: string): JobFailure {
  return { code, message, hint: ERROR_CODES[code].hint, permanent: false };
}

const ENCODED_PREFIX = 'driftlight-failure:';

/** Encodes a failure into an Error message (BullMQ keeps only the message as failedReason). */
export function encodeFailure(failure: JobFailure): string {
  return `${ENCODED_PREFIX}${JSON.stringify(failure)}`;
}

/** Decodes a BullMQ failedReason; reasons BullMQ wrote itself (e.g. stalled) become WORKER_LOST. */
export function decodeFailure(reason: string | undefined): JobFailure {
  if (reason !== undefined && reason.startsWith(ENCODED_PREFIX)) {
    try {
      const parsed = JSON.parse(reason.slice(ENCODED_PREFIX.length)) as unknown;
      if (typeof parsed === 'object' && parsed !== null) return toJobFailure(parsed);
    } catch {
      // fall through: an unreadable reason is reported as it stands
    }
  }
  const text = reason ?? 'job failed without a reason';
  return /stall/i.test(text)
    ? queueFailure('WORKER_LOST', text)
    : { code: 'TRANSIENT', message: text, permanent: false };
}
