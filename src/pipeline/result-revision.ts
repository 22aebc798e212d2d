// Rewriting results already written when a result stage revised them (issue 16: a late, earlier-
// acquired control re-judged later runs). The result JSON then shows the verdict as it stands, with
// the earlier flags kept in qc.history; the results index follows (sha256, flags). Atomic, like the
// first write; a file that is gone or unreadable is left alone (the ledger keeps the verdict).
import { createHash } from 'node:crypto';
import type { AnalysisResult } from '../analysis/result.js';
import { writeFileAtomicAsync } from '../output/atomic-write.js';
import { readExistingResult, serializeResult } from '../output/result-writer.js';
import type { Ledger } from '../store/ledger.js';
import { getResult, upsertResult } from '../store/results.js';
import type { ResultRevision } from './result-stage.js';

/** The result with its QC flags replaced by the revision's and the replaced ones appended to qc.history (pure). */
export function revisedResult(result: AnalysisResult, revision: ResultRevision, replacedAt: string): AnalysisResult {
  return {
    ...result,
    qc: {
      ...result.qc,
      flags: revision.qcFlags,
      history: [...(result.qc.history ?? []), { flags: result.qc.flags, replacedAt, reason: revision.reason }],
    },
  };
}

/** Same flags, in any order (rule, severity, message). O(n log n). */
function sameFlags(a: AnalysisResult['qc']['flags'], b: AnalysisResult['qc']['flags']): boolean {
  const text = (flags: AnalysisResult['qc']['flags']): string =>
    flags
      .map((flag) => `${flag.rule}|${flag.severity}|${flag.message}`)
      .sort()
      .join('\n');
  return text(a) === text(b);
}

/** Rewrites the result files of `revisions` (each whose flags changed) and updates their index rows; returns the set ids rewritten. */
export async function reviseResultFiles(
  ledger: Ledger,
  revisions: readonly ResultRevision[],
  now: Date,
): Promise<string[]> {
  const rewritten: { setId: string; sha256: string; flagsJson: string }[] = [];
  for (const revision of revisions) {
    const row = getResult(ledger, revision.setId);
    const current = row === undefined ? undefined : readExistingResult(row.path);
    if (row === undefined || current === undefined || sameFlags(current.qc.flags, revision.qcFlags)) continue;
    const text = serializeResult(revisedResult(current, revision, now.toISOString()));
    await writeFileAtomicAsync(row.path, text);
    rewritten.push({
      setId: revision.setId,
      sha256: createHash('sha256').update(text).digest('hex'),
      flagsJson: JSON.stringify(revision.qcFlags),
    });
  }
  if (rewritten.length > 0) {
    ledger.transaction(() => {
      for (const { setId, sha256, flagsJson } of rewritten) {
        const row = getResult(ledger, setId);
        if (row !== undefined) upsertResult(ledger, { ...row, resultSha256: sha256, flagsJson });
      }
    });
  }
  return rewritten.map((entry) => entry.setId);
}
