// Builders for QC integration tests: stored-result JSON of a daily control as the pipeline writes it.
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import type { AnalysisResult } from '../../src/analysis/result.js';

/** A control result of day `dayIndex` after 2026-03-02 (a Monday), 08:00 UTC, with the given yield. */
export function controlResult(dayIndex: number, quantumYield: number, sampleId = 'CTRL-FLU-A'): AnalysisResult {
  const acquiredAt = new Date(Date.UTC(2026, 2, 2 + dayIndex, 8)).toISOString();
  return {
    schema: 'driftlight.result/1',
    setId: `ctrl-${String(dayIndex).padStart(3, '0')}`,
    role: 'control',
    sampleId,
    acquiredAt,
    partial: false,
    missing: [],
    spectra: {},
    corrections: [],
    quantumYield: {
      value: quantumYield,
      standardUncertainty: 0.01,
      budget: [],
      standardId: 'quinine-hclo4',
      warnings: [],
    },
    warnings: [],
    qc: { flags: [] },
    provenance: { inputs: [], configHash: 'test', softwareVersion: '0.1.0', corrections: [], analyzedAt: acquiredAt },
  };
}

/** Yields of 20 baseline days around 0.925 (SD ≈ 0.0103), fixed so tests are deterministic. */
export const BASELINE_YIELDS = [
  0.93, 0.92, 0.935, 0.915, 0.925, 0.94, 0.91, 0.928, 0.922, 0.931, 0.919, 0.926, 0.924, 0.933, 0.917, 0.927, 0.923,
  0.936, 0.914, 0.925,
];

/** Writes results as results/YYYY-MM-DD/SETID.json under `resultsDir`. */
export function writeResults(resultsDir: string, results: readonly AnalysisResult[]): void {
  for (const result of results) {
    const day = (result.acquiredAt ?? '').slice(0, 10);
    mkdirSync(join(resultsDir, day), { recursive: true });
    writeFileSync(join(resultsDir, day, `${result.setId}.json`), `${JSON.stringify(result, null, 2)}\n`);
  }
}
