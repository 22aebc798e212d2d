// The inbox watcher (chokidar): reports each file once its size has been stable for the configured
// window (so a file still being written is never read), including files that arrived while
// driftlight was down (the initial scan) and files in nested folders. Hidden and temporary files
// are ignored. I/O errors are reported as events, never thrown across the loop.
import { watch, type FSWatcher } from 'chokidar';
import type { WatchConfig } from '../config/sections/watch.js';
import { compileGlobs, isIgnoredFile, isInHiddenFolder } from './ignore.js';

export interface InboxWatcherEvents {
  /** A file is complete (stable) and ready to read. */
  readonly onFile: (path: string) => void;
  /** The initial scan has finished (every file present at start has been reported or is settling). */
  readonly onReady?: () => void;
  readonly onError?: (error: Error) => void;
}

export interface InboxWatcher {
  close(): Promise<void>;
}

/** Starts watching `inboxDir` with the `watch` config section. */
export function watchInbox(inboxDir: string, options: WatchConfig, events: InboxWatcherEvents): InboxWatcher {
  const extra = compileGlobs(options.ignoreGlobs);
  const watcher: FSWatcher = watch(inboxDir, {
    persistent: true,
    ignoreInitial: false,
    usePolling: options.usePolling,
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
