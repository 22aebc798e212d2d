// The event-driven inbox watcher (OS file events through fs.watch, one watch per folder): a change
// costs one stat of the file it names, never a re-listing of the folder, so a burst of thousands of
// files stays cheap. Completed files are reported through StableFiles. Used unless watch.usePolling.
//
// OS events can be lost: Linux drops inotify events once its queue (fs.inotify.max_queued_events,
// 16384 by default) is full, and Node's fs.watch does not say so. A burst of more than ~8,000 files
// written while the event loop is busy overflows it (seen on the bench machine: files stayed in the
// inbox unseen until the next start). So the watcher also re-lists the inbox tree every
// `watch.rescanIntervalMs` and takes every file it has not reported (or that changed since), and
// reports those through `onMissed`.
import { lstatSync, readdirSync, statSync, watch, type FSWatcher } from 'node:fs';
import { basename, join } from 'node:path';
import type { WatchConfig } from '../config/sections/watch.js';
import { compileGlobs, isIgnoredFile } from './ignore.js';
import { isGoneError } from '../output/fs-errors.js';
import { StableFiles, type FileStat } from './stable-files.js';
import type { InboxWatcher, InboxWatcherEvents } from './watcher-types.js';

/** What the watcher needs of fs.watch (replaceable in tests, e.g. by one that loses every event). */
export type FolderWatchFn = (
  dir: string,
  listener: (event: string, name: string | Buffer | null) => void,
) => Pick<FSWatcher, 'close' | 'on'>;

const osFolderWatch: FolderWatchFn = (dir, listener) => watch(dir, { persistent: true }, listener);

/** Starts watching `inboxDir` and its sub-folders with OS events, re-listing the tree every `options.rescanIntervalMs`. */
export function watchInboxWithEvents(
  inboxDir: string,
  options: WatchConfig,
  events: InboxWatcherEvents,
  folderWatch: FolderWatchFn = osFolderWatch,
): InboxWatcher {
  const extra = compileGlobs(options.ignoreGlobs);
  /** Files handed to onFile and still in the inbox, with their size and mtime then. */
  const reported = new Map<string, FileStat>();
  const stable = new StableFiles(
    options.stabilityWindowMs,
    options.pollIntervalMs,
    (path, stat) => {
      reported.set(path, stat);
      events.onFile(path);
    },
    Date.now,
    (error) => report(error),
  );
  /**
   * Watched folders, with the identity (inode and birth time) each had when its watch began: a folder
   * deleted and made again is a new folder the old watch does not see, even when ext4 gives it the
   * same inode number.
   */
  const folders = new Map<string, { watcher: Pick<FSWatcher, 'close' | 'on'>; identity: string }>();
  let closed = false;

  const report = (error: unknown): void => {
    if (!closed) events.onError?.(error instanceof Error ? error : new Error(String(error)));
  };

  const unwatchFolder = (dir: string): void => {
    for (const [path, { watcher }] of folders) {
      if (path === dir || path.startsWith(`${dir}/`) || path.startsWith(`${dir}\\`)) {
        watcher.close();
        folders.delete(path);
      }
    }
  };

  type Kind = { kind: 'file'; stat: FileStat } | { kind: 'folder'; identity: string } | { kind: 'gone' | 'other' };
  const kindOf = (path: string, isRoot = false): Kind => {
    try {
      // A path gone is the usual answer here (every input moved out of the inbox raises an event):
      // no exception for it, which costs several times the lstat itself.
      const link = lstatSync(path, { throwIfNoEntry: false });
      // A symbolic link below the inbox is never followed (it may lead outside): it is reported as
      // a file of its own, and intake refuses it or takes what it points to (watch.symlinks). Only
      // the inbox itself may be a link (a configured path).
      if (link?.isSymbolicLink() === true && !isRoot)
        return { kind: 'file', stat: { sizeBytes: link.size, mtimeMs: link.mtimeMs } };
      const target = link?.isSymbolicLink() === true ? statSync(path, { throwIfNoEntry: false }) : link;
      if (target === undefined) return { kind: 'gone' };
      if (target.isFile()) return { kind: 'file', stat: { sizeBytes: target.size, mtimeMs: target.mtimeMs } };
      return target.isDirectory()
        ? { kind: 'folder', identity: `${target.ino}:${target.birthtimeMs}` }
        : { kind: 'other' };
    } catch (error) {
      // A folder on the path replaced by a file (ENOTDIR) is a path gone; anything else (EACCES,
      // EIO, ENAMETOOLONG, ELOOP) reaches the log with the path in its message, and the path is let go.
      if (!isGoneError(error)) report(error);
      return { kind: 'gone' };
    }
  };

  /** Looks at one path named by an event or a listing: follows new folders, tracks files. */
  const examine = (path: string, isRoot = false): void => {
    const found = kindOf(path, isRoot);
    if (found.kind === 'gone') {
      stable.forget(path);
      reported.delete(path);
      unwatchFolder(path);
    } else if (found.kind === 'folder') {
      if (!isRoot && basename(path).startsWith('.')) return;
      const watched = folders.get(path);
      if (watched !== undefined && watched.identity !== found.identity) unwatchFolder(path);
      if (!folders.has(path)) watchFolder(path, found.identity);
    } else if (found.kind === 'file' && !isIgnoredFile(path, extra)) {
      stable.touch(path, found.stat);
    }
  };

  /** Watches one folder (before listing it, so nothing arriving meanwhile is missed) and examines its entries. */
  const watchFolder = (dir: string, identity: string): void => {
    try {
      const watcher = folderWatch(dir, (_event, name) => {
        if (closed) return;
        if (name === null) listFolder(dir);
        else examine(join(dir, name.toString()));
      });
      watcher.on('error', (error) => {
        unwatchFolder(dir);
        report(error);
      });
      folders.set(dir, { watcher, identity });
    } catch (error) {
      report(error);
      return;
    }
    listFolder(dir);
  };

  const namesIn = (dir: string): string[] | undefined => {
    try {
      return readdirSync(dir);
    } catch (error) {
      if ((error as NodeJS.ErrnoException).code !== 'ENOENT') report(error);
      return undefined;
    }
  };

  const listFolder = (dir: string): void => {
    for (const name of namesIn(dir) ?? []) examine(join(dir, name));
  };

  /**
   * Re-lists the watched tree: a file neither settling nor reported with its current size and mtime
   * was missed by the OS events and is tracked now; a folder not watched (or deleted and made again
   * since its watch began) is watched; reported files no longer present are forgotten. Returns the
   * missed files.
   */
  const rescan = (): string[] => {
    const missed: string[] = [];
    const present = new Set<string>();
    const walk = (dir: string): void => {
      for (const name of namesIn(dir) ?? []) {
        const path = join(dir, name);
        const found = kindOf(path);
        if (found.kind === 'folder') {
          if (name.startsWith('.')) continue;
          if (folders.has(path)) walk(path);
          else watchFolder(path, found.identity);
        } else if (found.kind === 'file' && !isIgnoredFile(path, extra)) {
          present.add(path);
          if (stable.has(path)) continue;
          const before = reported.get(path);
          if (before?.sizeBytes === found.stat.sizeBytes && before.mtimeMs === found.stat.mtimeMs) continue;
          missed.push(path);
          stable.touch(path, found.stat);
        }
      }
    };
    for (const [dir, { identity }] of [...folders]) {
      const now = kindOf(dir, dir === inboxDir);
      if (now.kind !== 'folder' || now.identity !== identity) unwatchFolder(dir);
    }
    if (folders.has(inboxDir)) walk(inboxDir);
    else examine(inboxDir, true);
    for (const path of reported.keys()) if (!present.has(path)) reported.delete(path);
    return missed;
  };

  const rescanTimer = setInterval(() => {
    if (closed) return;
    const missed = rescan();
    if (missed.length > 0) events.onMissed?.(missed);
  }, options.rescanIntervalMs);
  rescanTimer.unref();

  examine(inboxDir, true);
  setImmediate(() => {
    if (!closed) events.onReady?.();
  });
  return {
    async close() {
      closed = true;
      clearInterval(rescanTimer);
      for (const { watcher } of folders.values()) watcher.close();
      folders.clear();
      stable.close();
    },
  };
}
