// Job processor for every queue backend: runs the pure analyze() on one self-contained payload.
// Loaded by the in-process worker-thread pool and by BullMQ worker processes (dist/workers/analyze-job.js).
import { analyze } from '../src/analysis/analyze.js';
import type { AnalysisJobPayload, AnalysisOutput } from '../src/analysis/payload.js';

/** Analyses one measurement set payload and returns its result and outbox artifacts. */
export default function analyzeJob(payload: AnalysisJobPayload): AnalysisOutput {
  return analyze(payload);
}
