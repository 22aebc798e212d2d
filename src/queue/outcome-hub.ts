// Outcome listeners of a JobQueue: outcomes that finish before a listener is registered are held
// and handed over on registration; a listener that throws is logged (never swallowed silently).
import type { Logger } from 'pino';
import type { JobOutcome } from './job-queue.js';

export type OutcomeListener<Result> = (outcome: JobOutcome<Result>) => void | Promise<void>;

export class OutcomeHub<Result> {
  private readonly listeners: OutcomeListener<Result>[] = [];
  private readonly held: JobOutcome<Result>[] = [];
  private inFlight = 0;

  constructor(
    private readonly logger: Logger,
    private readonly onSettled: () => void,
  ) {}

  /** True when at least one listener is registered. */
  get hasListener(): boolean {
    return this.listeners.length > 0;
  }

  /** Outcomes held for lack of a listener plus deliveries still running. */
  get pending(): number {
    return this.held.length + this.inFlight;
  }

  /** Registers a listener and hands it the outcomes held so far. */
  add(listener: OutcomeListener<Result>): void {
    this.listeners.push(listener);
    for (const outcome of this.held.splice(0)) void this.deliver(outcome);
  }

  /** Delivers to every listener; resolves true if all of them succeeded. Holds it when none exists. */
  async deliver(outcome: JobOutcome<Result>): Promise<boolean> {
    if (this.listeners.length === 0) {
      this.held.push(outcome);
      return false;
    }
    this.inFlight += 1;
    let allSucceeded = true;
    try {
      for (const listener of this.listeners) {
        try {
          await listener(outcome);
        } catch (error) {
          allSucceeded = false;
          this.logger.error({ err: error, jobId: outcome.id }, 'job outcome listener failed');
        }
      }
    } finally {
      this.inFlight -= 1;
      this.onSettled();
    }
    return allSucceeded;
  }
}
