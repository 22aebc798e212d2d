// What the coordinator's parts report while a run goes on: the counters of the end-of-run summary
// and the listeners told about each committed (or failed) set. Intake, dispatch and group commit
// each hold the one RunReport and add to it; nobody else writes the counters.
import type { Logger } from 'pino';

/** Counters for the end-of-run summary. */
export interface CoordinatorCounts {
  filesAccepted: number;
  filesRejected: number;
  setsDispatched: number;
  setsDone: number;
  setsFailed: number;
  setsPartial: number;
  /** Sets whose outcome could not be committed and was let go (held commits at drain()): they stay queued and run again at the next start. */
  setsNotCommitted: number;
}

/** Told after each set is committed: its result path, or undefined when the set failed. */
export type CommittedListener = (setId: string, resultPath: string | undefined) => void;

export class RunReport {
  private readonly mutableCounts: CoordinatorCounts = {
    filesAccepted: 0,
    filesRejected: 0,
    setsDispatched: 0,
    setsDone: 0,
    setsFailed: 0,
    setsPartial: 0,
    setsNotCommitted: 0,
  };
  private readonly listeners: CommittedListener[] = [];

  /** The counters so far (read-only to callers; the parts add through the methods below). */
  get counts(): Readonly<CoordinatorCounts> {
    return this.mutableCounts;
  }

  /** Registers a listener called after each set is committed or failed. */
  onCommitted(listener: CommittedListener): void {
    this.listeners.push(listener);
  }

  /** Counts files taken in (accepted into sets) and files rejected at intake. */
  filesTaken(accepted: number, rejected: number): void {
    this.mutableCounts.filesAccepted += accepted;
    this.mutableCounts.filesRejected += rejected;
  }

  /** Moves `files` accepted at intake to rejected (the worker's readers could not read them). */
  filesRejectedLater(files: number): void {
    this.mutableCounts.filesRejected += files;
    this.mutableCounts.filesAccepted -= files;
  }

  /** Counts a set handed to the job queue. */
  setDispatched(): void {
    this.mutableCounts.setsDispatched += 1;
  }

  /** Counts a set committed done (and partial) and tells the listeners its result path. */
  setDone(setId: string, resultPath: string, partial: boolean): void {
    this.mutableCounts.setsDone += 1;
    if (partial) this.mutableCounts.setsPartial += 1;
    this.notify(setId, resultPath);
  }

  /** Counts a set that failed and tells the listeners (no result path). */
  setFailed(setId: string): void {
    this.mutableCounts.setsFailed += 1;
    this.notify(setId, undefined);
  }

  /** Counts an outcome whose commit was let go (its set stays queued for the next start). */
  setNotCommitted(): void {
    this.mutableCounts.setsNotCommitted += 1;
  }

  private notify(setId: string, resultPath: string | undefined): void {
    for (const listener of this.listeners) listener(setId, resultPath);
  }
}

/** Logs file moves that failed after a set was recorded done or failed (error undefined: none failed). */
export function logMovesFailed(log: Logger, error: unknown): void {
  if (error === undefined) return;
  log.error(
    { err: error },
    'set recorded, but moving its inputs out of the inbox failed; they are moved by the next repair (watch: every watch.rescanIntervalMs; process: its next run)',
  );
}
