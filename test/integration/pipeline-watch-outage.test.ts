// `driftlight watch` (real child process) through a storage outage, with no restart: while the
// results folder cannot be written, a finished set's outcome is held and committed once the folder
// is back; while the archive cannot be written, results are still committed and the inputs stay in
// the inbox until the periodic repair (watch.rescanIntervalMs) moves them.
// A folder is made unwritable by putting a regular file in its place (test/helpers/blocked-folder.ts).
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ChildProcess } from 'node:child_process';
import { blockFolder, unblockFolder } from '../helpers/blocked-folder.js';
import {
  dropSet,
  generateSet,
  listFiles,
  makeWorkspace,
  readResults,
  removeWorkspaces,
  startWatch,
  stopWatch,
  waitFor,
} from './pipeline-helpers.js';

describe('driftlight watch through a storage outage', () => {
  let dir: string;
  let child: ChildProcess;
  const log = (): string =>
    existsSync(join(dir, 'state', 'driftlight.log')) ? readFileSync(join(dir, 'state', 'driftlight.log'), 'utf8') : '';

  beforeAll(async () => {
    dir = makeWorkspace();
    // The same test config as makeWorkspace's, with a short rescan interval (the repair runs with it).
    writeFileSync(
      join(dir, 'driftlight.yaml'),
      [
        'watch: { stabilityWindowMs: 150, pollIntervalMs: 50, rescanIntervalMs: 300 }',
        'assembly: { setTimeoutMs: 60000, requiredParts: [emission, absorbance, decay, irf] }',
        'queue: { concurrency: 1, backoffMs: 50 }',
        'logging: { level: info, stdout: off }',
        '',
      ].join('\n'),
    );
    child = startWatch(dir);
    await waitFor('watch to start', () => log().includes('"msg":"watching"'));
  });

  afterAll(async () => {
    if (child.exitCode === null) await stopWatch(child);
    removeWorkspaces();
  });

  it('holds a result while the results folder is unwritable and writes it once the folder is back', async () => {
    blockFolder(join(dir, 'results'));
    const set = generateSet('outage-results', 41);
    dropSet(join(dir, 'inbox'), set);
    await waitFor('the failed commit in the log', () =>
      log().includes('the outcome is kept and committed again later'),
    );
    expect(set.files.every((f) => existsSync(join(dir, 'inbox', f.name)))).toBe(true);
    unblockFolder(join(dir, 'results'));
    await waitFor(
      'the held result',
      () => readResults(dir).some((r) => r.result.sampleId === 'outage-results'),
      15_000,
    );
    await waitFor('inputs archived', () => set.files.every((f) => !existsSync(join(dir, 'inbox', f.name))));
    expect(listFiles(join(dir, 'archive')).filter((p) => p.includes('outage-results'))).toHaveLength(set.files.length);
  }, 40_000);

  it('commits while the archive is unwritable and moves the inputs by the periodic repair once it is back', async () => {
    blockFolder(join(dir, 'archive'));
    const set = generateSet('outage-archive', 42);
    dropSet(join(dir, 'inbox'), set);
    await waitFor('the result', () => readResults(dir).some((r) => r.result.sampleId === 'outage-archive'));
    await waitFor('the failed moves in the log', () => log().includes('moving its inputs out of the inbox failed'));
    expect(set.files.every((f) => existsSync(join(dir, 'inbox', f.name)))).toBe(true);
    unblockFolder(join(dir, 'archive'));
    await waitFor(
      'inputs archived by the repair',
      () => set.files.every((f) => !existsSync(join(dir, 'inbox', f.name))),
      15_000,
    );
    expect(listFiles(join(dir, 'archive')).filter((p) => p.includes('outage-archive'))).toHaveLength(set.files.length);
    // The log line is written asynchronously, a moment after the moves it reports.
    await waitFor('the repair in the log', () => log().includes('repair: finished file moves that had failed'));
  }, 40_000);

  it('still stops cleanly on SIGTERM', async () => {
    expect(await stopWatch(child)).toBe(0);
  }, 20_000);
});
