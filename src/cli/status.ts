// `driftlight status`: counts by state, the oldest waiting set and the last errors, from the ledger.
import type { Command } from 'commander';
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { LEDGER_FILE_NAME, openLedger } from '../store/ledger.js';
import { ledgerStatus, type LedgerStatus } from '../store/status.js';
import type { CommandModule } from './command-module.js';
import { configFromOptions, withConfigOption } from './config-option.js';

/** The status as plain text lines. */
export function formatStatus(status: LedgerStatus): string {
  const files = Object.entries(status.files).map(([k, v]) => `${k} ${v}`).join(', ');
  const sets = Object.entries(status.sets).map(([k, v]) => `${k} ${v}`).join(', ');
  const lines = [`files: ${files}`, `sets:  ${sets}`, `results: ${status.results}`];
  lines.push(status.oldestWaiting === undefined ? 'oldest waiting set: none'
    : `oldest waiting set: ${status.oldestWaiting.setId} (${status.oldestWaiting.sampleId}, ${status.oldestWaiting.state} since ${status.oldestWaiting.createdAt})`);
  if (status.lastErrors.length === 0) lines.push('last errors: none');
  else {
    lines.push('last errors:');
    for (const e of status.lastErrors) lines.push(`  ${e.at}  ${e.name}: ${e.code}: ${e.message}`);
  }
  return `${lines.join('\n')}\n`;
}

export const statusCommand: CommandModule = {
  register(program: Command) {
    withConfigOption(program.command('status').description('show counts by state, the oldest waiting set and the last errors'))
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
          process.stdout.write(options.json === true ? `${JSON.stringify(status, null, 2)}\n` : formatStatus(status));
        } finally {
          ledger.close();
        }
      });
  },
};
