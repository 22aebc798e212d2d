// Issue 20 item 3, paused writers: a writer holds the decay file open, writes the first part, pauses
// longer than the stability window (driftlight analyses the first part, commits its result and moves
// the file to the archive: on one file system the writer's handle follows the file there), then
// writes the rest. Whether `watch` kept running or was killed with SIGKILL during the pause, and
// however long it was down, the sample ends with exactly one result, computed from the whole file,
// whose provenance lists the first part as the superseded version; the ledger and the archive agree
// on the whole file's sha256. The order of events is forced (each step waits for the ledger), so
// the outcome does not depend on the machine's speed.
import { closeSync, openSync, readFileSync, writeFileSync, writeSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { afterEach, describe, expect, it } from 'vitest';
import type { ChildProcess } from 'node:child_process';
import { archiveRecheckMs } from '../../src/pipeline/input-versions.js';
import {
  generateSet,
  listFiles,
  makeWorkspace,
  readResults,
  removeWorkspaces,
  startWatch,
  stopWatch,
  waitFor,
} from './pipeline-helpers.js';

const sha256 = (text: string): string => createHash('sha256').update(text).digest('hex');
const sleep = (ms: number): Promise<void> => new Promise((r) => setTimeout(r, ms));
const WINDOW_MS = 200;

let child: ChildProcess | undefined;
let fd: number | undefined;
afterEach(async () => {
  if (fd !== undefined) closeSync(fd);
  fd = undefined;
  if (child !== undefined) await stopWatch(child);
  child = undefined;
  removeWorkspaces();
});

function ledgerRows(dir: string, sql: string, ...params: unknown[]): Record<string, unknown>[] {
  const db = new Database(join(dir, 'state', 'ledger.sqlite'), { readonly: true });
  try {
    return db.prepare(sql).all(...params) as Record<string, unknown>[];
  } finally {
    db.close();
  }
}

const watchingLines = (dir: string): number => {
  try {
    return readFileSync(join(dir, 'state', 'driftlight.log'), 'utf8').split('"msg":"watching"').length - 1;
  } catch {
    return 0;
  }
};

async function startedWatch(dir: string): Promise<ChildProcess> {
  const before = watchingLines(dir);
  const started = startWatch(dir);
  await waitFor('watch to start', () => watchingLines(dir) > before, 60_000);
  return started;
}

async function kill9(proc: ChildProcess): Promise<void> {
  const exited = new Promise((r) => proc.once('exit', r));
  proc.kill('SIGKILL');
  await exited;
}

/** The sample's results with the decay input sha256 and the superseded versions of each. */
function resultsOf(dir: string, sampleId: string): { decaySha256: string | undefined; superseded: string[] }[] {
  return readResults(dir)
    .filter((r) => r.result.sampleId === sampleId)
    .map((r) => {
      const provenance = r.result['provenance'] as {
        inputs: { part: string; sha256: string }[];
        supersededInputs?: { file: string; sha256: string }[];
      };
      return {
        decaySha256: provenance.inputs.find((i) => i.part === 'decay')?.sha256,
        superseded: (provenance.supersededInputs ?? []).map((s) => s.sha256),
      };
    });
}

type DuringPause = 'keeps running' | 'killed, rest written while down' | 'killed, rest written after restart';

/**
 * Runs one paused writer: the first part is written through an open handle, its result committed
 * and the file archived; then `during` happens, the rest is written through the same handle, and the
 * test waits for the whole file's result.
 */
async function pausedWriter(sampleId: string, seed: number, during: DuringPause): Promise<void> {
  const dir = makeWorkspace('', { stabilityWindowMs: WINDOW_MS });
  child = await startedWatch(dir);
  const set = generateSet(sampleId, seed);
  const decay = set.files.find((f) => f.name.includes('decay'));
  if (decay === undefined) throw new Error('no decay file');
  for (const f of set.files.filter((g) => g !== decay)) writeFileSync(join(dir, 'inbox', f.name), f.content);
  const cut = decay.content.lastIndexOf('\n', Math.floor(decay.content.length * 0.6)) + 1;
  const head = decay.content.slice(0, cut);
  fd = openSync(join(dir, 'inbox', decay.name), 'w');
  writeSync(fd, head);
  // The first part's result is committed and the file (still open here) is in the archive.
  await waitFor(
    'the result from the first part, its decay archived',
    () =>
      resultsOf(dir, sampleId).some((r) => r.decaySha256 === sha256(head)) &&
      ledgerRows(dir, 'SELECT archive_path FROM files WHERE name = ?', decay.name).some(
        (r) => r['archive_path'] !== null,
      ),
    30_000,
  );
  // Longer than the archive re-check window, counted from the move (the writer's pause outlasts it
  // only while watch is down: the documented bound counts watch's running time).
  const beyondWindowMs = archiveRecheckMs(WINDOW_MS) + 1000;
  if (during === 'keeps running') {
    await sleep(2 * WINDOW_MS);
    writeSync(fd, decay.content.slice(cut));
  } else {
    await kill9(child);
    child = undefined;
    if (during === 'killed, rest written while down') writeSync(fd, decay.content.slice(cut));
    await sleep(beyondWindowMs);
    child = await startedWatch(dir);
    if (during === 'killed, rest written after restart') {
      await sleep(2 * WINDOW_MS);
      writeSync(fd, decay.content.slice(cut));
    }
  }
  closeSync(fd);
  fd = undefined;
  const whole = sha256(decay.content);
  await waitFor(
    'a result from the whole file',
    () => resultsOf(dir, sampleId).some((r) => r.decaySha256 === whole) && listFiles(join(dir, 'inbox')).length === 0,
    45_000,
  ).catch(() => undefined);
  // Let anything that would follow (a second result, a further version) land before counting.
  await sleep(1000);
  expect(resultsOf(dir, sampleId)).toEqual([{ decaySha256: whole, superseded: [sha256(head)] }]);
  expect(ledgerRows(dir, 'SELECT id FROM sets WHERE sample_id = ?', sampleId)).toHaveLength(1);
  const recorded = ledgerRows(dir, 'SELECT sha256, archive_path FROM files WHERE name = ?', decay.name);
  expect(recorded.map((r) => r['sha256'])).toEqual([whole]);
  expect(sha256(readFileSync(String(recorded[0]?.['archive_path']), 'utf8'))).toBe(whole);
  expect(listFiles(join(dir, 'quarantine'))).toEqual([]);
}

describe('a paused writer whose file was archived while it held it open', () => {
  it('watch keeps running: the rest written after the archive move gives the one result', async () => {
    await pausedWriter('paused-run', 81, 'keeps running');
  }, 90_000);

  it('watch killed (SIGKILL) in the pause, the rest written while it is down, restarted after the re-check window', async () => {
    await pausedWriter('paused-down', 82, 'killed, rest written while down');
  }, 90_000);

  it('watch killed (SIGKILL) in the pause and restarted after the re-check window, the rest written after the restart', async () => {
    await pausedWriter('paused-after', 83, 'killed, rest written after restart');
  }, 90_000);
});
