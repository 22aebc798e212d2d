// Webhook channel: JSON POST with Node's fetch, signed with HMAC-SHA256 when a key is configured.
// Header X-Driftlight-Signature: "t=<unix seconds>,v1=<hex HMAC of `${t}.${body}`>".
import { createHmac } from 'node:crypto';
import type { WebhookChannelConfig } from '../../config/sections/alerts.js';
import { ConfigInvalid } from '../../model/errors.js';
import type { AlertChannel, SecretSource } from './alert-channel.js';
import { alertPayload, type AlertMessage } from './alert-message.js';

export const SIGNATURE_HEADER = 'x-driftlight-signature';

/** "t=…,v1=…" HMAC-SHA256 signature of `${unixSeconds}.${body}` (RFC 2104 HMAC, FIPS 180-4 SHA-256). */
export function signWebhookBody(body: string, key: string, unixSeconds: number): string {
  const digest = createHmac('sha256', key).update(`${unixSeconds}.${body}`).digest('hex');
  return `t=${unixSeconds},v1=${digest}`;
}

/** Creates the webhook channel; throws ConfigInvalid when the named key variable is unset. */
export function createWebhookChannel(
  config: WebhookChannelConfig,
  configPath: string,
  env: SecretSource,
  nowMs: () => number = Date.now,
): AlertChannel {
  let key: string | undefined;
  if (config.secretEnv !== undefined) {
    key = env[config.secretEnv];
    if (key === undefined || key === '') {
      throw new ConfigInvalid(`environment variable ${config.secretEnv} (the webhook HMAC key) is not set`, {
        configPath: `${configPath}.secretEnv`,
        hint: `Export ${config.secretEnv} in the service environment; the key never goes into the config file.`,
      });
    }
  }
  const signingKey = key;
  return {
    id: config.id,
    type: 'webhook',
    async send(message: AlertMessage, signal: AbortSignal): Promise<void> {
      const body = JSON.stringify(alertPayload(message));
      const headers: Record<string, string> = {
        ...config.headers,
        'content-type': 'application/json',
        'user-agent': 'driftlight-alerts',
      };
      if (signingKey !== undefined)
        headers[SIGNATURE_HEADER] = signWebhookBody(body, signingKey, Math.floor(nowMs() / 1000));
      const response = await fetch(config.url, { method: 'POST', headers, body, signal });
      await response.arrayBuffer();
      if (!response.ok) throw new Error(`webhook ${config.id} answered HTTP ${response.status}`);
    },
  };
}
