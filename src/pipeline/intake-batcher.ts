// Hands stable files to the coordinator in batches: every file reported while the previous batch
// waited or ran goes into the next one, so a burst costs one ledger transaction per chunk of files
// instead of one per file, and a lone file is still taken at once.

/** Returns the watcher's onFile callback: paths collect until `schedule` runs `intakeMany` on all of them. */
export function batchStableFiles(
  schedule: (work: () => Promise<void>) => void,
  intakeMany: (paths: string[]) => Promise<unknown>,
): (path: string) => void {
  const waiting: string[] = [];
  return (path) => {
    waiting.push(path);
    if (waiting.length === 1)
      schedule(async () => {
        await intakeMany(waiting.splice(0));
      });
  };
}
