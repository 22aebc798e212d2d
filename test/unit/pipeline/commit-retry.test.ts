// Held commits: backoff, the failure limit for errors that are not environment errors, letting go
// during drain. A recording scheduler stands in for timers (no timed tests). The schedule (1 s,
// doubling, at most 60 s; 3 failures for other errors) is the project's own choice, documented in
// src/pipeline/commit-retry.ts.
import { describe, expect, it } from 'vitest';
import {
  commitRetryDelayMs,
  HeldCommits,
  isEnvironmentError,
  type Scheduler,
} from '../../../src/pipeline/commit-retry.js';

function recordingScheduler(): {
  schedule: Scheduler;
  calls: { run: () => void; delayMs: number; cancelled: boolean }[];
} {
  const calls: { run: () => void; delayMs: number; cancelled: boolean }[] = [];
  const schedule: Scheduler = (run, delayMs) => {
    const call = { run, delayMs, cancelled: false };
    calls.push(call);
    return () => {
      call.cancelled = true;
    };
  };
  return { schedule, calls };
}

const enospc = Object.assign(new Error('no space left on device'), { code: 'ENOSPC' });

describe('commit retry', () => {
  it('treats errno and SQLite codes as environment errors, other errors not', () => {
    expect(isEnvironmentError(Object.assign(new Error('x'), { code: 'EACCES' }))).toBe(true);
    expect(isEnvironmentError(Object.assign(new Error('x'), { code: 'SQLITE_BUSY' }))).toBe(true);
    expect(isEnvironmentError(null)).toBe(false);
    expect(isEnvironmentError({ code: 42 })).toBe(false);
  });

  it('waits 1 s, doubling per failure, at most 60 s', () => {
    expect([1, 2, 3, 4, 5, 6, 7, 8].map(commitRetryDelayMs)).toEqual([
      1000, 2000, 4000, 8000, 16_000, 32_000, 60_000, 60_000,
    ]);
  });

  it('holds an outcome that failed with an environment error and retries it when its timer fires', () => {
    const { schedule, calls } = recordingScheduler();
    const retried: string[] = [];
    const held = new HeldCommits<{ id: string }>((o) => retried.push(o.id), schedule);
    expect(held.fail({ id: 'j1' }, enospc, false)).toEqual({ kind: 'held', failures: 1, retryInMs: 1000 });
    expect(held.size).toBe(1);
    calls[0]?.run();
    expect(retried).toEqual(['j1']);
    calls[0]?.run(); // a second fire does nothing: the retry has started
    expect(retried).toEqual(['j1']);
    expect(held.fail({ id: 'j1' }, enospc, false)).toEqual({ kind: 'held', failures: 2, retryInMs: 2000 });
    held.committed('j1');
    expect(held.has('j1')).toBe(false);
  });

  it('lets an outcome go at the third failure of an error that is not an environment error', () => {
    const held = new HeldCommits<{ id: string }>(() => undefined, recordingScheduler().schedule);
    const bug = new TypeError('x is undefined');
    expect(held.fail({ id: 'j' }, bug, false).kind).toBe('held');
    expect(held.fail({ id: 'j' }, bug, false).kind).toBe('held');
    expect(held.fail({ id: 'j' }, bug, false)).toEqual({ kind: 'let-go', failures: 3 });
    expect(held.size).toBe(0);
  });

  it('lets go at once while letting go (drain), and retryAll() cancels pending timers and retries now', () => {
    const { schedule, calls } = recordingScheduler();
    const retried: string[] = [];
    const held = new HeldCommits<{ id: string }>((o) => retried.push(o.id), schedule);
    held.fail({ id: 'a' }, enospc, false);
    held.fail({ id: 'b' }, enospc, false);
    held.retryAll();
    expect(retried).toEqual(['a', 'b']);
    expect(calls.map((c) => c.cancelled)).toEqual([true, true]);
    expect(held.fail({ id: 'a' }, enospc, true)).toEqual({ kind: 'let-go', failures: 2 });
    expect(held.size).toBe(1);
  });
});
