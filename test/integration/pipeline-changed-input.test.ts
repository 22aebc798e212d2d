// Issue 20 item 3: a file that changes at its path after it was read is taken again as a new version
// of the same input, in the same set; the set's result is replaced by one computed from the whole,
// final file and lists the earlier version in provenance.supersededInputs. Never a second result
// for the sample, never a result from half a file while the whole one is archived.
import { closeSync, openSync, readFileSync, writeFileSync, writeSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { afterEach, describe, expect, it } from 'vitest';
import type { ChildProcess } from 'node:child_process';
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

let child: ChildProcess | undefined;
afterEach(async () => {
  if (child !== undefined) await stopWatch(child);
  child = undefined;
  removeWorkspaces();
});

/** The workspace's ledger rows of `table` matching `where` (read-only, beside the running watch). */
function ledgerRows(dir: string, sql: string, ...params: unknown[]): Record<string, unknown>[] {
  const db = new Database(join(dir, 'state', 'ledger.sqlite'), { readonly: true });
  try {
    return db.prepare(sql).all(...params) as Record<string, unknown>[];
  } finally {
    db.close();
  }
}

async function startedWatch(dir: string): Promise<ChildProcess> {
  const started = startWatch(dir);
  const log = join(dir, 'state', 'driftlight.log');
  await waitFor('watch to start', () => {
    try {
      return readFileSync(log, 'utf8').includes('"msg":"watching"');
    } catch {
      return false;
    }
  });
  return started;
}

/** The decay input of the sample's only result, with the result (throws unless exactly one result). */
function onlyResult(
  dir: string,
  sampleId: string,
): {
  result: Record<string, unknown>;
  decaySha256: string | undefined;
  superseded: { file: string; sha256: string }[];
} {
  const mine = readResults(dir).filter((r) => r.result.sampleId === sampleId);
  const only = mine[0];
  if (mine.length !== 1 || only === undefined)
    throw new Error(`expected one result for ${sampleId}, found ${mine.length}`);
  const result = only.result;
  const provenance = result['provenance'] as {
    inputs: { part: string; sha256: string }[];
    supersededInputs?: { file: string; sha256: string }[];
  };
  return {
    result,
    decaySha256: provenance.inputs.find((i) => i.part === 'decay')?.sha256,
    superseded: provenance.supersededInputs ?? [],
  };
}

describe('inputs that change at their path after they were read', () => {
  it('a file rewritten at the same path after its result: the set is run again from the new version, one result, the old one superseded', async () => {
    const dir = makeWorkspace('', { stabilityWindowMs: 200 });
    child = await startedWatch(dir);
    const first = generateSet('rewritten-1', 71);
    for (const f of first.files) writeFileSync(join(dir, 'inbox', f.name), f.content);
    await waitFor('the first result', () => readResults(dir).some((r) => r.result.sampleId === 'rewritten-1'), 20_000);
    const decayName = first.files.find((f) => f.name.includes('decay'))?.name ?? '';
    const oldContent = first.files.find((f) => f.name === decayName)?.content ?? '';
    // Same sample, same acquisition time, new bytes (re-exported after a correction): a new version.
    const newContent = generateSet('rewritten-1', 72).files.find((f) => f.name === decayName)?.content ?? '';
    expect(sha256(newContent)).not.toBe(sha256(oldContent));
    writeFileSync(join(dir, 'inbox', decayName), newContent);
    await waitFor(
      'the result from the new version',
      () => {
        try {
          return (
            onlyResult(dir, 'rewritten-1').decaySha256 === sha256(newContent) &&
            listFiles(join(dir, 'inbox')).length === 0
          );
        } catch {
          return false;
        }
      },
      45_000,
    );
    const { superseded } = onlyResult(dir, 'rewritten-1');
    expect(superseded.map((s) => ({ file: s.file, sha256: s.sha256 }))).toEqual([
      { file: decayName, sha256: sha256(oldContent) },
    ]);
    expect(ledgerRows(dir, 'SELECT id FROM sets WHERE sample_id = ?', 'rewritten-1')).toHaveLength(1);
    // Both versions are kept in the archive; nothing is quarantined.
    const archived = listFiles(join(dir, 'archive')).filter((p) => p.includes('rewritten-1_decay'));
    expect(archived.map((p) => sha256(readFileSync(join(dir, 'archive', p), 'utf8'))).sort()).toEqual(
      [sha256(oldContent), sha256(newContent)].sort(),
    );
    expect(listFiles(join(dir, 'quarantine'))).toEqual([]);
  }, 90_000);

  it('a file rewritten before its set was complete: the set takes the new version, one result', async () => {
    const dir = makeWorkspace('', { stabilityWindowMs: 200 });
    child = await startedWatch(dir);
    const set = generateSet('rewritten-2', 73);
    const decay = set.files.find((f) => f.name.includes('decay'));
    if (decay === undefined) throw new Error('no decay file');
    writeFileSync(join(dir, 'inbox', decay.name), decay.content);
    await waitFor(
      'the first version recorded',
      () => ledgerRows(dir, 'SELECT id FROM files WHERE name = ?', decay.name).length === 1,
      20_000,
    );
    const newContent = generateSet('rewritten-2', 74).files.find((f) => f.name === decay.name)?.content ?? '';
    writeFileSync(join(dir, 'inbox', decay.name), newContent);
    await waitFor(
      'the new version recorded',
      () =>
        ledgerRows(dir, 'SELECT sha256 FROM files WHERE name = ?', decay.name).some(
          (r) => r['sha256'] === sha256(newContent),
        ),
      20_000,
    );
    for (const f of set.files.filter((g) => g !== decay)) writeFileSync(join(dir, 'inbox', f.name), f.content);
    await waitFor(
      'the result',
      () =>
        readResults(dir).some((r) => r.result.sampleId === 'rewritten-2') && listFiles(join(dir, 'inbox')).length === 0,
      20_000,
    );
    const { decaySha256, superseded } = onlyResult(dir, 'rewritten-2');
    expect(decaySha256).toBe(sha256(newContent));
    expect(superseded.map((s) => s.sha256)).toEqual([sha256(decay.content)]);
    expect(ledgerRows(dir, 'SELECT id FROM sets WHERE sample_id = ?', 'rewritten-2')).toHaveLength(1);
  }, 90_000);

  it('a writer that pauses longer than the stability window (file held open): the result is from the whole file, whose sha256 the ledger and archive agree on', async () => {
    const windowMs = 200;
    const dir = makeWorkspace('', { stabilityWindowMs: windowMs });
    child = await startedWatch(dir);
    const set = generateSet('paused-1', 75);
    const decay = set.files.find((f) => f.name.includes('decay'));
    if (decay === undefined) throw new Error('no decay file');
    for (const f of set.files.filter((g) => g !== decay)) writeFileSync(join(dir, 'inbox', f.name), f.content);
    // The first 60 % (whole lines, so the head reads as a shorter decay), a pause of 8 windows, the rest.
    const cut = decay.content.lastIndexOf('\n', Math.floor(decay.content.length * 0.6)) + 1;
    const fd = openSync(join(dir, 'inbox', decay.name), 'w');
    try {
      writeSync(fd, decay.content.slice(0, cut));
      await sleep(8 * windowMs);
      writeSync(fd, decay.content.slice(cut));
    } finally {
      closeSync(fd);
    }
    const whole = sha256(decay.content);
    await waitFor(
      'the result from the whole file',
      () => {
        try {
          return onlyResult(dir, 'paused-1').decaySha256 === whole && listFiles(join(dir, 'inbox')).length === 0;
        } catch {
          return false;
        }
      },
      45_000,
    );
    const recorded = ledgerRows(dir, 'SELECT sha256, archive_path FROM files WHERE name = ?', decay.name);
    expect(recorded.map((r) => r['sha256'])).toEqual([whole]);
    expect(sha256(readFileSync(String(recorded[0]?.['archive_path']), 'utf8'))).toBe(whole);
    expect(onlyResult(dir, 'paused-1').superseded.map((s) => s.sha256)).toEqual([sha256(decay.content.slice(0, cut))]);
    expect(listFiles(join(dir, 'quarantine'))).toEqual([]);
  }, 90_000);
});
