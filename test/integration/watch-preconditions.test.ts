// `watch` refuses to start where it would do harm (issue 20, items 6 and 7): on an inbox (or a
// configured results folder) that does not exist, which it used to create, and on a state folder
// another live instance holds ("already running (pid N)"); a lock left by a dead process is taken over.
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { acquireInstanceLock, LOCK_FILE_NAME } from '../../src/pipeline/instance-lock.js';
import { runDriftlight } from '../helpers/cli.js';
import { tempDir } from '../helpers/temp-dir.js';
import { makeWorkspace, removeWorkspaces, startWatch, stopWatch, waitFor } from './pipeline-helpers.js';

afterAll(removeWorkspaces);

/** The pid of a process that has exited (so no live process has it, barring reuse within the test). */
function deadPid(): number {
  const child = spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))'], { encoding: 'utf8' });
  return Number(child.stdout);
}

describe('instance lock', () => {
  it("refuses a second holder while the first lives, naming its pid; takes over a dead holder's lock", async () => {
    const state = tempDir('dl-lock-');
    const sleeper = spawn(process.execPath, ['-e', 'setTimeout(() => {}, 60000)'], { stdio: 'ignore' });
    try {
      writeFileSync(join(state, LOCK_FILE_NAME), `${sleeper.pid} watch 2026-01-01T00:00:00Z\n`);
      expect(() => acquireInstanceLock(state, 'watch')).toThrow(`already running (pid ${sleeper.pid})`);
    } finally {
      sleeper.kill('SIGKILL');
    }
    const gone = deadPid();
    writeFileSync(join(state, LOCK_FILE_NAME), `${gone} watch 2026-01-01T00:00:00Z\n`);
    const lock = acquireInstanceLock(state, 'watch');
    expect(readFileSync(lock.path, 'utf8')).toMatch(new RegExp(`^${process.pid} watch `));
    lock.release();
    expect(existsSync(lock.path)).toBe(false);
  });

  it('a second `watch` on the same state folder exits 2 with "already running (pid N)"', async () => {
    const dir = makeWorkspace();
    const first = startWatch(dir);
    try {
      await waitFor('the first watch to hold the lock', () => existsSync(join(dir, 'state', LOCK_FILE_NAME)), 30_000);
      const second = runDriftlight(['watch', '--config', join(dir, 'driftlight.yaml')], {
        cwd: dir,
        timeoutMs: 30_000,
      });
      expect(second.status).toBe(2);
      expect(second.stderr).toContain(`ALREADY_RUNNING: driftlight is already running (pid ${first.pid})`);
      expect(second.stderr.trim().split('\n')).toHaveLength(2);
    } finally {
      expect(await stopWatch(first)).toBe(0);
    }
    expect(existsSync(join(dir, 'state', LOCK_FILE_NAME))).toBe(false);
  });
});

describe('missing folders', () => {
  it('watch and config check refuse an inbox that does not exist, and do not create it', () => {
    const dir = tempDir('dl-noinbox-');
    const inbox = join(dir, 'mnt', 'share', 'inbox');
    writeFileSync(join(dir, 'driftlight.yaml'), `folders: { inbox: ${inbox} }\nlogging: { stdout: off }\n`);
    const watch = runDriftlight(['watch', '--config', join(dir, 'driftlight.yaml')], { cwd: dir, timeoutMs: 30_000 });
    expect(watch.status).toBe(2);
    expect(watch.stderr).toContain(`FOLDER_MISSING: folders.inbox (${inbox}) does not exist`);
    expect(existsSync(inbox)).toBe(false);
    const check = runDriftlight(['config', 'check', '--config', join(dir, 'driftlight.yaml')], { cwd: dir });
    expect(check.status).toBe(2);
    expect(check.stderr).toContain(`folders.inbox (${inbox}) does not exist`);
    mkdirSync(inbox, { recursive: true });
    expect(runDriftlight(['config', 'check', '--config', join(dir, 'driftlight.yaml')], { cwd: dir }).status).toBe(0);
  });

  it('refuses a configured results folder that does not exist', () => {
    const dir = tempDir('dl-noresults-');
    mkdirSync(join(dir, 'inbox'));
    const results = join(dir, 'share', 'results');
    writeFileSync(
      join(dir, 'driftlight.yaml'),
      `folders: { inbox: inbox, results: ${results} }\nlogging: { stdout: off }\n`,
    );
    const check = runDriftlight(['config', 'check', '--config', join(dir, 'driftlight.yaml')], { cwd: dir });
    expect(check.status).toBe(2);
    expect(check.stderr).toContain(`folders.results (${results}) does not exist`);
  });
});
