// Crash safety: `driftlight watch` is killed with SIGKILL at seeded random moments during a 300-set
// burst and restarted, five times; afterwards every set has exactly one result and every input is in
// the archive (none lost, none duplicated, none left in the inbox).
import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { createSeededRandom } from '../../src/decay/index.js';
import { CLI_PATH } from '../helpers/cli.js';
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

const SETS = 300;
const ROUNDS = 5;
const sleep = (ms: number): Promise<void> => new Promise((r) => setTimeout(r, ms));

describe('crash recovery under kill -9', () => {
  it('processes each of 300 sets exactly once across five SIGKILL restarts', async () => {
    const dir = makeWorkspace('', { stabilityWindowMs: 100, requiredParts: 'emission, decay, irf' });
    const inbox = join(dir, 'inbox');
    const sets = Array.from({ length: SETS }, (_u, i) =>
      generateSet(`burst-${String(i).padStart(3, '0')}`, 1000 + i, { parts: ['emission', 'decay'] }),
    );
    const random = createSeededRandom(4242);
    let written = 0;
    const writeSome = (count: number): void => {
      for (const set of sets.slice(written, written + count))
        for (const f of set.files) writeFileSync(join(inbox, f.name), f.content);
      written = Math.min(SETS, written + count);
    };
    for (let round = 0; round < ROUNDS; round++) {
      const child = startWatch(dir);
      const killAtMs = 600 + Math.floor(random.nextUniform() * 2400);
      const started = Date.now();
      while (Date.now() - started < killAtMs) {
        if (written < SETS) writeSome(15);
        await sleep(100);
      }
      child.kill('SIGKILL');
      await new Promise((r) => child.once('exit', r));
    }
    writeSome(SETS);
    // The final run must be up (signal handlers installed) before it is stopped: the rounds may
    // already have finished every set, so wait for its own "watching" line in the log.
    const logPath = join(dir, 'state', 'driftlight.log');
    const watchingLines = (): number =>
      existsSync(logPath) ? readFileSync(logPath, 'utf8').split('"msg":"watching"').length - 1 : 0;
    const watchingBefore = watchingLines();
    const final = startWatch(dir);
    try {
      await waitFor('the final watch to start', () => watchingLines() > watchingBefore);
      await waitFor('all 300 results', () => readResults(dir).length >= SETS && listFiles(inbox).length === 0, 120_000);
      await sleep(500);
    } finally {
      expect(await stopWatch(final)).toBe(0);
    }
    const results = readResults(dir);
    const bySample = new Map<string, number>();
    for (const r of results) bySample.set(r.result.sampleId, (bySample.get(r.result.sampleId) ?? 0) + 1);
    expect(results).toHaveLength(SETS);
    expect([...bySample.values()].every((n) => n === 1)).toBe(true);
    expect(results.every((r) => !r.result.partial)).toBe(true);
    expect(listFiles(inbox)).toEqual([]);
    expect(listFiles(join(dir, 'quarantine'))).toEqual([]);
    const archived = listFiles(join(dir, 'archive')).map((p) => p.split('/').pop());
    expect(archived).toHaveLength(SETS * 2);
    expect(new Set(archived).size).toBe(SETS * 2);
    const status = spawnSync(
      process.execPath,
      [CLI_PATH, 'status', '--json', '--config', join(dir, 'driftlight.yaml')],
      { encoding: 'utf8' },
    );
    const parsed = JSON.parse(status.stdout) as { sets: Record<string, number>; files: Record<string, number> };
    expect(parsed.sets).toEqual({ open: 0, queued: 0, done: SETS, failed: 0 });
    expect(parsed.files.done).toBe(SETS * 2);
  }, 240_000);
});

afterAll(() => removeWorkspaces());
