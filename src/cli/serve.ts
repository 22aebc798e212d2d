// `driftlight serve [--http HOST:PORT] [--token-file FILE]`: the status page, /healthz and /metrics
// over the ledger, until SIGINT/SIGTERM. Read-only: it runs beside `watch` (or after it) without the
// instance lock. `watch --http` serves the same from inside the watch process (withHttpOptions).
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import type { Command } from 'commander';
import type { DriftlightConfig } from '../config/index.js';
import { effectiveRuleSet } from '../pipeline/qc-rule-set.js';
import {
  DEFAULT_LISTEN,
  resolveServerOptions,
  startStatusServer,
  TOKEN_ENV,
  type RunningStatusServer,
} from '../server/index.js';
import { LEDGER_FILE_NAME, openLedger, type Ledger } from '../store/ledger.js';
import type { CommandModule } from './command-module.js';
import { configFromOptions, withConfigOption } from './config-option.js';
import { softwareVersion } from './version.js';

/** The options `serve` and `watch --http` share. */
export interface HttpCliOptions {
  readonly http?: string | true;
  readonly tokenFile?: string;
}

/** Adds `--http [HOST:PORT]` and `--token-file FILE` to a command. */
export function withHttpOptions(command: Command, httpHelp: string): Command {
  return command
    .option('--http [host:port]', `${httpHelp} (default ${DEFAULT_LISTEN}; any address outside loopback needs a token)`)
    .option(
      '--token-file <file>',
      `file whose first line is the bearer token clients must send (default: environment variable ${TOKEN_ENV}); required outside loopback`,
    );
}

/** Starts the status server over an open ledger for `--http`/`serve` options; the address defaults to loopback. */
export async function startHttp(
  options: HttpCliOptions,
  config: DriftlightConfig,
  ledger: Ledger,
): Promise<RunningStatusServer> {
  const server = resolveServerOptions({
    ...(typeof options.http === 'string' ? { listen: options.http } : {}),
    ...(options.tokenFile === undefined ? {} : { tokenFile: options.tokenFile }),
  });
  return startStatusServer(server, {
    ledger,
    config,
    ruleSet: effectiveRuleSet(config),
    softwareVersion: softwareVersion(),
  });
}

/** Resolves on the first SIGINT or SIGTERM with the signal's name. */
export function untilSignal(): Promise<string> {
  return new Promise<string>((resolve) => {
    process.once('SIGINT', () => resolve('SIGINT'));
    process.once('SIGTERM', () => resolve('SIGTERM'));
  });
}

export const serveCommand: CommandModule = {
  register(program: Command) {
    withHttpOptions(
      withConfigOption(
        program
          .command('serve')
          .description(
            'serve the status page (controls, charts, open flags, queue, waiting sets, rejections, undelivered alerts), /healthz and /metrics (Prometheus) until Ctrl-C',
          ),
      ),
      'listen on this address',
    ).action(async (options: HttpCliOptions & { config?: string }) => {
      const config = configFromOptions(options);
      if (!existsSync(join(config.folders.state, LEDGER_FILE_NAME)))
        process.stdout.write(`no ledger yet in ${config.folders.state}; serving an empty one\n`);
      const ledger = openLedger(config.folders.state);
      let server: RunningStatusServer;
      try {
        server = await startHttp(options, config, ledger);
      } catch (error) {
        ledger.close();
        throw error;
      }
      process.stdout.write(`status page: ${server.url} (Ctrl-C stops)\n`);
      const signal = await untilSignal();
      process.stdout.write(`${signal}: stopping\n`);
      await server.close();
      ledger.close();
    });
  },
};
