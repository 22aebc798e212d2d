// A commit that fails for a reason outside the set (results folder not writable, a full disk) must
// not leave the set queued until the next start: the in-process coordinator keeps the outcome and
// commits it again (after 1 s, doubling); file moves that fail after the commit are finished by
// repairMoves(); drain() lets held commits go so a lasting outage cannot keep `watch` from stopping.
// Folders are "blocked" by putting a regular file where the folder belongs (works as root too).
import { existsSync, mkdirSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { pino } from 'pino';
import { afterEach, describe, expect, it } from 'vitest';
import { resolveConfig } from '../../../src/config/resolve.js';
import type { AnalysisJobPayload, AnalysisOutput } from '../../../src/analysis/payload.js';
import { Coordinator, isEnvironmentError } from '../../../src/pipeline/coordinator.js';
import type { JobOutcome, JobQueue } from '../../../src/queue/job-queue.js';
import { openLedger } from '../../../src/store/ledger.js';
import { openPipeline, type Pipeline } from '../../../src/pipeline/runtime.js';
import type { ResultStage } from '../../../src/pipeline/result-stage.js';
import { generateSet } from '../../integration/pipeline-helpers.js';
import { blockFolder, unblockFolder } from '../../helpers/blocked-folder.js';
import { tempDir } from '../../helpers/temp-dir.js';

const opened: Pipeline[] = [];
afterEach(async () => {
  for (const pipeline of opened.splice(0)) await pipeline.close();
});

const sleep = (ms: number): Promise<void> => new Promise((r) => setTimeout(r, ms));

async function waitUntil(what: string, condition: () => boolean, timeoutMs = 10_000): Promise<void> {
  const start = Date.now();
  while (!condition()) {
    if (Date.now() - start > timeoutMs) throw new Error(`timed out waiting for ${what}`);
    await sleep(25);
  }
}

function setup(
  name: string,
  stages?: ResultStage[],
): { pipeline: Pipeline; inbox: string; dir: string; paths: string[]; setState: () => string | undefined } {
  const dir = tempDir(`dl-commit-retry-${name}-`);
  const config = resolveConfig(
    { assembly: { setTimeoutMs: 600_000 }, queue: { concurrency: 1 }, logging: { level: 'silent', stdout: 'off' } },
    { baseDir: dir },
  );
  const pipeline = openPipeline(config, {
    softwareVersion: 'test',
    logger: pino({ level: 'silent' }),
    ...(stages === undefined ? {} : { stages }),
  });
  opened.push(pipeline);
  const inbox = config.folders.inbox;
  mkdirSync(inbox, { recursive: true });
  const set = generateSet(`retry-${name}`, 31);
  const paths = set.files.map((f) => {
    const path = join(inbox, f.name);
    writeFileSync(path, f.content);
    return path;
  });
  const setState = (): string | undefined =>
    (pipeline.ledger.database.prepare(`SELECT state FROM sets LIMIT 1`).get() as { state: string } | undefined)?.state;
  return { pipeline, inbox, dir, paths, setState };
}

describe('commits that fail for reasons outside the set', () => {
  it('classifies system and SQLite error codes as environment errors, other errors not', () => {
    expect(isEnvironmentError(Object.assign(new Error('no space'), { code: 'ENOSPC' }))).toBe(true);
    expect(isEnvironmentError(Object.assign(new Error('not a dir'), { code: 'ENOTDIR' }))).toBe(true);
    expect(isEnvironmentError(Object.assign(new Error('full'), { code: 'SQLITE_FULL' }))).toBe(true);
    expect(isEnvironmentError(new TypeError('x is undefined'))).toBe(false);
    expect(isEnvironmentError(Object.assign(new Error('bad'), { code: 'NON_NUMERIC' }))).toBe(false);
  });

  it('holds a commit whose results folder is not writable and commits it once the folder is back, without a restart', async () => {
    const { pipeline, dir, paths, setState } = setup('results');
    blockFolder(join(dir, 'results'));
    let resultPath: string | undefined;
    pipeline.coordinator.onCommitted((_id, path) => {
      resultPath = path;
    });
    expect(await pipeline.coordinator.intakeMany(paths)).toEqual([]);
    await pipeline.coordinator.tick(true);
    await waitUntil('the first commit to fail and be held', () => pipeline.coordinator.heldCommitCount === 1);
    expect(setState()).toBe('queued');
    expect(paths.every((p) => existsSync(p))).toBe(true);
    expect(pipeline.coordinator.pendingJobs).toBe(1); // the held outcome keeps its slot
    unblockFolder(join(dir, 'results'));
    await waitUntil('the retried commit', () => resultPath !== undefined);
    expect(existsSync(resultPath ?? '')).toBe(true);
    expect(setState()).toBe('done');
    expect(pipeline.coordinator.heldCommitCount).toBe(0);
    expect(pipeline.coordinator.pendingJobs).toBe(0);
    expect(paths.some((p) => existsSync(p))).toBe(false);
    const archived = readdirSync(join(dir, 'archive'), { recursive: true })
      .map(String)
      .filter((p) => p.endsWith('.csv'));
    expect(archived).toHaveLength(paths.length);
  }, 20_000);

  it('keeps a set done when its inputs cannot be archived, and repairMoves() archives them later', async () => {
    const { pipeline, dir, paths, setState } = setup('archive');
    blockFolder(join(dir, 'archive'));
    let resultPath: string | undefined;
    pipeline.coordinator.onCommitted((_id, path) => {
      resultPath = path;
    });
    await pipeline.coordinator.intakeMany(paths);
    await pipeline.coordinator.tick(true);
    await pipeline.coordinator.drain();
    expect(resultPath).toBeDefined();
    expect(setState()).toBe('done');
    expect(paths.every((p) => existsSync(p))).toBe(true);
    expect(pipeline.coordinator.repairMoves()).toMatchObject({ moved: 0, relocated: 0, failed: paths.length }); // still blocked: tried, nothing moved
    unblockFolder(join(dir, 'archive'));
    expect(pipeline.coordinator.repairMoves().moved).toBe(paths.length);
    expect(paths.some((p) => existsSync(p))).toBe(false);
    const unplaced = pipeline.ledger.database
      .prepare(`SELECT COUNT(*) AS n FROM files WHERE archive_path IS NULL`)
      .get() as { n: number };
    expect(unplaced.n).toBe(0);
  }, 20_000);

  it('records a failed set even when its files cannot be quarantined, and repairMoves() quarantines them later', async () => {
    // A queue whose every job fails permanently (as a fit that cannot converge would).
    const dir = tempDir('dl-commit-retry-quarantine-');
    const config = resolveConfig(
      { assembly: { setTimeoutMs: 600_000 }, logging: { level: 'silent', stdout: 'off' } },
      { baseDir: dir },
    );
    const ledger = openLedger(config.folders.state);
    let deliver: ((outcome: JobOutcome<AnalysisOutput>) => void | Promise<void>) | undefined;
    const queue: JobQueue<AnalysisJobPayload, AnalysisOutput> = {
      enqueue: async (id) => {
        setImmediate(
          () =>
            void deliver?.({
              id,
              status: 'failed',
              failure: { code: 'FIT_DIVERGED', message: 'no fit converged', permanent: true },
              attempts: 1,
            }),
        );
      },
      onOutcome: (listener) => {
        deliver = listener;
      },
      stats: async () => ({ waiting: 0, active: 0, completed: 0, failed: 0 }),
      drain: async () => undefined,
      close: async () => undefined,
    };
    const coordinator = new Coordinator({
      config,
      ledger,
      queue,
      logger: pino({ level: 'silent' }),
      softwareVersion: 'test',
      stages: [],
    });
    try {
      mkdirSync(config.folders.inbox, { recursive: true });
      const paths = generateSet('retry-quarantine', 33).files.map((f) => {
        const path = join(config.folders.inbox, f.name);
        writeFileSync(path, f.content);
        return path;
      });
      blockFolder(join(dir, 'quarantine'));
      await coordinator.intakeMany(paths);
      await coordinator.tick(true);
      await coordinator.drain();
      expect((ledger.database.prepare(`SELECT state FROM sets`).get() as { state: string }).state).toBe('failed');
      expect(coordinator.counts.setsFailed).toBe(1);
      expect(paths.every((p) => existsSync(p))).toBe(true);
      unblockFolder(join(dir, 'quarantine'));
      const repaired = coordinator.repairMoves();
      expect(repaired.moved).toBe(paths.length);
      expect(paths.some((p) => existsSync(p))).toBe(false);
      const quarantined = readdirSync(join(dir, 'quarantine'), { recursive: true }).map(String);
      expect(quarantined.filter((p) => p.endsWith('.csv'))).toHaveLength(paths.length);
      expect(quarantined.filter((p) => p.endsWith('.error.json'))).toHaveLength(paths.length);
    } finally {
      ledger.close();
    }
  }, 20_000);

  it('drain() lets a held commit go: the set stays queued for the next start and nothing hangs', async () => {
    const { pipeline, dir, paths, setState } = setup('drain');
    blockFolder(join(dir, 'results'));
    await pipeline.coordinator.intakeMany(paths);
    await pipeline.coordinator.tick(true);
    await waitUntil('the held commit', () => pipeline.coordinator.heldCommitCount === 1);
    await pipeline.coordinator.drain();
    expect(pipeline.coordinator.heldCommitCount).toBe(0);
    expect(pipeline.coordinator.pendingJobs).toBe(0);
    expect(setState()).toBe('queued');
    expect(pipeline.coordinator.counts.setsNotCommitted).toBe(1);
    expect(paths.every((p) => existsSync(p))).toBe(true);
  }, 20_000);

  it('lets go of an outcome after 3 failures when the error is not an I/O or database error', async () => {
    let calls = 0;
    const failing: ResultStage = {
      name: 'always-fails',
      apply: () => {
        calls += 1;
        throw new TypeError('a bug in a result stage');
      },
    };
    const { pipeline, setState, paths } = setup('bug', [failing]);
    await pipeline.coordinator.intakeMany(paths);
    await pipeline.coordinator.tick(true);
    // Failures at 0 s, 1 s and 3 s (waits of 1 s, then 2 s); the third lets it go.
    await waitUntil('three attempts', () => calls === 3 && pipeline.coordinator.pendingJobs === 0, 15_000);
    expect(pipeline.coordinator.heldCommitCount).toBe(0);
    await sleep(300);
    expect(calls).toBe(3);
    expect(setState()).toBe('queued');
  }, 20_000);
});

describe('`process` when a result cannot be written', () => {
  it('reports the set as not committed (exit 3 in the CLI), keeps its files, and the next run commits it', async () => {
    const { runBatch } = await import('../../../src/cli/process.js');
    const { dayFolderName } = await import('../../../src/output/dated-path.js');
    const { Writable } = await import('node:stream');
    const dir = tempDir('dl-commit-retry-cli-');
    writeFileSync(join(dir, 'driftlight.yaml'), 'logging: { stdout: "off" }\nqueue: { concurrency: 1 }\n');
    mkdirSync(join(dir, 'inbox'));
    const set = generateSet('retry-cli', 32);
    for (const f of set.files) writeFileSync(join(dir, 'inbox', f.name), f.content);
    // A file in place of the day folder the result goes to: the set's acquisition day (results are filed by acquisition date).
    const days = [dayFolderName(new Date('2026-03-14T09:55:00Z'))];
    mkdirSync(join(dir, 'results'));
    for (const day of days) writeFileSync(join(dir, 'results', day), 'a file where a folder belongs');
    let printed = '';
    const out = new Writable({
      write(chunk: Buffer, _enc, done) {
        printed += chunk.toString();
        done();
      },
    });
    const first = await runBatch([join(dir, 'inbox')], { config: join(dir, 'driftlight.yaml') }, out);
    expect(first).toMatchObject({ sets: 1, done: 0, failed: 0, notCommitted: 1 });
    expect(printed).toContain('not committed: 1 set(s)');
    expect(set.files.every((f) => existsSync(join(dir, 'inbox', f.name)))).toBe(true);
    for (const day of days) rmSync(join(dir, 'results', day));
    const second = await runBatch([join(dir, 'inbox')], { config: join(dir, 'driftlight.yaml') }, out);
    expect(second).toMatchObject({ sets: 1, done: 1, failed: 0, notCommitted: 0 });
    expect(set.files.some((f) => existsSync(join(dir, 'inbox', f.name)))).toBe(false);
  }, 30_000);
});
