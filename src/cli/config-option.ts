// The shared `--config FILE` and `--redis URL` options and config loading for commands.
import { readFileSync } from 'node:fs';
import { InvalidArgumentError, type Command } from 'commander';
import { loadConfig, type DriftlightConfig } from '../config/index.js';

/** Options of a command that loads the config: `--config FILE` and, where offered, `--redis URL`. */
export interface ConfigCliOptions {
  readonly config?: string;
  readonly redis?: string;
}

/** Adds `-c, --config <file>` to a command. */
export function withConfigOption(command: Command): Command {
  return command.option(
    '-c, --config <file>',
    'config file (default: ./driftlight.yaml, or built-in defaults when absent)',
  );
}

/** The environment variable a Redis URL (with its password) may be given in instead of the command line, where `ps` shows it. */
export const REDIS_URL_ENV = 'DRIFTLIGHT_REDIS_URL';

const REDIS_URL = /^rediss?:\/\/\S+$/;

/**
 * Adds `--redis <url>`: run jobs on the BullMQ backend at that Redis, overriding the config's
 * queue.backend and queue.redisUrl. `--redis @FILE` reads the URL from FILE's first line and
 * `--redis env` from $DRIFTLIGHT_REDIS_URL, so that no password shows in `ps`.
 */
export function withRedisOption(command: Command): Command {
  return command.option(
    '--redis <url>',
    `queue jobs in Redis (BullMQ) at this URL (or @FILE: read it from FILE; env: from $${REDIS_URL_ENV}); overrides queue.backend and queue.redisUrl`,
    (text: string) => {
      if (text === 'env' || text.startsWith('@') || REDIS_URL.test(text)) return text;
      throw new InvalidArgumentError(`expected a redis:// or rediss:// URL, @FILE or env`);
    },
  );
}

/** The Redis URL that `--redis` names: itself, the first line of @FILE, or $DRIFTLIGHT_REDIS_URL for `env`. */
export function redisUrlFrom(option: string, env: NodeJS.ProcessEnv = process.env): string {
  let url: string;
  let where: string;
  if (option === 'env') {
    url = (env[REDIS_URL_ENV] ?? '').trim();
    where = `$${REDIS_URL_ENV}`;
  } else if (option.startsWith('@')) {
    const file = option.slice(1);
    try {
      url = (readFileSync(file, 'utf8').split(/\r?\n/)[0] ?? '').trim();
    } catch (error) {
      throw new InvalidArgumentError(
        `--redis ${option}: cannot read ${file} (${(error as NodeJS.ErrnoException).code ?? 'error'})`,
      );
    }
    where = file;
  } else {
    return option;
  }
  if (!REDIS_URL.test(url))
    throw new InvalidArgumentError(`--redis ${option}: ${where} does not hold a redis:// or rediss:// URL`);
  return url;
}

/**
 * Loads the config named by --config; --redis selects the bullmq backend at that URL. Without
 * --redis, $DRIFTLIGHT_REDIS_URL (when set) replaces queue.redisUrl, so the config file need not
 * hold the password either.
 */
export function configFromOptions(options: ConfigCliOptions, env: NodeJS.ProcessEnv = process.env): DriftlightConfig {
  const config = loadConfig(options.config);
  if (options.redis === undefined) {
    const fromEnv = env[REDIS_URL_ENV]?.trim();
    if (fromEnv === undefined || fromEnv === '') return config;
    if (!REDIS_URL.test(fromEnv))
      throw new InvalidArgumentError(`$${REDIS_URL_ENV} does not hold a redis:// or rediss:// URL`);
    return Object.freeze({ ...config, queue: Object.freeze({ ...config.queue, redisUrl: fromEnv }) });
  }
  const queue = Object.freeze({
    ...config.queue,
    backend: 'bullmq' as const,
    redisUrl: redisUrlFrom(options.redis, env),
  });
  return Object.freeze({ ...config, queue });
}
