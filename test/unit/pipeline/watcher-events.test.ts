// The event watcher loses nothing when the OS loses events: a periodic rescan of the inbox tree
// takes every file whose events never came (an fs.watch that reports nothing stands in for an
// inotify queue overflow), and a real burst larger than Linux's default inotify queue
// (fs.inotify.max_queued_events = 16384 events, about two per new file) is reported in full.
import { mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { resolveConfig } from '../../../src/config/resolve.js';
import { watchInboxWithEvents, type FolderWatchFn } from '../../../src/pipeline/watcher-events.js';
import { tempDir } from '../../helpers/temp-dir.js';

const sleep = (ms: number): Promise<void> => new Promise((r) => setTimeout(r, ms));

/** An fs.watch that never reports anything: every OS event is lost. */
const deafWatch: FolderWatchFn = () =>
  ({
    close: () => undefined,
    on: function on() {
      return this;
    },
  }) as unknown as ReturnType<FolderWatchFn>;

function watchOptions(rescanIntervalMs: number) {
  return resolveConfig(
    { watch: { stabilityWindowMs: 50, pollIntervalMs: 20, rescanIntervalMs } },
    { baseDir: tempDir('dl-watch-cfg-') },
  ).watch;
}

async function until(check: () => boolean, timeoutMs: number): Promise<void> {
  const end = Date.now() + timeoutMs;
  while (!check() && Date.now() < end) await sleep(25);
}

describe('watchInboxWithEvents', () => {
  it('takes files (and new folders) whose OS events were lost at the next rescan, once each, and says so', async () => {
    const inbox = tempDir('dl-watch-deaf-');
    const reported: string[] = [];
    const missed: string[] = [];
    const watcher = watchInboxWithEvents(
      inbox,
      watchOptions(150),
      { onFile: (p) => reported.push(p), onMissed: (paths) => missed.push(...paths) },
      deafWatch,
    );
    await sleep(50);
    writeFileSync(join(inbox, 'a.csv'), 'x\n1\n');
    mkdirSync(join(inbox, 'day2'));
    writeFileSync(join(inbox, 'day2', 'b.csv'), 'x\n2\n');
    writeFileSync(join(inbox, '.hidden.csv'), 'x\n3\n');
    await until(() => reported.length >= 2, 3000);
    // Several more rescans: nothing is reported twice while its size and mtime are unchanged.
    await sleep(500);
    expect(reported.sort()).toEqual([join(inbox, 'a.csv'), join(inbox, 'day2', 'b.csv')]);
    expect(missed).toContain(join(inbox, 'a.csv'));
    // A reported file rewritten with other content (events lost again) is taken again.
    writeFileSync(join(inbox, 'a.csv'), 'x\n1\n2\n');
    await until(() => reported.length >= 3, 3000);
    expect(reported.filter((p) => p === join(inbox, 'a.csv'))).toHaveLength(2);
    await watcher.close();
  });

  it('watches an inbox deleted and made again (a new folder the old watch cannot see, even with the same inode number) from the next rescan on', async () => {
    const base = tempDir('dl-watch-remade-');
    const inbox = join(base, 'inbox');
    mkdirSync(inbox);
    const reported: string[] = [];
    const missed: string[] = [];
    const watcher = watchInboxWithEvents(inbox, watchOptions(1000), {
      onFile: (p) => reported.push(p),
      onMissed: (paths) => missed.push(...paths),
    });
    await sleep(50);
    rmSync(inbox, { recursive: true });
    mkdirSync(inbox);
    writeFileSync(join(inbox, 'first.csv'), 'x\n1\n');
    await until(() => reported.length >= 1, 3000);
    expect(reported).toEqual([join(inbox, 'first.csv')]);
    // Watched again: a new file is reported by its events, not found by a rescan (a rescan reports the
    // files it takes through onMissed; the folder's own file came that way, the new one must not).
    writeFileSync(join(inbox, 'second.csv'), 'x\n2\n');
    await until(() => reported.length >= 2, 3000);
    expect(reported[1]).toBe(join(inbox, 'second.csv'));
    expect(missed).not.toContain(join(inbox, 'second.csv'));
    await watcher.close();
  });

  it('reports every file of a burst of 9,000 written while the event loop is blocked (more than the default inotify queue holds)', async () => {
    const inbox = tempDir('dl-watch-burst-');
    const reported = new Set<string>();
    const watcher = watchInboxWithEvents(inbox, watchOptions(400), { onFile: (p) => reported.add(p) });
    await sleep(50);
    // One synchronous loop: fs.watch cannot drain the inotify queue until it ends.
    for (let i = 0; i < 9000; i++) writeFileSync(join(inbox, `f${String(i).padStart(5, '0')}.csv`), `x\n${i}\n`);
    await until(() => reported.size >= 9000, 20_000);
    expect(reported.size).toBe(9000);
    await watcher.close();
  }, 40_000);

  it('reports a path it cannot look at (not a gone file) through onError, with the path', async () => {
    const inbox = tempDir('dl-watch-err-');
    let emit: ((event: string, name: string | null) => void) | undefined;
    const capturing: FolderWatchFn = (_dir, listener) => {
      emit = listener;
      return {
        close: () => undefined,
        on: function on() {
          return this;
        },
      } as unknown as ReturnType<FolderWatchFn>;
    };
    const errors: Error[] = [];
    const reported: string[] = [];
    const watcher = watchInboxWithEvents(
      inbox,
      watchOptions(60_000),
      { onFile: (p) => reported.push(p), onError: (e) => errors.push(e) },
      capturing,
    );
    emit?.('rename', 'removed-meanwhile.csv'); // ENOENT: a file gone is no error
    // A name longer than NAME_MAX (255 bytes): lstat fails with ENAMETOOLONG.
    const tooLong = `${'w'.repeat(300)}.csv`;
    emit?.('rename', tooLong);
    await watcher.close();
    expect(errors).toHaveLength(1);
    expect((errors[0] as NodeJS.ErrnoException).code).toBe('ENAMETOOLONG');
    expect(errors[0]?.message).toContain(join(inbox, tooLong));
    expect(reported).toEqual([]);
  });
});
