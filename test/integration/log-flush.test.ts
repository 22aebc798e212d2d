// The logger flushes before exit (issue 20, item 9): every set committed by `process`, and by `watch`
// stopped with SIGTERM while sets are still being committed, has its "result written" line in the
// log file. Real CLI child processes on real folders; the log is read after the process has exited.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { runDriftlight } from '../helpers/cli.js';
import {
  dropSet,
  generateSet,
  makeWorkspace,
  readResults,
  removeWorkspaces,
  startWatch,
  stopWatch,
  waitFor,
} from './pipeline-helpers.js';

afterAll(() => removeWorkspaces());

/** Set ids of the "result written" lines in the workspace's log file (the default state/driftlight.log). */
function loggedCommits(dir: string): string[] {
  return readFileSync(join(dir, 'state', 'driftlight.log'), 'utf8')
    .split('\n')
    .filter((line) => line.trim() !== '')
    .map((line) => JSON.parse(line) as { msg?: string; setId?: string })
    .filter((entry) => entry.msg === 'result written')
    .map((entry) => entry.setId ?? '');
}

/** Set ids of the result files written. */
function resultSetIds(dir: string): string[] {
  return readResults(dir)
    .map((r) => r.result.setId)
    .filter((id) => typeof id === 'string');
}

const SETS = 40;

describe('the log file after exit', () => {
  it('process: one "result written" line per result file', () => {
    const dir = makeWorkspace('', { concurrency: 2 });
    const inbox = join(dir, 'inbox');
    for (let i = 0; i < SETS; i++) dropSet(inbox, generateSet(`flush-p-${String(i).padStart(2, '0')}`, 500 + i));
    const run = runDriftlight(['process', inbox, '--config', join(dir, 'driftlight.yaml')], {
      cwd: dir,
      timeoutMs: 240_000,
    });
    expect(run.stderr).toBe('');
    expect(run.status).toBe(0);
    const results = resultSetIds(dir).sort();
    expect(results).toHaveLength(SETS);
    expect(loggedCommits(dir).sort()).toEqual(results);
  });

  it('watch stopped by SIGTERM while committing: one "result written" line per result file', async () => {
    const dir = makeWorkspace('', { stabilityWindowMs: 100, concurrency: 2 });
    const inbox = join(dir, 'inbox');
    const child = startWatch(dir);
    let stderr = '';
    child.stderr?.on('data', (chunk: Buffer) => {
      stderr += chunk.toString();
    });
    for (let i = 0; i < SETS; i++) dropSet(inbox, generateSet(`flush-w-${String(i).padStart(2, '0')}`, 700 + i));
    // Stop as soon as the first results are in: the rest are committed (and logged) during the drain.
    await waitFor('a first result', () => resultSetIds(dir).length > 0, 120_000, 20);
    const code = await stopWatch(child);
    expect(stderr).toBe('');
    expect(code).toBe(0);
    const results = resultSetIds(dir).sort();
    expect(results.length).toBeGreaterThan(0);
    expect(loggedCommits(dir).sort()).toEqual(results);
  });
});
