// The polling inbox watcher (chokidar with usePolling, for network shares where OS events do not
// arrive): reports each file once its size has been stable for the configured window, including
// nested folders. Hidden and temporary files are ignored; I/O errors are reported as events.
import { watch, type FSWatcher } from 'chokidar';
import type { WatchConfig } from '../config/sections/watch.js';
import { compileGlobs, isIgnoredFile, isInHiddenFolder } from './ignore.js';
import type { InboxWatcher, InboxWatcherEvents } from './watcher-types.js';

/** Starts polling `inboxDir` with the `watch` config section. */
export function watchInboxByPolling(inboxDir: string, options: WatchConfig, events: InboxWatcherEvents): InboxWatcher {
  const extra = compileGlobs(options.ignoreGlobs);
  const watcher: FSWatcher = watch(inboxDir, {
    persistent: true,
    ignoreInitial: false,
    usePolling: true,
    // Links are not followed (they may lead outside the inbox): each is reported as a file, and
    // intake refuses it or takes what it points to (watch.symlinks).
    followSymlinks: false,
    interval: options.pollIntervalMs,
    awaitWriteFinish: { stabilityThreshold: options.stabilityWindowMs, pollInterval: options.pollIntervalMs },
    ignored: (path, stats) => {
      if (path === inboxDir) return false;
      if (isInHiddenFolder(path, inboxDir)) return true;
      if (stats?.isFile() === true) return isIgnoredFile(path, extra);
      return false;
    },
  });
  watcher.on('add', (path) => events.onFile(path));
  watcher.on('change', (path) => events.onFile(path));
  watcher.on('ready', () => events.onReady?.());
  watcher.on('error', (error) => events.onError?.(error instanceof Error ? error : new Error(String(error))));
  return {
    async close() {
      await watcher.close();
    },
  };
}
