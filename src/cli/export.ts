// `driftlight export --since DATE [--until DATE] --format csv|json [--out FILE]`: the summary table,
// one row per set, from the result JSON files, for a spreadsheet or a LIMS.
import { InvalidArgumentError, type Command } from 'commander';
import { writeFileAtomic } from '../output/atomic-write.js';
import { readSummaryRows, summaryCsv, summaryJson } from '../output/summary-table.js';
import type { CommandModule } from './command-module.js';
import { configFromOptions, withConfigOption } from './config-option.js';

interface ExportOptions {
  readonly config?: string;
  readonly since: number;
  readonly until?: number;
  readonly format: 'csv' | 'json';
  readonly out?: string;
}

/** YYYY-MM-DD (midnight UTC) or an ISO date-time with offset, as epoch ms. */
export function parseDateOption(text: string): number {
  const iso = /^\d{4}-\d{2}-\d{2}$/.test(text) ? `${text}T00:00:00Z` : text;
  const epochMs = /^\d{4}-\d{2}-\d{2}(T.*(Z|[+-]\d{2}:\d{2}))?$/.test(iso) ? Date.parse(iso) : Number.NaN;
  if (!Number.isFinite(epochMs))
    throw new InvalidArgumentError('expected YYYY-MM-DD (UTC midnight) or an ISO date-time with Z or an offset');
  return epochMs;
}

function parseFormat(text: string): 'csv' | 'json' {
  if (text !== 'csv' && text !== 'json') throw new InvalidArgumentError('expected csv or json');
  return text;
}

/** Runs the export; returns the text for stdout and the warnings for stderr. */
export function runExport(options: ExportOptions): { stdout: string; stderr: string } {
  const config = configFromOptions(options);
  const { rows, skipped } = readSummaryRows(config.folders.results, options.since, options.until ?? Infinity);
  const text = options.format === 'csv' ? summaryCsv(rows) : summaryJson(rows);
  const stderr = skipped.map((s) => `skipped ${s.path}: ${s.reason}\n`).join('');
  if (options.out === undefined) return { stdout: text, stderr };
  writeFileAtomic(options.out, text, { durable: false });
  return { stdout: `wrote ${options.out} (${rows.length} set${rows.length === 1 ? '' : 's'})\n`, stderr };
}

export const exportCommand: CommandModule = {
  register(program: Command) {
    withConfigOption(
      program
        .command('export')
        .description(
          'summary table, one row per set (sample, role, acquisition time, Φ ± u, τ ± u per component, mean τ, k_r, k_nr, τ0, flags, result path)',
        ),
    )
      .requiredOption(
        '--since <date>',
        'sets acquired at or after this date (YYYY-MM-DD = midnight UTC, or ISO date-time); analysis time when a set has no acquisition time',
        parseDateOption,
      )
      .option('--until <date>', 'sets acquired before this date (same forms)', parseDateOption)
      .option('--format <format>', 'csv or json', parseFormat, 'csv')
      .option('--out <file>', 'write to this file instead of stdout')
      .action((options: ExportOptions) => {
        const { stdout, stderr } = runExport(options);
        process.stderr.write(stderr);
        process.stdout.write(stdout);
      });
  },
};
