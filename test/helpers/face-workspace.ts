// A workspace (the bundled example day run through the real pipeline by `process`) with an invented QC history
// of the demo control "teal" added to its ledger: the input of the chart, export, digest and status tests.
import { appendFileSync, cpSync, mkdirSync, writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { join } from 'node:path';
import { openLedger } from '../../src/store/ledger.js';
import { seedQcHistory, tealRuleSet, TEAL_RULES_YAML, type HistoryOptions } from '../../bench/lib/qc-history.js';
import { runDriftlight } from './cli.js';
import { tempDir } from './temp-dir.js';

/** Runs `driftlight process` over the bundled example day in a new temp folder and seeds the QC history (30 days up to 2026-12-05 unless told); returns the workspace and its config path. */
export function faceWorkspace(history: Partial<HistoryOptions> = {}): { dir: string; config: string } {
  const dir = join(tempDir('driftlight-face-'), 'ws');
  const exampleDay = fileURLToPath(new URL('../../examples/day/', import.meta.url));
  mkdirSync(dir, { recursive: true });
  cpSync(join(exampleDay, 'driftlight.yaml'), join(dir, 'driftlight.yaml'));
  cpSync(join(exampleDay, 'inbox'), join(dir, 'inbox'), { recursive: true });
  const config = join(dir, 'driftlight.yaml');
  // The example day holds one malformed export on purpose, so `process` exits 3 (rejected input).
  const run = runDriftlight(['process', join(dir, 'inbox'), '--config', config]);
  if (run.status !== 0 && run.status !== 3 && run.status !== 4)
    throw new Error(`process failed (${String(run.status)}): ${run.stderr}`);
  writeFileSync(join(dir, 'teal-rules.yaml'), TEAL_RULES_YAML);
  appendFileSync(config, 'rules: { file: teal-rules.yaml }\n');
  const ledger = openLedger(join(dir, 'state'));
  try {
    seedQcHistory(ledger, tealRuleSet(), {
      days: 30,
      endDay: '2026-12-05',
      shiftFromDay: 24,
      shiftSd: 2.5,
      rebaselineDay: 15,
      ...history,
    });
  } finally {
    ledger.close();
  }
  return { dir, config };
}
