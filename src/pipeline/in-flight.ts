// Back-pressure bookkeeping for dispatch: the jobs handed to the queue and not yet committed (each
// holds a slot until its commit lands or is let go) and the ready sets waiting for a slot, oldest
// first, so payloads of a backlog are not built before there is room to run them. drain() waits on
// whenEmpty(), which resolves when the last slot is released (an event, not a poll).

export class InFlightSlots {
  private readonly jobs = new Set<string>();
  private readonly waiting: string[] = [];
  private readonly waitingIds = new Set<string>();
  private emptyWaiters: (() => void)[] = [];

  /** `capacity`: most jobs in flight at once. */
  constructor(readonly capacity: number) {}

  /** Jobs in flight. */
  get size(): number {
    return this.jobs.size;
  }

  /** Ready sets waiting for a slot. */
  get waitingCount(): number {
    return this.waiting.length;
  }

  /** Free slots, less `reserved` already promised to sets being dispatched. */
  room(reserved = 0): number {
    return Math.max(0, this.capacity - this.jobs.size - reserved);
  }

  /** Takes a slot for `jobId` (dispatch does not check room for a re-run or a recovered set). */
  take(jobId: string): void {
    this.jobs.add(jobId);
  }

  /** Releases the slot of `jobId`; when none is left in flight, wakes every whenEmpty() waiter. */
  release(jobId: string): void {
    this.jobs.delete(jobId);
    if (this.jobs.size > 0 || this.emptyWaiters.length === 0) return;
    const waiters = this.emptyWaiters;
    this.emptyWaiters = [];
    for (const wake of waiters) wake();
  }

  /** Resolves once no job is in flight (at once when none is). */
  whenEmpty(): Promise<void> {
    if (this.jobs.size === 0) return Promise.resolve();
    return new Promise((resolve) => this.emptyWaiters.push(resolve));
  }

  /** Puts a ready set at the end of the waiting line (once). */
  wait(setId: string): void {
    if (this.waitingIds.has(setId)) return;
    this.waitingIds.add(setId);
    this.waiting.push(setId);
  }

  /** Marks `setId` as dispatched by another way; an entry left in the line is skipped when taken (its set is no longer open). */
  dispatched(setId: string): void {
    this.waitingIds.delete(setId);
  }

  /** Takes up to `count` waiting set ids, oldest first. */
  takeWaiting(count: number): string[] {
    const ids = this.waiting.splice(0, count);
    for (const id of ids) this.waitingIds.delete(id);
    return ids;
  }
}
