// `driftlight status`: counts by state, the oldest waiting set and the last errors, from the ledger.
import type { Command } from 'commander';
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { LEDGER_FILE_NAME, openLedger } from '../store/ledger.js';
import { ledgerStatus, type LedgerStatus } from '../store/status.js';
import { openQcFlagCounts, undeliveredAlerts } from '../store/alert-outbox.js';
import { openFlagsByControl } from '../store/report-queries.js';
import type { CommandModule } from './command-module.js';
import { configFromOptions, withConfigOption } from './config-option.js';

/** What `status` adds about QC and alerts: open flags and deliveries not delivered. */
export interface AttentionStatus {
  readonly openQcFlags: { readonly info: number; readonly warning: number; readonly critical: number };
  /** Open flags per control (and the instrument scope), each rule + metric once; the status page shows the same. */
  readonly openFlagsByControl?: ReturnType<typeof openFlagsByControl>;
  readonly alerts: ReturnType<typeof undeliveredAlerts>;
}

/** The status as plain text lines. */
export function formatStatus(status: LedgerStatus, attention?: AttentionStatus): string {
  const files = Object.entries(status.files)
    .map(([k, v]) => `${k} ${v}`)
    .join(', ');
  const sets = Object.entries(status.sets)
    .map(([k, v]) => `${k} ${v}`)
    .join(', ');
  const lines = [`files: ${files}`, `sets:  ${sets}`, `results: ${status.results}`];
  lines.push(
    status.oldestWaiting === undefined
      ? 'oldest waiting set: none'
      : `oldest waiting set: ${status.oldestWaiting.setId} (${status.oldestWaiting.sampleId}, ${status.oldestWaiting.state} since ${status.oldestWaiting.createdAt})`,
  );
  if (status.lastErrors.length === 0) lines.push('last errors: none');
  else {
    lines.push('last errors:');
    for (const e of status.lastErrors) lines.push(`  ${e.at}  ${e.name}: ${e.code}: ${e.message}`);
  }
  if (attention !== undefined) {
    const flags = attention.openQcFlags;
    lines.push(`QC flags open: ${flags.critical} critical, ${flags.warning} warning, ${flags.info} info`);
    for (const { controlId, flags: open } of attention.openFlagsByControl ?? []) {
      lines.push(`  ${controlId}: ${open.length} open`);
      for (const f of open)
        lines.push(
          `    ${f.severity.padEnd(8)} ${f.ruleId} ${f.check} (${f.metric}, run ${f.acquiredAt}): ${f.message}`,
        );
    }
    const { pending, expired, latest } = attention.alerts;
    if (pending + expired === 0) lines.push('alerts not delivered: none');
    else {
      lines.push(`alerts not delivered: ${pending} still retried, ${expired} expired (given up)`);
      for (const a of latest) {
        lines.push(
          `  ${new Date(a.createdAtMs).toISOString()}  ${a.channelId}  ${a.key} (${a.severity}): ${a.status}, ${a.attempts} attempt(s): ${a.lastError ?? 'not tried yet'}`,
        );
      }
    }
  }
  return `${lines.join('\n')}\n`;
}

export const statusCommand: CommandModule = {
  register(program: Command) {
    withConfigOption(
      program
        .command('status')
        .description(
          'show counts by state, the oldest waiting set, the last errors, open QC flags and alerts not delivered',
        ),
    )
      .option('--json', 'print JSON')
      .action((options: { config?: string; json?: boolean }) => {
        const config = configFromOptions(options);
        if (!existsSync(join(config.folders.state, LEDGER_FILE_NAME))) {
          process.stdout.write(`no ledger yet in ${config.folders.state} (nothing processed)\n`);
          return;
        }
        const ledger = openLedger(config.folders.state);
        try {
          const status = ledgerStatus(ledger);
          const attention: AttentionStatus = {
            openQcFlags: openQcFlagCounts(ledger),
            openFlagsByControl: openFlagsByControl(ledger),
            alerts: undeliveredAlerts(ledger),
          };
          process.stdout.write(
            options.json === true
              ? `${JSON.stringify({ ...status, ...attention }, null, 2)}\n`
              : formatStatus(status, attention),
          );
        } finally {
          ledger.close();
        }
      });
  },
};
