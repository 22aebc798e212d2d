// The worker-thread pool shared by the queue backends: one payload per task, or several as one batch.
import { afterEach, describe, expect, it } from 'vitest';
import { createTaskPool, type TaskPool } from '../../../src/queue/task-pool.js';
import { COMPUTE_PROCESSOR } from './contract.js';

const CRASH_PROCESSOR = new URL('../../fixtures/queue/crash.mjs', import.meta.url);

describe('createTaskPool', () => {
  let pools: TaskPool[] = [];
  const make = (processor: URL, jobTimeoutMs = 10_000): TaskPool => {
    const pool = createTaskPool({ processorHref: processor.href, concurrency: 1, jobTimeoutMs });
    pools.push(pool);
    return pool;
  };
  afterEach(async () => {
    await Promise.all(pools.map((pool) => pool.destroy()));
    pools = [];
  });

  it('runs a batch in order and gives each payload its own result, failures included', async () => {
    const pool = make(COMPUTE_PROCESSOR);
    const results = await pool.runBatch([
      { id: 'a', n: 2 },
      { id: 'b', n: 3, fail: 'permanent-code' },
      { id: 'c', n: 4 },
    ]);
    expect(results).toHaveLength(3);
    expect(results?.[0]).toEqual({ ok: true, value: { n: 2, square: 4, work: 0 } });
    expect(results?.[1]).toMatchObject({
      ok: false,
      failure: { code: 'NON_NUMERIC', permanent: true, hint: 'fixture hint' },
    });
    expect(results?.[2]).toEqual({ ok: true, value: { n: 4, square: 16, work: 0 } });
    // A single payload still goes as itself (the processor never sees the batch envelope).
    expect(await pool.run({ id: 'd', n: 5 })).toEqual({ ok: true, value: { n: 5, square: 25, work: 0 } });
  });

  it('answers undefined for a batch stopped as a whole: over the sum of its time limits, or its thread died', async () => {
    const slow = make(COMPUTE_PROCESSOR, 200);
    // Two payloads: 400 ms in all; the second spins for 3 s.
    expect(
      await slow.runBatch([
        { id: 'quick', n: 1 },
        { id: 'spin', n: 2, spinMs: 3_000 },
      ]),
    ).toBeUndefined();
    const crashing = make(CRASH_PROCESSOR);
    expect(
      await crashing.runBatch([
        { id: 'x', n: 1 },
        { id: 'y', n: 2 },
      ]),
    ).toBeUndefined();
  });
});
