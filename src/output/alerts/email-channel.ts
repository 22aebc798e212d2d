// Email channel: one plain-text message per alert through SMTP (nodemailer); the password comes
// from the environment variable the config names.
import nodemailer from 'nodemailer';
import type { EmailChannelConfig } from '../../config/sections/alerts.js';
import { ConfigInvalid } from '../../model/errors.js';
import type { AlertChannel, SecretSource } from './alert-channel.js';
import { alertSubject, alertText, type AlertMessage } from './alert-message.js';

/** Creates the email channel; throws ConfigInvalid when the named password variable is unset. */
export function createEmailChannel(config: EmailChannelConfig, configPath: string, env: SecretSource): AlertChannel {
  let password: string | undefined;
  if (config.passwordEnv !== undefined) {
    password = env[config.passwordEnv];
    if (password === undefined || password === '') {
      throw new ConfigInvalid(`environment variable ${config.passwordEnv} (the SMTP password) is not set`, {
        configPath: `${configPath}.passwordEnv`,
        hint: `Export ${config.passwordEnv} in the service environment; the password never goes into the config file.`,
      });
    }
  }
  const transport = nodemailer.createTransport({
    host: config.host,
    port: config.port,
    secure: config.secure,
    // TLS is required unless the config explicitly allows plain text (alerts.channels[].allowPlainText).
    requireTLS: !config.secure && !config.allowPlainText,
    connectionTimeout: config.timeoutMs,
    greetingTimeout: config.timeoutMs,
    socketTimeout: config.timeoutMs,
    ...(config.username === undefined ? {} : { auth: { user: config.username, pass: password ?? '' } }),
  });
  return {
    id: config.id,
    type: 'email',
    async send(message: AlertMessage): Promise<void> {
      // The dispatcher bounds each attempt; nodemailer's own socket timeouts close the connection.
      await transport.sendMail({
        from: config.from,
        to: [...config.to],
        subject: alertSubject(message),
        text: alertText(message),
      });
    },
    close(): void {
      transport.close();
    },
  };
}
