// Held commits: an outcome whose commit failed (results, outbox or archive folder not writable, a
// full disk, a ledger error) is kept and committed again after a backoff, so a results share that
// is briefly away does not leave a set queued until the next start, which for `watch` may be months
// away. The held outcome keeps its in-flight slot, so during a long outage dispatch pauses once
// every slot is held instead of running analyses whose results cannot be written.
import { exponentialBackoffMs } from '../queue/backoff.js';

/** First wait before a failed commit is tried again (ms); doubled after each failure up to COMMIT_RETRY_MAX_MS. */
export const COMMIT_RETRY_FIRST_MS = 1000;
export const COMMIT_RETRY_MAX_MS = 60_000;
/**
 * Failed commits of one outcome after which it is let go (the set stays queued and is re-run at the
 * next start) when the error is not an I/O or database error (which may pass; those are retried
 * for as long as the process runs).
 */
export const COMMIT_RETRY_MAX_FAILURES_OTHER = 3;

/** Whether `error` comes from the file system or the database (a system errno code or an SQLite code), i.e. may pass. */
export function isEnvironmentError(error: unknown): boolean {
  const code = (error as { code?: unknown } | null)?.code;
  return typeof code === 'string' && (/^E[A-Z0-9]+$/.test(code) || code.startsWith('SQLITE_'));
}

/** The wait before the next try after `failures` failed commits (ms): COMMIT_RETRY_FIRST_MS doubled per failure, at most COMMIT_RETRY_MAX_MS. */
export function commitRetryDelayMs(failures: number): number {
  return exponentialBackoffMs(COMMIT_RETRY_FIRST_MS, failures, COMMIT_RETRY_MAX_MS);
}

/** Runs `run` after `delayMs`; returns a function that cancels it. */
export type Scheduler = (run: () => void, delayMs: number) => () => void;

/** The real scheduler: an unref'd timer (a held commit does not keep the process alive). */
export const timerScheduler: Scheduler = (run, delayMs) => {
  const timer = setTimeout(run, delayMs);
  timer.unref();
  return () => clearTimeout(timer);
};

/** What became of a failed commit: held for a retry in `retryInMs`, or let go. */
export type HoldDecision =
  | { readonly kind: 'held'; readonly failures: number; readonly retryInMs: number }
  | { readonly kind: 'let-go'; readonly failures: number };

interface Held<T> {
  readonly outcome: T;
  readonly failures: number;
  /** Cancels the pending retry; undefined once the retry has started. */
  cancel: (() => void) | undefined;
}

/** Outcomes whose commit failed, by job id, each with its failure count and pending retry. */
export class HeldCommits<T extends { readonly id: string }> {
  private readonly held = new Map<string, Held<T>>();

  /** `retry` puts an outcome back into the next group commit. */
  constructor(
    private readonly retry: (outcome: T) => void,
    private readonly schedule: Scheduler = timerScheduler,
  ) {}

  /** Outcomes held now. */
  get size(): number {
    return this.held.size;
  }

  has(jobId: string): boolean {
    return this.held.has(jobId);
  }

  /**
   * Records a failed commit of `outcome`: held and retried after commitRetryDelayMs(failures), or
   * let go when `lettingGo` (drain) or when an error that is not an environment error has failed
   * COMMIT_RETRY_MAX_FAILURES_OTHER times.
   */
  fail(outcome: T, error: unknown, lettingGo: boolean): HoldDecision {
    const failures = (this.held.get(outcome.id)?.failures ?? 0) + 1;
    if (lettingGo || (!isEnvironmentError(error) && failures >= COMMIT_RETRY_MAX_FAILURES_OTHER)) {
      this.held.delete(outcome.id);
      return { kind: 'let-go', failures };
    }
    const retryInMs = commitRetryDelayMs(failures);
    const entry: Held<T> = { outcome, failures, cancel: undefined };
    this.held.set(outcome.id, entry);
    entry.cancel = this.schedule(() => this.retryNow(outcome.id), retryInMs);
    return { kind: 'held', failures, retryInMs };
  }

  /** Forgets a held outcome whose commit has now succeeded. */
  committed(jobId: string): void {
    this.held.delete(jobId);
  }

  /** Retries a held outcome now (its timer fired, or drain() wants it); nothing when its retry already started. */
  retryNow(jobId: string): void {
    const entry = this.held.get(jobId);
    if (entry?.cancel === undefined) return;
    entry.cancel();
    entry.cancel = undefined;
    this.retry(entry.outcome);
  }

  /** Retries every held outcome now. */
  retryAll(): void {
    for (const jobId of [...this.held.keys()]) this.retryNow(jobId);
  }
}
