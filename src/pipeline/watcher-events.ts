// The event-driven inbox watcher (OS file events through fs.watch, one watch per folder): a change
// costs one stat of the file it names, never a re-listing of the folder, so a burst of thousands of
// files stays cheap. Completed files are reported through StableFiles. Used unless watch.usePolling.
import { lstatSync, readdirSync, statSync, watch, type FSWatcher } from 'node:fs';
import { basename, join } from 'node:path';
import type { WatchConfig } from '../config/sections/watch.js';
import { compileGlobs, isIgnoredFile } from './ignore.js';
import { StableFiles } from './stable-files.js';
import type { InboxWatcher, InboxWatcherEvents } from './watcher-types.js';

/** Starts watching `inboxDir` and its sub-folders with OS events. */
export function watchInboxWithEvents(inboxDir: string, options: WatchConfig, events: InboxWatcherEvents): InboxWatcher {
  const extra = compileGlobs(options.ignoreGlobs);
  const stable = new StableFiles(options.stabilityWindowMs, options.pollIntervalMs, (path) => events.onFile(path));
  const folders = new Map<string, FSWatcher>();
  let closed = false;

  const report = (error: unknown): void => {
    if (!closed) events.onError?.(error instanceof Error ? error : new Error(String(error)));
  };

  const unwatchFolder = (dir: string): void => {
    for (const [path, watcher] of folders) {
      if (path === dir || path.startsWith(`${dir}/`) || path.startsWith(`${dir}\\`)) {
        watcher.close();
        folders.delete(path);
      }
    }
  };

  /** Looks at one path named by an event or a listing: follows new folders, tracks files. */
  const examine = (path: string, isRoot = false): void => {
    let kind: 'file' | 'folder' | 'gone' | 'other';
    let fileStat: { size: number; mtimeMs: number } | undefined;
    try {
      const link = lstatSync(path);
      const target = link.isSymbolicLink() ? statSync(path) : link;
      kind = target.isFile() ? 'file' : target.isDirectory() ? 'folder' : 'other';
      if (kind === 'file') fileStat = { size: target.size, mtimeMs: target.mtimeMs };
    } catch {
      kind = 'gone';
    }
    if (kind === 'gone') {
      stable.forget(path);
      unwatchFolder(path);
    } else if (kind === 'folder') {
      if ((isRoot || !basename(path).startsWith('.')) && !folders.has(path)) watchFolder(path);
    } else if (kind === 'file' && !isIgnoredFile(path, extra)) {
      stable.touch(path, fileStat);
    }
  };

  /** Watches one folder (before listing it, so nothing arriving meanwhile is missed) and examines its entries. */
  const watchFolder = (dir: string): void => {
    try {
      const watcher = watch(dir, { persistent: true }, (_event, name) => {
        if (closed) return;
        if (name === null) listFolder(dir);
        else examine(join(dir, name.toString()));
      });
      watcher.on('error', (error) => {
        unwatchFolder(dir);
        report(error);
      });
      folders.set(dir, watcher);
    } catch (error) {
      report(error);
      return;
    }
    listFolder(dir);
  };

  const listFolder = (dir: string): void => {
    let names: string[];
    try {
      names = readdirSync(dir);
    } catch (error) {
      if ((error as NodeJS.ErrnoException).code !== 'ENOENT') report(error);
      return;
    }
    for (const name of names) examine(join(dir, name));
  };

  examine(inboxDir, true);
  setImmediate(() => {
    if (!closed) events.onReady?.();
  });
  return {
    async close() {
      closed = true;
      for (const watcher of folders.values()) watcher.close();
      folders.clear();
      stable.close();
    },
  };
}
