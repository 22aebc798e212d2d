// Log rotation for a `driftlight watch` that runs for months: after logrotate renames the log file,
// SIGHUP makes watch reopen it (lines go on to a new file at the configured path); without a handler
// SIGHUP would have ended the process. Real child process, real files.
import { existsSync, readFileSync, renameSync } from 'node:fs';
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

describe('driftlight watch and log rotation', () => {
  it('reopens its log file on SIGHUP and keeps running', async () => {
    const dir = makeWorkspace();
    const logFile = join(dir, 'state', 'driftlight.log');
    const read = (path: string): string => (existsSync(path) ? readFileSync(path, 'utf8') : '');
    const child = startWatch(dir);
    try {
      await waitFor('watch to start', () => read(logFile).includes('"msg":"watching"'));
      renameSync(logFile, `${logFile}.1`);
      child.kill('SIGHUP');
      await waitFor('the reopened log file', () => read(logFile).includes('log file reopened (SIGHUP)'));
      dropSet(join(dir, 'inbox'), generateSet('rotated-01', 51));
      await waitFor('the result', () => readResults(dir).some((r) => r.result.sampleId === 'rotated-01'));
      await waitFor('the result line in the new log file', () => read(logFile).includes('result written'));
      expect(read(`${logFile}.1`)).toContain('"msg":"watching"');
      expect(read(`${logFile}.1`)).not.toContain('result written');
      expect(child.exitCode).toBeNull();
    } finally {
      expect(await stopWatch(child)).toBe(0);
    }
  }, 40_000);
});
