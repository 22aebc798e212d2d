// One running instance per state folder: `watch`, `process` and `reprocess` hold state/driftlight.lock
// (the owner's pid) while they write the ledger. A second one refuses to start, naming the pid; a
// lock left by a process that died (kill -9, power cut) is taken over.
import { closeSync, fsyncSync, openSync, readFileSync, rmSync, writeSync } from 'node:fs';
import { join } from 'node:path';
import { DriftlightError } from '../model/errors.js';

/** The lock file's name in the state folder. */
export const LOCK_FILE_NAME = 'driftlight.lock';

export interface InstanceLock {
  readonly path: string;
  /** Removes the lock (idempotent; only when it is still ours). */
  release(): void;
}

/** Whether a process with `pid` exists (signal 0: EPERM means it exists under another user). */
export function processAlive(pid: number): boolean {
  if (!Number.isInteger(pid) || pid <= 0) return false;
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === 'EPERM';
  }
}

function ownerOf(path: string): number | undefined {
  try {
    const pid = Number.parseInt(readFileSync(path, 'utf8').trim().split(/\s+/)[0] ?? '', 10);
    return Number.isFinite(pid) ? pid : undefined;
  } catch {
    return undefined;
  }
}

/** Takes the lock of `stateDir` for this process (pid `pid`); throws ALREADY_RUNNING naming the live owner's pid. */
export function acquireInstanceLock(stateDir: string, command: string, pid: number = process.pid): InstanceLock {
  const path = join(stateDir, LOCK_FILE_NAME);
  for (let attempt = 0; attempt < 3; attempt += 1) {
    let fd: number;
    try {
      fd = openSync(path, 'wx');
    } catch (error) {
      if ((error as NodeJS.ErrnoException).code !== 'EEXIST') throw error;
      const owner = ownerOf(path);
      if (owner !== undefined && owner !== pid && processAlive(owner)) {
        throw new DriftlightError(
          'ALREADY_RUNNING',
          `driftlight is already running (pid ${owner}) on the state folder ${stateDir}`,
          {
            file: path,
            hint: `Stop the other instance (kill ${owner}) or give this one its own state folder (folders.state); a lock whose process has died is taken over automatically.`,
          },
        );
      }
      // Stale (its process is gone, or the file is half-written): remove it and try again. Two
      // instances taking over at once both remove it, but only one of the exclusive creates wins.
      rmSync(path, { force: true });
      continue;
    }
    try {
      writeSync(fd, `${pid} ${command} ${new Date().toISOString()}\n`);
      fsyncSync(fd);
    } finally {
      closeSync(fd);
    }
    return {
      path,
      release() {
        if (ownerOf(path) === pid) rmSync(path, { force: true });
      },
    };
  }
  throw new DriftlightError('ALREADY_RUNNING', `could not take the lock ${path}: another instance keeps taking it`, {
    file: path,
  });
}
