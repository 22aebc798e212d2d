// The shared `--config FILE` and `--redis URL` options and config loading for commands.
import { InvalidArgumentError, type Command } from 'commander';
import { loadConfig, type DriftlightConfig } from '../config/index.js';

/** Options of a command that loads the config: `--config FILE` and, where offered, `--redis URL`. */
export interface ConfigCliOptions {
  readonly config?: string;
  readonly redis?: string;
}

/** Adds `-c, --config <file>` to a command. */
export function withConfigOption(command: Command): Command {
  return command.option('-c, --config <file>', 'config file (default: ./driftlight.yaml, or built-in defaults when absent)');
}

/** Adds `--redis <url>`: run jobs on the BullMQ backend at that Redis, overriding the config's queue.backend and queue.redisUrl. */
export function withRedisOption(command: Command): Command {
  return command.option('--redis <url>', 'queue jobs in Redis (BullMQ) at this URL; overrides queue.backend and queue.redisUrl', (text: string) => {
    if (!/^rediss?:\/\/\S+$/.test(text)) throw new InvalidArgumentError('expected a redis:// or rediss:// URL');
    return text;
  });
}

/** Loads the config named by --config; --redis selects the bullmq backend at that URL. */
export function configFromOptions(options: ConfigCliOptions): DriftlightConfig {
  const config = loadConfig(options.config);
  if (options.redis === undefined) return config;
  const queue = Object.freeze({ ...config.queue, backend: 'bullmq' as const, redisUrl: options.redis });
  return Object.freeze({ ...config, queue });
}
