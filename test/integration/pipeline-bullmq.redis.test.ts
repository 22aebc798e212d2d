// The pipeline scaled out on BullMQ, end to end with real processes and real Redis: a pure
// coordinator (`driftlight watch --redis URL`, queue.runWorker: false) plus `driftlight worker`
// processes. 40 small sets with a worker SIGKILLed mid-run give each set exactly one result and
// every input archived; SIGTERM on a coordinator with a backlog returns without waiting for it, and
// the next start finishes the backlog.
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import Database from 'better-sqlite3';
import { afterAll, afterEach, beforeEach, expect, it } from 'vitest';
import { CLI_PATH } from '../helpers/cli.js';
import { cleanupQueue, describeRedis, randomPrefix, REDIS_URL } from '../helpers/redis.js';
import {
  dropSet,
  generateSet,
  listFiles,
  makeWorkspace,
  readResults,
  removeWorkspaces,
  stopWatch,
  waitFor,
} from './pipeline-helpers.js';
import { spawnWorker, type WorkerProcess } from './queue-processes.js';

const QUEUE_NAME = 'analyze';
/** The compiled analysis processor the workers run (`npm run build` first). */
const ANALYZE_PROCESSOR_PATH = fileURLToPath(new URL('../../dist/workers/analyze-job.js', import.meta.url));
const sleep = (ms: number): Promise<void> => new Promise((r) => setTimeout(r, ms));

/** A workspace whose config makes `watch` a pure BullMQ coordinator on `prefix`. */
function makeCoordinatorWorkspace(prefix: string): string {
  const dir = makeWorkspace();
  writeFileSync(
    join(dir, 'driftlight.yaml'),
    [
      'watch: { stabilityWindowMs: 150, pollIntervalMs: 50 }',
      'assembly: { setTimeoutMs: 60000 }',
      `queue: { runWorker: false, prefix: ${prefix}, queueName: ${QUEUE_NAME}, concurrency: 2, backoffMs: 50, outcomeSweepMs: 500 }`,
      'logging: { level: info, stdout: off }',
      '',
    ].join('\n'),
  );
  return dir;
}

/** Counts of sets and files by state, from `driftlight status --json`. */
function ledgerStatus(dir: string): { sets: Record<string, number>; files: Record<string, number> } {
  const status = spawnSync(process.execPath, [CLI_PATH, 'status', '--json', '--config', join(dir, 'driftlight.yaml')], {
    encoding: 'utf8',
  });
  expect(status.status, status.stderr).toBe(0);
  return JSON.parse(status.stdout) as { sets: Record<string, number>; files: Record<string, number> };
}

/** The ledger's sets (sample id, state) and result rows, read directly after every process stopped. */
function ledgerRows(dir: string): { sets: { sample_id: string; state: string }[]; resultSetIds: string[] } {
  const db = new Database(join(dir, 'state', 'ledger.sqlite'), { readonly: true });
  try {
    const sets = db.prepare('SELECT sample_id, state FROM sets ORDER BY sample_id').all() as {
      sample_id: string;
      state: string;
    }[];
    const resultSetIds = (db.prepare('SELECT set_id FROM results').all() as { set_id: string }[]).map(
      (row) => row.set_id,
    );
    return { sets, resultSetIds };
  } finally {
    db.close();
  }
}

/** Log lines of the coordinator's log file with `msg`. */
function logCount(dir: string, msg: string): number {
  try {
    return readFileSync(join(dir, 'state', 'driftlight.log'), 'utf8')
      .split('\n')
      .filter((line) => line.includes(`"msg":"${msg}"`)).length;
  } catch {
    return 0;
  }
}

/** Jobs a worker has started and not yet finished (completed or failed), by its log lines. */
function jobsInHand(worker: WorkerProcess): string[] {
  const finished = new Set(
    worker.lines.filter((l) => l.event === 'job.completed' || l.event === 'job.failed').map((l) => l.jobId),
  );
  return worker.lines
    .filter((l) => l.event === 'job.started' && l.jobId !== undefined && !finished.has(l.jobId))
    .map((l) => l.jobId ?? '');
}

/** Checks that every set in `sampleIds` has exactly one complete result, archived inputs, and one `done` ledger row. */
function expectEachSetDoneOnce(dir: string, sampleIds: readonly string[], filesPerSet: number): void {
  const results = readResults(dir);
  expect(results.map((r) => r.result.sampleId).sort()).toEqual([...sampleIds].sort());
  expect(results.every((r) => !r.result.partial)).toBe(true);
  expect(listFiles(join(dir, 'inbox'))).toEqual([]);
  expect(listFiles(join(dir, 'quarantine'))).toEqual([]);
  const archived = listFiles(join(dir, 'archive')).map((p) => p.split('/').pop());
  expect(archived).toHaveLength(sampleIds.length * filesPerSet);
  expect(new Set(archived).size).toBe(sampleIds.length * filesPerSet);
  const status = ledgerStatus(dir);
  expect(status.sets).toEqual({ open: 0, queued: 0, done: sampleIds.length, failed: 0 });
  expect(status.files['done']).toBe(sampleIds.length * filesPerSet);
  const rows = ledgerRows(dir);
  expect(rows.sets.map((s) => s.sample_id)).toEqual([...sampleIds].sort());
  expect(rows.sets.every((s) => s.state === 'done')).toBe(true);
  expect(rows.resultSetIds.sort()).toEqual(results.map((r) => r.result.setId).sort());
}

describeRedis('the pipeline on BullMQ: a pure coordinator and worker processes', () => {
  let prefix = '';
  let workers: WorkerProcess[] = [];
  let coordinators: ChildProcess[] = [];

  const startWorker = (): WorkerProcess => {
    const worker = spawnWorker({
      redisUrl: REDIS_URL,
      prefix,
      queue: QUEUE_NAME,
      concurrency: 1,
      processor: ANALYZE_PROCESSOR_PATH,
    });
    workers.push(worker);
    return worker;
  };
  const startCoordinator = (dir: string): { child: ChildProcess; stderr: () => string } => {
    const child = spawn(
      process.execPath,
      [CLI_PATH, 'watch', '--redis', REDIS_URL, '--config', join(dir, 'driftlight.yaml')],
      { cwd: dir, stdio: ['ignore', 'pipe', 'pipe'] },
    );
    coordinators.push(child);
    let stderr = '';
    child.stderr?.setEncoding('utf8').on('data', (chunk: string) => {
      stderr += chunk;
    });
    return { child, stderr: () => stderr };
  };

  beforeEach(() => {
    prefix = randomPrefix();
  });
  afterEach(async () => {
    for (const child of coordinators) if (child.exitCode === null && child.signalCode === null) child.kill('SIGKILL');
    await Promise.all(workers.map((w) => w.stop('SIGKILL')));
    workers = [];
    coordinators = [];
    await cleanupQueue(prefix, QUEUE_NAME);
  });

  it('40 sets through 2 workers, one SIGKILLed mid-run: each set once, every input archived, clean SIGTERM', async () => {
    const dir = makeCoordinatorWorkspace(prefix);
    const inbox = join(dir, 'inbox');
    const sets = Array.from({ length: 40 }, (_u, i) => generateSet(`scale-${String(i).padStart(2, '0')}`, 500 + i));
    const [victim, survivor] = [startWorker(), startWorker()];
    for (const w of [victim, survivor]) await w.waitForLine((line) => line.event === 'worker.started', 15_000, 'start');
    const coordinator = startCoordinator(dir);
    // Sets keep arriving (5 every 200 ms) while the test waits for the kill moment, so the run is
    // still in progress then; jobs take milliseconds, hence the 10 ms polling of the victim's log.
    let dropped = 0;
    const dropping = (async () => {
      for (let i = 0; i < sets.length; i += 5) {
        for (const set of sets.slice(i, i + 5)) dropSet(inbox, set);
        dropped = Math.min(sets.length, i + 5);
        await sleep(200);
      }
    })();

    // Kill a worker while it holds a job and the backlog is still being worked on.
    let killedInHand: string[] = [];
    await waitFor(
      'the victim worker busy mid-run',
      () => {
        killedInHand = jobsInHand(victim);
        return killedInHand.length > 0 && readResults(dir).length >= 5;
      },
      30_000,
      10,
    );
    expect(await victim.stop('SIGKILL')).toBe('SIGKILL');
    expect(readResults(dir).length).toBeLessThan(sets.length);
    await dropping;
    expect(dropped).toBe(sets.length);

    await waitFor(
      '40 results and an empty inbox',
      () => readResults(dir).length >= sets.length && listFiles(inbox).length === 0,
      45_000,
    );
    await sleep(300); // a duplicate commit, were there one, would land now
    expect(await stopWatch(coordinator.child)).toBe(0);
    expect(coordinator.stderr()).toBe('');
    expect(await survivor.stop('SIGTERM')).toBe(0);
    expect(survivor.lines.at(-1)).toMatchObject({ event: 'worker.stopped' });

    expectEachSetDoneOnce(
      dir,
      sets.map((s) => s.sampleId),
      3,
    );
    // The job the killed worker held was run again by the survivor and committed once.
    const results = readResults(dir);
    for (const jobId of killedInHand) expect(results.filter((r) => r.result.setId === jobId)).toHaveLength(1);
    expect(survivor.lines.filter((l) => l.event === 'job.completed').length).toBeGreaterThan(0);
  }, 90_000);

  it('SIGTERM with a backlog in Redis exits without waiting for it; the next start finishes it', async () => {
    const dir = makeCoordinatorWorkspace(prefix);
    const inbox = join(dir, 'inbox');
    const sets = Array.from({ length: 8 }, (_u, i) => generateSet(`backlog-${i}`, 900 + i));
    const first = startCoordinator(dir);
    for (const set of sets) dropSet(inbox, set);
    await waitFor('8 sets queued in Redis', () => logCount(dir, 'set dispatched') >= sets.length, 20_000);

    // No worker runs: a drain that waited for the backlog would never end (the test would reach its
    // limit), so a clean exit with every set still queued shows the bullmq coordinator did not wait.
    expect(await stopWatch(first.child)).toBe(0);
    expect(first.stderr()).toBe('');
    expect(readResults(dir)).toHaveLength(0);
    expect(ledgerStatus(dir).sets).toMatchObject({ queued: sets.length, done: 0 });

    // Jobs persisted in Redis: a worker runs them while no coordinator listens; the next start commits them.
    const worker = startWorker();
    await worker.waitForLine((line) => line.event === 'job.completed', 20_000, 'a job run with no coordinator up');
    const second = startCoordinator(dir);
    await waitFor(
      '8 results after the restart',
      () => readResults(dir).length >= sets.length && listFiles(inbox).length === 0,
      30_000,
    );
    await sleep(300);
    expect(await stopWatch(second.child)).toBe(0);
    expect(second.stderr()).toBe('');
    expect(await worker.stop('SIGTERM')).toBe(0);
    expectEachSetDoneOnce(
      dir,
      sets.map((s) => s.sampleId),
      3,
    );
    const completedJobs = worker.lines.filter((l) => l.event === 'job.completed').map((l) => l.jobId);
    expect(new Set(completedJobs).size).toBe(completedJobs.length); // each job ran once
  }, 60_000);
});

afterAll(() => removeWorkspaces());
