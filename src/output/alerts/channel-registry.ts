// The alert-channel table: add a channel type by adding a file and a row here (and its schema to
// src/config/sections/alerts.ts).
import type { AlertChannelConfig, AlertsConfig } from '../../config/sections/alerts.js';
import type { AlertChannel, SecretSource } from './alert-channel.js';
import { createEmailChannel } from './email-channel.js';
import { createLogChannel, jsonLineLogger, type AlertLogger } from './log-channel.js';
import { createWebhookChannel } from './webhook-channel.js';

export interface ChannelDependencies {
  readonly env: SecretSource;
  readonly logger: AlertLogger;
}

type ChannelFactory<Config extends AlertChannelConfig> = (
  config: Config,
  configPath: string,
  dependencies: ChannelDependencies,
) => AlertChannel;

export const CHANNEL_TYPES: {
  [Type in AlertChannelConfig['type']]: ChannelFactory<Extract<AlertChannelConfig, { type: Type }>>;
} = {
  webhook: (config, configPath, dependencies) => createWebhookChannel(config, configPath, dependencies.env),
  email: (config, configPath, dependencies) => createEmailChannel(config, configPath, dependencies.env),
  log: (config, _configPath, dependencies) => createLogChannel(config, dependencies.logger),
};

/** Builds every configured channel (secrets read from `env`); throws ConfigInvalid naming the channel's path. */
export function createChannels(
  alerts: AlertsConfig,
  dependencies: Partial<ChannelDependencies> = {},
): Map<string, AlertChannel> {
  const resolved: ChannelDependencies = {
    env: dependencies.env ?? process.env,
    logger: dependencies.logger ?? jsonLineLogger(),
  };
  const channels = new Map<string, AlertChannel>();
  alerts.channels.forEach((config, index) => {
    const configPath = `alerts.channels[${index}]`;
    const channel = createChannel(config, configPath, resolved);
    channels.set(config.id, channel);
  });
  return channels;
}

/** Dispatches to the factory of the config's type. */
function createChannel(
  config: AlertChannelConfig,
  configPath: string,
  dependencies: ChannelDependencies,
): AlertChannel {
  switch (config.type) {
    case 'webhook':
      return CHANNEL_TYPES.webhook(config, configPath, dependencies);
    case 'email':
      return CHANNEL_TYPES.email(config, configPath, dependencies);
    case 'log':
      return CHANNEL_TYPES.log(config, configPath, dependencies);
  }
}
