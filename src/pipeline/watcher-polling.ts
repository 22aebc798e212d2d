// The polling inbox watcher (chokidar with usePolling, for network shares where OS events do not
// arrive): reports each file once its size has been stable for the configured window, including
// nested folders. Hidden and temporary files are ignored; I/O errors are reported as events.
// chokidar never reports a symbolic link whose target is missing (its stat follows the link), so the
// inbox tree is listed for such links at start and every watch.rescanIntervalMs; each is reported
// once, for intake to refuse (SYMLINK_REFUSED), instead of lying in the inbox unseen.
import { lstatSync, readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { watch, type FSWatcher } from 'chokidar';
import { isGoneError } from '../output/fs-errors.js';
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
  const reportError = (error: unknown): void =>
    events.onError?.(error instanceof Error ? error : new Error(String(error)));
  /** Broken links reported and still present. */
  const reportedLinks = new Set<string>();
  const reportBrokenLinks = (): void => {
    const present = brokenLinksUnder(inboxDir, extra, reportError);
    for (const path of reportedLinks) if (!present.includes(path)) reportedLinks.delete(path);
    for (const path of present) {
      if (reportedLinks.has(path)) continue;
      reportedLinks.add(path);
      events.onFile(path);
    }
  };
  const linkTimer = setInterval(reportBrokenLinks, options.rescanIntervalMs);
  linkTimer.unref();
  watcher.on('add', (path) => events.onFile(path));
  watcher.on('change', (path) => events.onFile(path));
  watcher.on('ready', () => {
    reportBrokenLinks();
    events.onReady?.();
  });
  watcher.on('error', reportError);
  return {
    async close() {
      clearInterval(linkTimer);
      await watcher.close();
    },
  };
}

/** Symbolic links below `root` (not in hidden folders, not ignored) whose target is missing or a loop; folders are listed without following links. */
function brokenLinksUnder(root: string, extra: readonly RegExp[], onError: (error: unknown) => void): string[] {
  const found: string[] = [];
  const walk = (dir: string): void => {
    let names: string[];
    try {
      names = readdirSync(dir);
    } catch (error) {
      if (!isGoneError(error)) onError(error);
      return;
    }
    for (const name of names) {
      const path = join(dir, name);
      let link;
      try {
        link = lstatSync(path, { throwIfNoEntry: false });
      } catch (error) {
        if (!isGoneError(error)) onError(error);
        continue;
      }
      if (link?.isDirectory() === true && !name.startsWith('.')) walk(path);
      if (link?.isSymbolicLink() !== true || isIgnoredFile(path, extra)) continue;
      try {
        statSync(path);
      } catch (error) {
        // ENOENT: dangling; ELOOP: a loop. Both are what intake refuses with its reason.
        const code = (error as NodeJS.ErrnoException).code;
        if (isGoneError(error) || code === 'ELOOP') found.push(path);
        else onError(error);
      }
    }
  };
  walk(root);
  return found;
}
