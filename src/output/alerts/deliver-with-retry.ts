// Delivery with a time limit per attempt and exponential backoff between attempts
// (wait = backoffMs · 2^(attempt − 1)); returns the outcome instead of throwing.
import type { AlertChannel } from './alert-channel.js';
import type { AlertMessage } from './alert-message.js';
import { describeDeliveryError } from './delivery-error.js';
import { exponentialBackoffMs } from '../../queue/backoff.js';

export interface RetryPolicy {
  /** Attempts including the first (≥ 1). */
  readonly attempts: number;
  /** Wait before the first retry in ms; doubled for each further retry. */
  readonly backoffMs: number;
  /** Time limit per attempt in ms. */
  readonly timeoutMs: number;
}

export interface DeliveryOutcome {
  readonly status: 'delivered' | 'failed';
  readonly attempts: number;
  /** Last error when failed, with its causes (describeDeliveryError). */
  readonly error?: string;
}

/** Waits `ms` milliseconds. The timer keeps the process alive: `process` awaits a delivery burst before it summarises and exits (an unref'd wait let Node exit mid-burst with code 13). */
export function sleepMs(ms: number): Promise<void> {
  return new Promise((resolve) => setTimeout(resolve, ms));
}

/** Sends with retries; never throws. O(attempts). */
export async function deliverWithRetry(
  channel: AlertChannel,
  message: AlertMessage,
  policy: RetryPolicy,
  sleep: (ms: number) => Promise<void> = sleepMs,
): Promise<DeliveryOutcome> {
  let lastError = '';
  for (let attempt = 1; attempt <= policy.attempts; attempt++) {
    const controller = new AbortController();
    const timer = setTimeout(
      () => controller.abort(new Error(`timed out after ${policy.timeoutMs} ms`)),
      policy.timeoutMs,
    );
    timer.unref();
    try {
      const aborted = new Promise<never>((_, reject) => {
        controller.signal.addEventListener('abort', () => reject(new Error(`timed out after ${policy.timeoutMs} ms`)), {
          once: true,
        });
      });
      // A channel that ignores the signal still loses the race: the attempt ends at its time limit.
      await Promise.race([channel.send(message, controller.signal), aborted]);
      return { status: 'delivered', attempts: attempt };
    } catch (error) {
      lastError = controller.signal.aborted ? `timed out after ${policy.timeoutMs} ms` : describeDeliveryError(error);
    } finally {
      clearTimeout(timer);
    }
    if (attempt < policy.attempts) await sleep(exponentialBackoffMs(policy.backoffMs, attempt));
  }
  return { status: 'failed', attempts: policy.attempts, error: lastError };
}
