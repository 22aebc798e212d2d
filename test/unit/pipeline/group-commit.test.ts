// GroupCommit: outcomes finishing together are committed as one batch; a failed job is recorded
// failed; a commit that fails with an environment error is held (detached queue) and let go while
// draining, or rejected to the queue (persistent queue). A recording scheduler replaces the retry
// timers; a real ledger.
import { pino } from 'pino';
import { afterEach, describe, expect, it } from 'vitest';
import type { AnalysisOutput } from '../../../src/analysis/payload.js';
import { resolveConfig } from '../../../src/config/resolve.js';
import type { Scheduler } from '../../../src/pipeline/commit-retry.js';
import { GroupCommit, setIdOfJob } from '../../../src/pipeline/group-commit.js';
import { RunReport } from '../../../src/pipeline/run-report.js';
import type { JobOutcome } from '../../../src/queue/job-queue.js';
import { openLedger, type Ledger } from '../../../src/store/ledger.js';
import { getSet, insertSet } from '../../../src/store/sets.js';
import { tempDir } from '../../helpers/temp-dir.js';

const ledgers: Ledger[] = [];
afterEach(() => {
  for (const ledger of ledgers.splice(0)) ledger.close();
});

const failedOutcome = (id: string): JobOutcome<AnalysisOutput> => ({
  id,
  status: 'failed',
  failure: { code: 'FIT_DIVERGED', message: 'no fit converged', permanent: true },
  attempts: 1,
});

/** A ledger whose every statement fails with SQLITE_BUSY (a database error that may pass). */
function busyLedger(ledger: Ledger): Ledger {
  return {
    ...ledger,
    prepare: () => {
      throw Object.assign(new Error('database is locked'), { code: 'SQLITE_BUSY' });
    },
  };
}

function setup(options: { detached: boolean; busy?: boolean }): {
  commits: GroupCommit;
  ledger: Ledger;
  report: RunReport;
  released: string[];
  batches: () => number;
  scheduled: number[];
} {
  const dir = tempDir('dl-group-commit-');
  const config = resolveConfig({ logging: { level: 'silent', stdout: 'off' } }, { baseDir: dir });
  const ledger = openLedger(config.folders.state);
  ledgers.push(ledger);
  const report = new RunReport();
  const released: string[] = [];
  let batches = 0;
  const scheduled: number[] = [];
  const schedule: Scheduler = (_run, delayMs) => {
    scheduled.push(delayMs);
    return () => undefined;
  };
  const commits = new GroupCommit({
    config,
    ledger: options.busy === true ? busyLedger(ledger) : ledger,
    logger: pino({ level: 'silent' }),
    clock: () => new Date('2026-03-14T12:00:00Z'),
    stages: [],
    report,
    detached: options.detached,
    inFlight: () => 0,
    release: (id) => released.push(id),
    afterBatch: async () => {
      batches += 1;
    },
    schedule,
  });
  return { commits, ledger, report, released, batches: () => batches, scheduled };
}

const settle = (): Promise<void> =>
  new Promise((resolve) => setTimeout(resolve, 0)).then(() => new Promise((resolve) => setImmediate(resolve)));

describe('GroupCommit', () => {
  it('reads the set id out of a job id', () => {
    expect(setIdOfJob('abc-123')).toBe('abc-123');
    expect(setIdOfJob('abc-123~r1700000000')).toBe('abc-123');
  });

  it('commits outcomes that arrive together as one batch and records a failed job as a failed set', async () => {
    const { commits, ledger, report, released, batches } = setup({ detached: false });
    const now = new Date('2026-03-14T11:00:00Z');
    for (const id of ['gc-a', 'gc-b'])
      insertSet(ledger, { id, sampleId: id, role: 'sample', source: 'pattern', createdAt: now, deadlineAt: now });
    const told: [string, string | undefined][] = [];
    report.onCommitted((setId, path) => told.push([setId, path]));
    await Promise.all([
      commits.take(failedOutcome('gc-a')),
      commits.take(failedOutcome('gc-b')),
      commits.take(failedOutcome('gc-unknown')),
    ]);
    await settle();
    expect(batches()).toBe(1);
    expect(released.sort()).toEqual(['gc-a', 'gc-b', 'gc-unknown']);
    expect(getSet(ledger, 'gc-a')?.state).toBe('failed');
    expect(getSet(ledger, 'gc-a')?.errorCode).toBe('FIT_DIVERGED');
    expect(report.counts.setsFailed).toBe(2); // the unknown set's outcome is a redelivery: ignored
    expect(told.map(([id]) => id).sort()).toEqual(['gc-a', 'gc-b']);
    expect(commits.running).toBe(false);
  });

  it('on a persistent queue, rejects the outcome of a commit that fails, so the queue retries the job', async () => {
    const { commits, released } = setup({ detached: false, busy: true });
    await expect(commits.take(failedOutcome('gc-busy'))).rejects.toMatchObject({ code: 'SQLITE_BUSY' });
    await settle();
    expect(released).toEqual(['gc-busy']);
    expect(commits.heldCount).toBe(0);
  });

  it('detached, holds a commit that fails (keeping its slot) and lets it go when draining', async () => {
    const { commits, released, report, scheduled } = setup({ detached: true, busy: true });
    await commits.take(failedOutcome('gc-held'));
    await settle();
    expect(commits.heldCount).toBe(1);
    expect(scheduled).toEqual([1000]);
    expect(released).toEqual([]);
    commits.beginLettingGo();
    await settle();
    commits.endLettingGo();
    expect(commits.heldCount).toBe(0);
    expect(released).toEqual(['gc-held']);
    expect(report.counts.setsNotCommitted).toBe(1);
  });
});
