// Benchmark of the daily digest over a 60-day history: the demo day run through the real pipeline in
// a temp workspace, 60 days of invented control runs and instrument checks (with the flags the real
// rules raise) added to its ledger, then the digest built three times (gather → render → write).
// One JSON line out: build time per round and the median, HTML/JSON/Markdown sizes, charts.
// Run: npm run build && node dist/bench/run.js digest
import { spawnSync } from 'node:child_process';
import { appendFileSync, mkdtempSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { loadConfig } from '../src/config/index.js';
import { buildDigest } from '../src/output/digest-build.js';
import { effectiveRuleSet } from '../src/pipeline/qc-rule-set.js';
import { openLedger } from '../src/store/ledger.js';
import { seedQcHistory, tealRuleSet, TEAL_RULES_YAML } from './lib/qc-history.js';

const HISTORY_DAYS = 60;
const ROUNDS = 3;
const CLI = fileURLToPath(new URL('../../bin/driftlight.js', import.meta.url));

async function main(): Promise<void> {
  const root = mkdtempSync(join(tmpdir(), 'driftlight-bench-digest-'));
  try {
    const dir = join(root, 'ws');
    const demo = spawnSync(process.execPath, [CLI, 'demo', '--workspace', dir], { encoding: 'utf8' });
    if (demo.status !== 0) throw new Error(`demo failed: ${demo.stderr}`);
    const configPath = join(dir, 'driftlight.yaml');
    writeFileSync(join(dir, 'teal-rules.yaml'), TEAL_RULES_YAML);
    appendFileSync(configPath, 'rules: { file: teal-rules.yaml }\n');
    const date = new Date().toISOString().slice(0, 10);
    const config = loadConfig(configPath);
    const ledger = openLedger(config.folders.state);
    try {
      seedQcHistory(ledger, tealRuleSet(), {
        days: HISTORY_DAYS,
        endDay: date,
        shiftFromDay: 50,
        shiftSd: 2,
        rebaselineDay: 30,
      });
      const ruleSet = effectiveRuleSet(config);
      const roundsMs: number[] = [];
      let figures = 0;
      for (let round = 0; round < ROUNDS; round++) {
        const start = performance.now();
        const outcome = await buildDigest(ledger, config, ruleSet, { date, now: new Date(), softwareVersion: 'bench' });
        roundsMs.push(Math.round(performance.now() - start));
        figures = outcome.figures;
      }
      const size = (ext: string): number => statSync(join(config.folders.results, 'digest', `${date}.${ext}`)).size;
      const sorted = [...roundsMs].sort((a, b) => a - b);
      process.stdout.write(
        `${JSON.stringify({
          bench: 'digest',
          historyDays: HISTORY_DAYS,
          controlRuns: HISTORY_DAYS + 1,
          instrumentChecks: HISTORY_DAYS,
          charts: figures,
          buildMs: roundsMs,
          medianBuildMs: sorted[Math.floor(sorted.length / 2)],
          htmlBytes: size('html'),
          jsonBytes: size('json'),
          markdownBytes: size('md'),
        })}\n`,
      );
    } finally {
      ledger.close();
    }
  } finally {
    rmSync(root, { recursive: true, force: true });
  }
}

await main();
