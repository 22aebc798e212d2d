// Config section `watch`: how the inbox watcher decides that a file is completely written.
import { z } from 'zod';

export const watchSection = z
  .strictObject({
    stabilityWindowMs: z
      .number()
      .int()
      .min(10)
      .max(600_000)
      .default(2000)
      .describe('A file is read only after its size has not changed for this long, in ms. Default: 2000'),
    pollIntervalMs: z
      .number()
      .int()
      .min(10)
      .max(60_000)
      .default(100)
      .describe('How often the size of a growing file is checked, in ms. Default: 100'),
    rescanIntervalMs: z
      .number()
      .int()
      .min(100)
      .max(3_600_000)
      .default(30_000)
      .describe(
        'How often `watch` re-lists the inbox tree (files whose OS events were lost), takes again files whose intake failed, and finishes file moves that had failed, in ms. Default: 30000',
      ),
    usePolling: z
      .boolean()
      .default(false)
      .describe('Poll the folder instead of using OS events (network shares). Default: false'),
    symlinks: z
      .enum(['refuse', 'inside-inbox'])
      .default('refuse')
      .describe(
        'Symbolic links in the inbox: `refuse` quarantines every link (the link itself; what it points to is never read or moved); `inside-inbox` takes a link to a file whose real path lies inside the inbox as that file (the link is removed) and refuses the others. Links to folders are never followed. Default: refuse',
      ),
    ignoreGlobs: z
      .array(z.string())
      .default([])
      .describe(
        'Extra file-name patterns to ignore (* and ? wildcards) on top of hidden and temporary files. Default: []',
      ),
  })
  .prefault({});

export type WatchConfig = z.output<typeof watchSection>;
