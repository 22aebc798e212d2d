// Job processor for every queue backend: runs the pure analyze() on one self-contained payload.
// Loaded by the in-process worker-thread pool and by BullMQ worker processes (dist/workers/analyze-job.js).
import { performance } from 'node:perf_hooks';
import { analyze } from '../src/analysis/analyze.js';
import type { AnalysisJobPayload, AnalysisOutput } from '../src/analysis/payload.js';

/** Analyses one measurement set payload and returns its result, outbox artifacts and how long the analysis took (ms, wall time). */
export default function analyzeJob(payload: AnalysisJobPayload): AnalysisOutput {
  const startedMs = performance.now();
  const output = analyze(payload);
  return { ...output, analysisDurationMs: performance.now() - startedMs };
}
