// Runs the real driftlight CLI (bin/driftlight.js, compiled by `npm test`'s pretest build) as a child process.
import { spawnSync, type SpawnSyncReturns } from 'node:child_process';
import { fileURLToPath } from 'node:url';

export const REPO_ROOT = fileURLToPath(new URL('../../', import.meta.url));
export const CLI_PATH = fileURLToPath(new URL('../../bin/driftlight.js', import.meta.url));

/** Runs `driftlight ...args` synchronously and returns status, stdout and stderr as text. */
export function runDriftlight(
  args: readonly string[],
  options: { cwd?: string; env?: NodeJS.ProcessEnv; input?: string; timeoutMs?: number } = {},
): SpawnSyncReturns<string> {
  return spawnSync(process.execPath, [CLI_PATH, ...args], {
    cwd: options.cwd ?? REPO_ROOT,
    env: { ...process.env, ...options.env },
    input: options.input,
    encoding: 'utf8',
    timeout: options.timeoutMs ?? 60_000,
  });
}
