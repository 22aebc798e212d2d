// `driftlight reprocess --since DATE`: re-runs every set finished since DATE with the current config
// (inputs read from the archive), replaces each result in place and prints what changed.
import type { Command } from 'commander';
import { readFileSync } from 'node:fs';
import type { AnalysisResult } from '../analysis/result.js';
import { ConfigInvalid } from '../model/errors.js';
import { createLogger } from '../output/logger.js';
import { diffResults } from '../pipeline/result-diff.js';
import { openPipeline } from '../pipeline/runtime.js';
import { finishedSetsSince } from '../store/sets.js';
import type { CommandModule } from './command-module.js';
import { configFromOptions, withConfigOption } from './config-option.js';
import { softwareVersion } from './version.js';

function readResult(path: string): AnalysisResult | undefined {
  try {
    return JSON.parse(readFileSync(path, 'utf8')) as AnalysisResult;
  } catch {
    return undefined;
  }
}

/** Re-runs the sets finished since `since`; returns how many changed. */
export async function runReprocess(
  options: { config?: string; since: string },
  stdout: NodeJS.WritableStream = process.stdout,
): Promise<number> {
  const since = new Date(options.since);
  if (Number.isNaN(since.getTime()))
    throw new ConfigInvalid(`--since "${options.since}" is not a date`, {
      hint: 'Give an ISO date such as 2026-03-14 or 2026-03-14T08:00:00Z.',
    });
  const config = configFromOptions(options);
  const logger = createLogger({ ...config.logging, stdout: 'off' }, config.logFile);
  const pipeline = openPipeline(config, { softwareVersion: softwareVersion(), logger, command: 'reprocess' });
  const { coordinator, ledger } = pipeline;
  try {
    const sets = finishedSetsSince(ledger, since).filter((s) => s.state === 'done' && s.resultPath !== null);
    const before = new Map(sets.map((s) => [s.id, s.resultPath === null ? undefined : readResult(s.resultPath)]));
    let changed = 0;
    coordinator.onCommitted((setId, path) => {
      const old = before.get(setId);
      const now = path === undefined ? undefined : readResult(path);
      if (old === undefined || now === undefined) {
        stdout.write(
          `${setId}: ${now === undefined ? 'failed on re-run' : 'new result (no earlier one to compare)'}\n`,
        );
        changed += 1;
        return;
      }
      const changes = diffResults(old, now);
      if (changes.length > 0) changed += 1;
      stdout.write(
        changes.length === 0
          ? `${setId}: unchanged\n`
          : `${setId}: ${changes.map((c) => `${c.field} ${c.before} → ${c.after}`).join('; ')}\n`,
      );
    });
    const stamp = Date.now().toString(36);
    for (const set of sets) {
      const notRun = await coordinator.enqueue(set.id, `${set.id}~r${stamp}`);
      if (notRun !== undefined)
        stdout.write(`${set.id}: not re-run (INPUT_MISSING: ${notRun}); its earlier result stands\n`);
    }
    await coordinator.drain();
    stdout.write(`driftlight reprocess: ${sets.length} sets since ${since.toISOString()}, ${changed} changed\n`);
    return changed;
  } finally {
    await pipeline.close();
  }
}

export const reprocessCommand: CommandModule = {
  register(program: Command) {
    withConfigOption(
      program
        .command('reprocess')
        .description('re-run sets finished since DATE with the current config and print what changed')
        .requiredOption('--since <date>', 'ISO date or time; sets created at or after it are re-run'),
    ).action(async (options: { config?: string; since: string }) => {
      await runReprocess(options);
    });
  },
};
