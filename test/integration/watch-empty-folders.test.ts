// `watch` removes an inbox day folder once its set was taken and archived (issue 20, item 9), and
// keeps the inbox itself. A real child process on a real inbox.
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
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

describe('watch and empty inbox folders', () => {
  it('removes the emptied day folder, logs it once, keeps the inbox', async () => {
    const dir = makeWorkspace();
    // makeWorkspace's config with a short rescan interval (the sweep runs with it).
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
    const inbox = join(dir, 'inbox');
    const day = join(inbox, '2026-03-14');
    mkdirSync(day);
    dropSet(day, generateSet('dayfolder-01', 11));
    const child = startWatch(dir);
    try {
      await waitFor('the result', () => readResults(dir).length === 1, 60_000);
      await waitFor('the day folder removed', () => !existsSync(day), 30_000);
      expect(existsSync(inbox)).toBe(true);
    } finally {
      await stopWatch(child);
    }
    const removals = readFileSync(join(dir, 'state', 'driftlight.log'), 'utf8')
      .split('\n')
      .filter((line) => line.includes('removed an empty inbox folder'));
    expect(removals).toHaveLength(1);
    expect(removals[0]).toContain(day);
  });
});
