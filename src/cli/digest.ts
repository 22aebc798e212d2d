// `driftlight digest [--date YYYY-MM-DD]`: builds the daily digest of a day (default yesterday in the
// digest's time zone) on demand, writes it under results/digest/ and e-mails it when configured.
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { InvalidArgumentError, type Command } from 'commander';
import { buildDigest } from '../output/digest-build.js';
import { startDigestSchedule, type DigestSchedule } from '../output/digest-schedule.js';
import type { Pipeline } from '../pipeline/runtime.js';
import { digestTimeZone, localDate, previousDay } from '../output/digest-gather.js';
import { effectiveRuleSet } from '../pipeline/qc-rule-set.js';
import { LEDGER_FILE_NAME, openLedger } from '../store/ledger.js';
import type { CommandModule } from './command-module.js';
import { configFromOptions, withConfigOption } from './config-option.js';
import { softwareVersion } from './version.js';

function parseDate(text: string): string {
  if (!/^\d{4}-\d{2}-\d{2}$/.test(text) || Number.isNaN(Date.parse(`${text}T00:00:00Z`)))
    throw new InvalidArgumentError('expected a date YYYY-MM-DD');
  return text;
}

/** Builds the digest; returns the lines to print. */
export async function runDigest(options: { config?: string; date?: string }, now: Date = new Date()): Promise<string> {
  const config = configFromOptions(options);
  const ruleSet = effectiveRuleSet(config);
  const date = options.date ?? previousDay(localDate(now, digestTimeZone(config, ruleSet)));
  if (!existsSync(join(config.folders.state, LEDGER_FILE_NAME)))
    return `no ledger yet in ${config.folders.state} (nothing processed)\n`;
  const ledger = openLedger(config.folders.state);
  try {
    const outcome = await buildDigest(ledger, config, ruleSet, { date, now, softwareVersion: softwareVersion() });
    return [
      `digest ${outcome.date}: ${outcome.figures} charts`,
      ...outcome.paths.map((p) => `  ${p}`),
      `  e-mail: ${outcome.email}`,
      '',
    ].join('\n');
  } finally {
    ledger.close();
  }
}

export const digestCommand: CommandModule = {
  register(program: Command) {
    withConfigOption(
      program
        .command('digest')
        .description(
          'build the daily digest (HTML with charts, Markdown, JSON, CSV) of a day under results/digest/; e-mail it when digest.emailChannel is set',
        ),
    )
      .option('--date <YYYY-MM-DD>', 'the day (in digest.timeZone); default yesterday', parseDate)
      .action(async (options: { config?: string; date?: string }) => {
        process.stdout.write(await runDigest(options));
      });
  },
};

/** For `watch`: the daily digest schedule when digest.enabled (builds through the pipeline's ledger; failures logged). */
export function startWatchDigest(pipeline: Pipeline): DigestSchedule | undefined {
  const { config, ledger, logger } = pipeline;
  if (!config.digest.enabled) return undefined;
  const ruleSet = effectiveRuleSet(config);
  const timeZone = digestTimeZone(config, ruleSet);
  const schedule = startDigestSchedule({
    config,
    ruleSet,
    timeZone,
    build: async (date) => {
      const outcome = await buildDigest(ledger, config, ruleSet, {
        date,
        now: new Date(),
        softwareVersion: softwareVersion(),
      });
      logger.info({ event: 'digest.built', date, files: outcome.paths, email: outcome.email }, 'digest built');
    },
    onError: (error, date) => logger.error({ err: error, date }, 'digest failed'),
  });
  logger.info({ nextDigestAt: schedule.nextRun()?.toISOString(), timeZone }, 'daily digest scheduled');
  return schedule;
}
