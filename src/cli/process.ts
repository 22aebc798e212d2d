// `driftlight process PATH...`: one batch over the given files or folders, then exit. Sets still
// incomplete at the end of the batch are paired and processed (partial when parts stay missing).
import type { Command } from 'commander';
import { existsSync } from 'node:fs';
import { ConfigInvalid } from '../model/errors.js';
import { createLogger } from '../output/logger.js';
import { openPipeline } from '../pipeline/runtime.js';
import type { CommandModule } from './command-module.js';
import { collectFiles } from './collect-files.js';
import { configFromOptions, withConfigOption, withRedisOption, type ConfigCliOptions } from './config-option.js';
import { EXIT_CODES } from './exit-codes.js';
import { createProgress } from './progress.js';
import { softwareVersion } from './version.js';

export interface BatchSummary {
  readonly files: number;
  readonly accepted: number;
  readonly rejected: number;
  readonly sets: number;
  readonly done: number;
  readonly partial: number;
  readonly failed: number;
  /** Files whose intake failed for a reason that is not the file's (I/O or ledger error): left where they are, taken at the next run. */
  readonly notTaken: number;
  /** Sets analysed whose result could not be committed (results folder not writable, disk full): still queued, run again at the next run. */
  readonly notCommitted: number;
}

/** Runs one batch over `paths` with the config file `configFile`; returns the summary (also printed). */
export async function runBatch(paths: readonly string[], options: ConfigCliOptions & { verbose?: boolean }, stdout: NodeJS.WritableStream = process.stdout): Promise<BatchSummary> {
  const config = configFromOptions(options);
  for (const p of paths) if (!existsSync(p)) throw new ConfigInvalid(`no such file or folder: ${p}`, { hint: 'Pass existing files or folders to `driftlight process`.' });
  const logger = createLogger({ ...config.logging, stdout: options.verbose === true ? config.logging.stdout : 'off' }, config.logFile);
  const pipeline = openPipeline(config, { softwareVersion: softwareVersion(), logger, command: 'process' });
  const { coordinator } = pipeline;
  try {
    await coordinator.recover();
    const files = collectFiles(paths);
    const progress = createProgress('processing');
    let committed = 0;
    coordinator.onCommitted(() => {
      committed += 1;
      progress.update(committed, Math.max(coordinator.counts.setsDispatched, committed));
    });
    coordinator.holdDispatch = true;
    const notTaken = await coordinator.intakeMany(files);
    await coordinator.tick(true);
    await coordinator.drain();
    progress.finish();
    const c = coordinator.counts;
    const summary: BatchSummary = {
      files: files.length, accepted: c.filesAccepted, rejected: c.filesRejected,
      sets: c.setsDispatched, done: c.setsDone, partial: c.setsPartial, failed: c.setsFailed, notTaken: notTaken.length, notCommitted: c.setsNotCommitted,
    };
    stdout.write(
      `driftlight process: ${summary.files} files, ${summary.accepted} accepted, ${c.filesRejected} rejected; ` +
        `${summary.sets} sets: ${summary.done} done (${summary.partial} partial), ${summary.failed} failed\n` +
        `  results:    ${config.folders.results}\n  outbox:     ${config.folders.outbox}\n` +
        `  archive:    ${config.folders.archive}\n  quarantine: ${config.folders.quarantine}\n` +
        (notTaken.length === 0 ? '' : `  not taken:  ${notTaken.length} file(s) could not be read or recorded (left where they are; the reason is in ${config.logFile}); run again: ${notTaken.slice(0, 3).join(', ')}${notTaken.length > 3 ? ', …' : ''}\n`) +
        (c.setsNotCommitted === 0 ? '' : `  not committed: ${c.setsNotCommitted} set(s) analysed but their results could not be written (the reason is in ${config.logFile}); their files stay in the inbox, run again\n`),
    );
    return summary;
  } finally {
    await pipeline.close();
  }
}

export const processCommand: CommandModule = {
  register(program: Command) {
    withRedisOption(withConfigOption(
      program
        .command('process')
        .description('analyse the given files or folders once, then exit (exit 3 if any input was rejected or any set failed)')
        .argument('<paths...>', 'files or folders (searched recursively)')
        .option('-v, --verbose', 'also log to stdout'),
    )).action(async (paths: string[], options: ConfigCliOptions & { verbose?: boolean }) => {
      const summary = await runBatch(paths, options);
      process.exitCode = summary.rejected > 0 || summary.failed > 0 || summary.notTaken > 0 || summary.notCommitted > 0 ? EXIT_CODES.rejected.code : EXIT_CODES.ok.code;
    });
  },
};
