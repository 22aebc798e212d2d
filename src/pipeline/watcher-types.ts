// What an inbox watcher reports and how it is stopped (shared by the event and polling watchers).

export interface InboxWatcherEvents {
  /** A file is complete (stable) and ready to read. */
  readonly onFile: (path: string) => void;
  /** The initial scan has finished (every file present at start has been reported or is settling). */
  readonly onReady?: () => void;
  readonly onError?: (error: Error) => void;
  /** The periodic rescan found files the OS events had not reported (lost events); they are settling now and are reported through onFile. */
  readonly onMissed?: (paths: readonly string[]) => void;
}

export interface InboxWatcher {
  close(): Promise<void>;
}
