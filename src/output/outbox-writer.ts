// Outbox: corrected spectra (CSV, JCAMP-DX) and fitted decays produced by the analysis, written
// atomically under outbox/YYYY-MM-DD/<setId>/ for downstream tools.
import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { writeFileAtomic } from './atomic-write.js';
import { dayFolderName } from './dated-path.js';

/** One file the analysis produced for the outbox (text content). */
export interface OutboxArtifact {
  /** File name, e.g. `emission.corrected.csv`. */
  readonly name: string;
  readonly content: string;
}

/** Writes every artifact of a set (atomically; not fsynced: the result JSON is the durable record and outbox files are rewritten on a re-run); returns the paths written. */
export function writeOutbox(outboxDir: string, setId: string, setCreatedAt: Date, artifacts: readonly OutboxArtifact[]): string[] {
  const dir = join(outboxDir, dayFolderName(setCreatedAt), setId);
  // The set's folder is new (or there from an earlier run): made first, so no write tries and fails.
  if (artifacts.length > 0) mkdirSync(dir, { recursive: true });
  return artifacts.map((artifact) => {
    const path = join(dir, artifact.name.replace(/[/\\]/g, '_'));
    writeFileAtomic(path, artifact.content, { durable: false });
    return path;
  });
}
