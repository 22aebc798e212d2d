// A demo workspace (the bundled example day run through the real pipeline) with an invented QC history
// of the demo control "teal" added to its ledger: the input of the chart, export, digest and status tests.
import { appendFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { openLedger } from '../../src/store/ledger.js';
import { seedQcHistory, tealRuleSet, TEAL_RULES_YAML, type HistoryOptions } from '../../bench/lib/qc-history.js';
import { runDriftlight } from './cli.js';
import { tempDir } from './temp-dir.js';

/** Runs `driftlight demo` into a new temp folder and seeds the QC history (30 days up to 2026-12-05 unless told); returns the workspace and its config path. */
export function faceWorkspace(history: Partial<HistoryOptions> = {}): { dir: string; config: string } {
  const dir = join(tempDir('driftlight-face-'), 'ws');
  const demo = runDriftlight(['demo', '--workspace', dir]);
  if (demo.status !== 0) throw new Error(`demo failed: ${demo.stderr}`);
  const config = join(dir, 'driftlight.yaml');
  writeFileSync(join(dir, 'teal-rules.yaml'), TEAL_RULES_YAML);
  appendFileSync(config, 'rules: { file: teal-rules.yaml }\n');
  const ledger = openLedger(join(dir, 'state'));
  try {
    seedQcHistory(ledger, tealRuleSet(), { days: 30, endDay: '2026-12-05', shiftFromDay: 24, shiftSd: 2.5, rebaselineDay: 15, ...history });
  } finally {
    ledger.close();
  }
  return { dir, config };
}
