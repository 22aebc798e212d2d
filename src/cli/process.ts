// `driftlight process PATH...`: one batch over the given files or folders, then exit. Sets still
// incomplete at the end of the batch are paired and processed (partial when parts stay missing).
// Files inside the configured inbox are moved (archive, quarantine) as `watch` would; anywhere else
// they are the user's originals and are left alone: copies are staged under the state folder and
// the copies are archived or quarantined (`--move` moves the originals instead).
import type { Command } from 'commander';
import { existsSync, mkdirSync, readdirSync, realpathSync, rmdirSync, statSync } from 'node:fs';
import { basename, dirname, isAbsolute, join, relative, resolve } from 'node:path';
import { durableCopy } from '../output/move-file.js';
import { ConfigInvalid } from '../model/errors.js';
import { createLogger } from '../output/logger.js';
import { openPipeline } from '../pipeline/runtime.js';
import type { CommandModule } from './command-module.js';
import { collectFiles } from './collect-files.js';
import { configFromOptions, withConfigOption, withRedisOption, type ConfigCliOptions } from './config-option.js';
import { EXIT_CODES } from './exit-codes.js';
import { rejectionLines } from './process-rejections.js';
import { createProgress } from './progress.js';
import { startWorkerWait } from './worker-wait.js';
import { softwareVersion } from './version.js';
import { alertsExpiredSince, openQcFlagCounts, undeliveredAlerts } from '../store/alert-outbox.js';

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
  /** Alert deliveries still waiting in the outbox (retried by the next `watch` or `process` until delivered or expired) or given up as expired during this run. */
  readonly alertsUndelivered: number;
  /** Open QC flags of warning or critical severity (not yet recovered), counted once per rule + control + metric. */
  readonly openQcFlags: number;
}

function realOrResolved(path: string): string {
  try {
    return realpathSync(path);
  } catch {
    return resolve(path);
  }
}

/** Whether `path` is `folder` or lies inside it (real paths). */
export function isWithin(path: string, folder: string): boolean {
  const rel = relative(realOrResolved(folder), realOrResolved(path));
  return rel === '' || (!rel.startsWith('..') && !isAbsolute(rel));
}

/**
 * Copies the files under `paths` into a new staging folder under `stateDir` (folder structure kept,
 * so a manifest still finds its files beside it; each argument in its own sub-folder) and returns the
 * staged paths in the order of `files`.
 */
function stageCopies(paths: readonly string[], files: readonly string[], stagingDir: string): string[] {
  const roots = paths.map((p) => {
    const abs = resolve(p);
    return statSync(abs).isDirectory() ? abs : dirname(abs);
  });
  return files.map((file) => {
    const index = roots.findIndex((root) => isWithin(file, root));
    const root = roots[index] ?? dirname(file);
    const target = join(stagingDir, `${Math.max(index, 0) + 1}-${basename(root) || 'root'}`, relative(root, file));
    mkdirSync(dirname(target), { recursive: true });
    durableCopy(file, target);
    return target;
  });
}

/** Removes empty folders under (and including) `dir`, deepest first. */
function removeEmptyFolders(dir: string): void {
  if (!existsSync(dir)) return;
  for (const entry of readdirSync(dir, { withFileTypes: true }))
    if (entry.isDirectory()) removeEmptyFolders(join(dir, entry.name));
  try {
    rmdirSync(dir);
  } catch {
    // Not empty (a file not taken stays for the next run) or already gone.
  }
}

/** Runs one batch over `paths` with the config file `configFile`; returns the summary (also printed). `move`: move the originals even outside the inbox. */
export async function runBatch(
  paths: readonly string[],
  options: ConfigCliOptions & { verbose?: boolean; move?: boolean },
  stdout: NodeJS.WritableStream = process.stdout,
  stderr: NodeJS.WritableStream = process.stderr,
): Promise<BatchSummary> {
  const config = configFromOptions(options);
  for (const p of paths)
    if (!existsSync(p))
      throw new ConfigInvalid(`no such file or folder: ${p}`, {
        hint: 'Pass existing files or folders to `driftlight process`.',
      });
  const logger = createLogger(
    { ...config.logging, stdout: options.verbose === true ? config.logging.stdout : 'off' },
    config.logFile,
  );
  const pipeline = openPipeline(config, { softwareVersion: softwareVersion(), logger, command: 'process' });
  const startedMs = Date.now();
  const startedIso = new Date(startedMs).toISOString();
  const { coordinator } = pipeline;
  const inInbox = paths.every((p) => isWithin(p, config.folders.inbox));
  const copy = options.move !== true && !inInbox;
  const stagingDir = join(
    config.folders.state,
    'process-staging',
    `${new Date().toISOString().replace(/[:.]/g, '-')}-${process.pid}`,
  );
  try {
    await coordinator.recover();
    for (const stage of pipeline.stages) stage.resume?.({ ledger: pipeline.ledger, now: new Date() });
    const found = collectFiles(paths);
    const files = copy ? stageCopies(paths, found, stagingDir) : found;
    const progress = createProgress('processing');
    let committed = 0;
    coordinator.onCommitted(() => {
      committed += 1;
      progress.update(committed, Math.max(coordinator.counts.setsDispatched, committed));
    });
    coordinator.holdDispatch = true;
    const notTaken = await coordinator.intakeMany(files);
    await coordinator.tick(true);
    const stopWorkerWait = startWorkerWait(pipeline, 'process');
    try {
      await coordinator.drain();
    } finally {
      await stopWorkerWait();
    }
    progress.finish();
    // Let the first burst of alert deliveries finish so the summary says what did not arrive.
    await Promise.all(pipeline.stages.map((stage) => stage.idle?.()));
    const outbox = undeliveredAlerts(pipeline.ledger);
    const alertsUndelivered = outbox.pending + alertsExpiredSince(pipeline.ledger, startedMs);
    const flags = openQcFlagCounts(pipeline.ledger);
    const openQcFlags = flags.warning + flags.critical;
    const c = coordinator.counts;
    if (copy) removeEmptyFolders(stagingDir);
    const summary: BatchSummary = {
      files: files.length,
      accepted: c.filesAccepted,
      rejected: c.filesRejected,
      sets: c.setsDispatched,
      done: c.setsDone,
      partial: c.setsPartial,
      failed: c.setsFailed,
      notTaken: notTaken.length,
      notCommitted: c.setsNotCommitted,
      alertsUndelivered,
      openQcFlags,
    };
    stdout.write(
      `driftlight process: ${summary.files} files, ${summary.accepted} accepted, ${c.filesRejected} rejected; ` +
        `${summary.sets} sets: ${summary.done} done (${summary.partial} partial), ${summary.failed} failed\n` +
        (copy
          ? `  originals:  left in place (copies were analysed; --move moves the originals)\n`
          : `  originals:  ${inInbox ? 'moved out of the inbox' : 'moved (--move)'} to the archive or quarantine\n`) +
        `  results:    ${config.folders.results}\n  outbox:     ${config.folders.outbox}\n` +
        `  archive:    ${config.folders.archive}\n  quarantine: ${config.folders.quarantine}\n` +
        (notTaken.length === 0
          ? ''
          : `  not taken:  ${notTaken.length} file(s) could not be read or recorded (left where they are; the reason is in ${config.logFile}); run again: ${notTaken.slice(0, 3).join(', ')}${notTaken.length > 3 ? ', …' : ''}\n`) +
        (c.setsNotCommitted === 0
          ? ''
          : `  not committed: ${c.setsNotCommitted} set(s) analysed but their results could not be written (the reason is in ${config.logFile}); their files stay in the inbox, run again\n`) +
        (openQcFlags === 0
          ? ''
          : `  QC flags open: ${openQcFlags} (${flags.critical} critical, ${flags.warning} warning); see \`driftlight status\`\n`) +
        (alertsUndelivered === 0
          ? ''
          : `  alerts NOT delivered: ${alertsUndelivered} (${outbox.latest[0]?.lastError ?? 'see the log'}); kept in the outbox and retried by the next watch or process run until delivered or expired; see \`driftlight status\`\n`),
    );
    // Each input rejected or failed in this run, on stderr as the README's exit code 3 says.
    for (const line of rejectionLines(pipeline.ledger, startedIso)) stderr.write(`${line}\n`);
    return summary;
  } finally {
    await pipeline.close();
  }
}

/** The exit code of a batch: 3 when inputs were rejected or left, else 4 when QC flags are open or alerts undelivered, else 0. */
export function exitCodeOf(summary: BatchSummary): number {
  if (summary.rejected > 0 || summary.failed > 0 || summary.notTaken > 0 || summary.notCommitted > 0)
    return EXIT_CODES.rejected.code;
  if (summary.alertsUndelivered > 0 || summary.openQcFlags > 0) return EXIT_CODES.attention.code;
  return EXIT_CODES.ok.code;
}

export const processCommand: CommandModule = {
  register(program: Command) {
    withRedisOption(
      withConfigOption(
        program
          .command('process')
          .description(
            'analyse the given files or folders once, then exit (exit 3 if any input was rejected or any set failed, else 4 if QC flags are open or alerts undelivered)',
          )
          .argument('<paths...>', 'files or folders (searched recursively)')
          .option('-v, --verbose', 'also log to stdout')
          .option(
            '--move',
            'move the given files into the archive or quarantine even when they are outside the inbox (default: files outside the inbox are copied and the originals left in place)',
          ),
      ),
    ).action(async (paths: string[], options: ConfigCliOptions & { verbose?: boolean; move?: boolean }) => {
      const summary = await runBatch(paths, options);
      process.exitCode = exitCodeOf(summary);
    });
  },
};
