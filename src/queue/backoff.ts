// The one backoff rule of the code base: exponential, doubling per failure, optionally capped. Used
// by the in-process queue's job retries, held commit retries and alert delivery retries.

/** Wait before attempt `attempt + 1` after `attempt` failures (ms): `firstMs` · 2^(attempt − 1), at most `maxMs` (exponent capped at 30). */
export function exponentialBackoffMs(firstMs: number, attempt: number, maxMs = Number.POSITIVE_INFINITY): number {
  return Math.min(maxMs, firstMs * 2 ** Math.min(Math.max(attempt - 1, 0), 30));
}
