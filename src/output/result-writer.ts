// Result files: results/YYYY-MM-DD/<setId>.json (day the set was measured, in the lab's zone: fixed
// by the set's files, so a re-run after a crash finds and replaces the same file rather than adding
// a second one), written atomically.
import { createHash } from 'node:crypto';
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { AnalysisResult } from '../analysis/result.js';
import { writeFileAtomicAsync } from './atomic-write.js';
import { dayFolderName } from './dated-path.js';

/** Where the result of `setId` (filed under the day of `filedAt` in `timeZone`, default UTC) lives. */
export function resultPathFor(resultsDir: string, setId: string, filedAt: Date, timeZone = 'UTC'): string {
  return join(resultsDir, dayFolderName(filedAt, timeZone), `${setId}.json`);
}

/** Serialises a result as the canonical pretty JSON written to disk. */
export function serializeResult(result: AnalysisResult): string {
  return `${JSON.stringify(result, null, 2)}\n`;
}

/** Writes the result atomically with its fsync off the event loop (and its folder's, unless `syncFolder` is false: the caller then fsyncs it once for a batch); returns its path and the sha256 of the bytes written. */
export async function writeResult(
  resultsDir: string,
  result: AnalysisResult,
  filedAt: Date,
  options: { syncFolder?: boolean; timeZone?: string } = {},
): Promise<{ path: string; sha256: string }> {
  const path = resultPathFor(resultsDir, result.setId, filedAt, options.timeZone);
  const text = serializeResult(result);
  await writeFileAtomicAsync(path, text, options);
  return { path, sha256: createHash('sha256').update(text).digest('hex') };
}

/** Reads an existing result file for a set, if one is there (crash recovery: detect, never duplicate). */
export function readExistingResult(path: string): AnalysisResult | undefined {
  if (!existsSync(path)) return undefined;
  try {
    const parsed = JSON.parse(readFileSync(path, 'utf8')) as { schema?: unknown };
    return parsed.schema === 'driftlight.result/1' ? (parsed as AnalysisResult) : undefined;
  } catch {
    return undefined;
  }
}
