// The inbox watcher: reports each file once its size has been stable for the configured window (so
// a file still being written is never read), including files that arrived while driftlight was down
// (the initial scan) and files in nested folders. Hidden and temporary files are ignored. I/O errors
// are reported as events, never thrown across the loop. OS events by default (watcher-events.ts);
// polling with watch.usePolling (watcher-polling.ts).
import type { WatchConfig } from '../config/sections/watch.js';
import type { InboxWatcher, InboxWatcherEvents } from './watcher-types.js';
import { watchInboxWithEvents } from './watcher-events.js';
import { watchInboxByPolling } from './watcher-polling.js';

export type { InboxWatcher, InboxWatcherEvents } from './watcher-types.js';

/** Starts watching `inboxDir` with the `watch` config section. */
export function watchInbox(inboxDir: string, options: WatchConfig, events: InboxWatcherEvents): InboxWatcher {
  return options.usePolling
    ? watchInboxByPolling(inboxDir, options, events)
    : watchInboxWithEvents(inboxDir, options, events);
}
