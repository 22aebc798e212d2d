// The shared `--config FILE` option and config loading for commands.
import type { Command } from 'commander';
import { loadConfig, type DriftlightConfig } from '../config/index.js';

/** Adds `-c, --config <file>` to a command. */
export function withConfigOption(command: Command): Command {
  return command.option('-c, --config <file>', 'config file (default: ./driftlight.yaml, or built-in defaults when absent)');
}

/** Loads the config named by the command's --config option. */
export function configFromOptions(options: { config?: string }): DriftlightConfig {
  return loadConfig(options.config);
}
