// `driftlight demo [--keep DIR]`: a month of an invented lab's exports (src/demo/month.ts: faults
// injected on known days) replayed through the real watch loop with an accelerated clock and a
// local webhook receiver; prints one line per day, then a summary: sets, rejected files and why,
// alerts with their days, where the results, the last day's digest, the control chart and the summary
// CSV are. --serve then serves the status page on loopback until Ctrl-C. Without --keep the workspace
// is removed at the end.
import type { Command } from 'commander';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { loadConfig } from '../config/index.js';
import { MONTH_DAYS, monthDate } from '../demo/month.js';
import { effectiveRuleSet } from '../pipeline/qc-rule-set.js';
import { resolveServerOptions, startStatusServer } from '../server/index.js';
import { openLedger } from '../store/ledger.js';
import type { CommandModule } from './command-module.js';
import { runDemoMonth, type DemoRunReport } from './demo-run.js';
import { EXIT_CODES } from './exit-codes.js';
import { untilSignal } from './serve.js';
import { softwareVersion } from './version.js';

/** The summary printed after the replay. */
export function demoSummary(report: DemoRunReport, kept: boolean): string {
  const lines: string[] = [];
  const { truth } = report.month;
  lines.push(
    '',
    `driftlight demo: ${truth.lab}, ${report.month.arrivals.length} files over 30 days, replayed in ${(report.elapsedMs / 1000).toFixed(1)} s`,
  );
  lines.push(
    `sets processed: ${report.setsProcessed} (${report.setsPartial} partial: a part missing, flagged in the result)`,
  );
  lines.push(`rejected files: ${report.rejected.length}`);
  for (const r of report.rejected) lines.push(`  ${r.file}: ${r.code} (${r.message})`);
  const flags = report.alerts.filter((a) => a.payload['type'] !== 'recovery');
  lines.push(`alerts sent to the webhook: ${flags.length} (+ ${report.alerts.length - flags.length} recovery notices)`);
  for (const a of report.alerts) {
    const p = a.payload;
    lines.push(
      `  day ${String(a.day).padStart(2)}  ${String(p['type']).padEnd(8)} ${String(p['severity']).padEnd(8)} ${String(p['ruleId'])} on ${String(p['metric'])} (run of ${String(p['acquiredAt']).slice(0, 10)})`,
    );
  }
  lines.push('injected faults (truth):');
  for (const f of truth.faults) lines.push(`  from day ${f.fromDay}: ${f.description}`);
  lines.push(
    `  day ${truth.malformed.day}: malformed export ${truth.malformed.file}; day ${truth.missingIrf.day}: decay without IRF (${truth.missingIrf.sampleId});` +
      ` day ${truth.lateReExport.arrivesDay}: day-${truth.lateReExport.acquiredDay} control re-exported; day ${truth.europeanDate.day}: date written ${truth.europeanDate.written}`,
  );
  const w = report.workspace;
  lines.push(kept ? `workspace: ${w}` : `workspace removed (${w}); run \`driftlight demo --keep DIR\` to keep it`);
  lines.push(
    `  results:    ${join(w, 'results')}`,
    `  quarantine: ${join(w, 'quarantine')}`,
    `  outbox:     ${join(w, 'outbox')}`,
    `  truth:      ${join(w, 'truth.json')}`,
    `  webhook:    ${join(w, 'webhook-received.json')} (every alert POST the local receiver got)`,
  );
  const o = report.outputs;
  lines.push(
    `  digest:     ${o.digestHtml} (the last day, ${o.digestCharts} charts)`,
    `  chart:      ${o.chartHtml}`,
    `  summary:    ${o.summaryCsv}`,
  );
  if (!kept) lines.push('  (these files go with the workspace; add --keep DIR to open them afterwards)');
  return `${lines.join('\n')}\n`;
}

/** Serves the status page over the demo workspace on loopback until SIGINT/SIGTERM; the page's clock stands at the replay's end. */
async function serveDemo(report: DemoRunReport): Promise<void> {
  const config = loadConfig(join(report.workspace, 'driftlight.yaml'));
  const ledger = openLedger(config.folders.state);
  try {
    const replayEnd = new Date(`${monthDate(MONTH_DAYS)}T23:59:00Z`);
    const server = await startStatusServer(resolveServerOptions({ listen: '127.0.0.1:0', env: {} }), {
      ledger,
      config,
      ruleSet: effectiveRuleSet(config),
      softwareVersion: softwareVersion(),
      now: () => replayEnd,
    });
    process.stdout.write(
      `status page: ${server.url} (the page's clock stands at ${replayEnd.toISOString()}; Ctrl-C stops)\n`,
    );
    const signal = await untilSignal();
    process.stdout.write(`${signal}: status page stopped\n`);
    await server.close();
  } finally {
    ledger.close();
  }
}

export const demoCommand: CommandModule = {
  register(program: Command) {
    program
      .command('demo')
      .description(
        'replay a month of an invented lab (faults injected) through the watch loop, with alerts to a local webhook',
      )
      .option(
        '--keep <dir>',
        'run in this folder and leave it there (created; replaced if it is an earlier demo workspace)',
      )
      .option('--seed <n>', 'seed of the scenario (same seed, same files)', (text: string) => Number.parseInt(text, 10))
      .option('--serve', 'after the replay, serve the status page on loopback (127.0.0.1, a free port) until Ctrl-C')
      .action(async (options: { keep?: string; seed?: number; serve?: boolean }) => {
        const dir =
          options.keep === undefined
            ? join(mkdtempSync(join(tmpdir(), 'driftlight-demo-')), 'workspace')
            : resolve(options.keep);
        process.stdout.write(`driftlight demo: replaying 30 days into ${dir}\n`);
        try {
          const report = await runDemoMonth(dir, (line) => process.stdout.write(`${line}\n`), options.seed);
          process.stdout.write(demoSummary(report, options.keep !== undefined));
          if (options.serve === true) await serveDemo(report);
        } finally {
          if (options.keep === undefined) rmSync(join(dir, '..'), { recursive: true, force: true });
        }
        process.exitCode = EXIT_CODES.ok.code;
      });
  },
};
