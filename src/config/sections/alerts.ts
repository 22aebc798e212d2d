// Config section `alerts`: alert channels (webhook, email, log), routing by severity, cooldown and
// recovery notices. Secrets are never written here: a channel names the environment variable
// that holds its HMAC key or SMTP password. The channels themselves live in src/output/alerts/.
import { z } from 'zod';

const channelId = z
  .string()
  .regex(/^[A-Za-z0-9][A-Za-z0-9._-]*$/, { error: 'expected letters, digits, ".", "_" or "-"' });
const envName = z
  .string()
  .regex(/^[A-Za-z_][A-Za-z0-9_]*$/, { error: 'expected an environment variable name such as DRIFTLIGHT_WEBHOOK_KEY' });

/** Whether an http(s) URL carries no user name or password. */
function hasNoCredentials(url: string): boolean {
  try {
    const parsed = new URL(url);
    return parsed.username === '' && parsed.password === '';
  } catch {
    return true;
  }
}

/** Delivery options every channel takes. */
const deliveryShape = {
  id: channelId.describe('Channel id, used in routing.'),
  timeoutMs: z
    .number()
    .int()
    .min(100)
    .max(300_000)
    .default(10_000)
    .describe('Time limit per delivery attempt, in ms. Default: 10000'),
  attempts: z.number().int().min(1).max(10).default(4).describe('Delivery attempts including the first. Default: 4'),
  backoffMs: z
    .number()
    .int()
    .min(0)
    .max(600_000)
    .default(1_000)
    .describe('Wait before the first retry in ms, doubled for each further retry. Default: 1000'),
};

export const webhookChannelSchema = z.strictObject({
  ...deliveryShape,
  type: z.literal('webhook'),
  url: z
    .url({ protocol: /^https?$/, error: 'expected an http(s) URL' })
    .refine(hasNoCredentials, {
      error:
        'the URL carries a user name or password; put a shared secret in secretEnv (HMAC signature) instead, so no credential is stored or logged',
    })
    .describe(
      'Endpoint receiving a JSON POST per alert; a URL with credentials in it (https://user:pass@…) is refused.',
    ),
  secretEnv: envName
    .optional()
    .describe(
      'Environment variable holding the HMAC-SHA256 key; when set, each POST carries X-Driftlight-Signature. Default: none (unsigned)',
    ),
  headers: z
    .record(z.string(), z.string())
    .default({})
    .describe('Extra request headers (no secrets: they are stored in plain text). Default: {}'),
});

export const emailChannelSchema = z.strictObject({
  ...deliveryShape,
  type: z.literal('email'),
  host: z.string().min(1).describe('SMTP server host.'),
  port: z.number().int().min(1).max(65_535).default(587).describe('SMTP port. Default: 587'),
  secure: z
    .boolean()
    .default(false)
    .describe('TLS from the first byte (port 465); false uses STARTTLS when offered. Default: false'),
  requireTls: z
    .boolean()
    .default(true)
    .describe(
      'Refuse to send without STARTTLS when secure is false; false is accepted only together with allowPlainText: true. Default: true',
    ),
  allowPlainText: z
    .boolean()
    .default(false)
    .describe(
      'Allow sending over an unencrypted SMTP connection (a relay on the same host or a trusted lab network); without it a server that offers no TLS is refused. Default: false',
    ),
  from: z.string().min(3).describe('Sender address.'),
  to: z.array(z.string().min(3)).min(1).describe('Recipient addresses.'),
  username: z.string().min(1).optional().describe('SMTP user name. Default: none (no login)'),
  passwordEnv: envName.optional().describe('Environment variable holding the SMTP password. Default: none'),
});

export const logChannelSchema = z.strictObject({
  ...deliveryShape,
  type: z.literal('log'),
});

export const alertChannelSchema = z.discriminatedUnion(
  'type',
  [webhookChannelSchema, emailChannelSchema, logChannelSchema],
  {
    error: 'expected a channel with type webhook, email or log',
  },
);

export type WebhookChannelConfig = z.output<typeof webhookChannelSchema>;
export type EmailChannelConfig = z.output<typeof emailChannelSchema>;
export type LogChannelConfig = z.output<typeof logChannelSchema>;
export type AlertChannelConfig = z.output<typeof alertChannelSchema>;

const channelList = z.array(channelId);

export const alertsSection = z
  .strictObject({
    channels: z
      .array(alertChannelSchema)
      .default([{ id: 'log', type: 'log', timeoutMs: 10_000, attempts: 1, backoffMs: 0 }])
      .describe('Alert channels. Default: one log channel with id "log"'),
    routing: z
      .strictObject({
        info: channelList.optional().describe('Channels for info flags. Default: every channel of alerts.channels'),
        warning: channelList
          .optional()
          .describe('Channels for warning flags. Default: every channel of alerts.channels'),
        critical: channelList
          .optional()
          .describe('Channels for critical flags. Default: every channel of alerts.channels'),
      })
      .prefault({})
      .describe('Channel ids per severity.'),
    cooldownMinutes: z
      .number()
      .min(0)
      .max(7 * 24 * 60)
      .default(240)
      .describe('The same rule + control + metric is not alerted again within this many minutes. Default: 240'),
    deliveryExpiryHours: z
      .number()
      .positive()
      .max(24 * 30)
      .default(24)
      .describe(
        'An alert not delivered is retried (with backoff) until this many hours after it was raised, then recorded as expired. Default: 24',
      ),
    maxRetryIntervalMinutes: z
      .number()
      .positive()
      .max(24 * 60)
      .default(15)
      .describe(
        'Longest wait between two delivery attempts of an undelivered alert, in minutes (the backoff doubles up to this). Default: 15',
      ),
    recoveryNotices: z
      .boolean()
      .default(true)
      .describe(
        'Send a notice when an alerted metric is back in control (to the channels that got the alert). Default: true',
      ),
  })
  .superRefine((alerts, context) => {
    const ids = new Set<string>();
    alerts.channels.forEach((channel, index) => {
      if (channel.type === 'email' && !channel.requireTls && !channel.allowPlainText) {
        context.addIssue({
          code: 'custom',
          path: ['channels', index, 'requireTls'],
          message:
            'SMTP without TLS must be allowed explicitly: set allowPlainText: true (a relay on this host or a trusted network), or keep requireTls',
        });
      }
      if (ids.has(channel.id))
        context.addIssue({
          code: 'custom',
          path: ['channels', index, 'id'],
          message: `duplicate channel id "${channel.id}"`,
        });
      ids.add(channel.id);
    });
    for (const severity of ['info', 'warning', 'critical'] as const) {
      // Only routes the user wrote are checked: a default route names only channels that exist.
      (alerts.routing[severity] ?? []).forEach((id, index) => {
        if (!ids.has(id))
          context.addIssue({
            code: 'custom',
            path: ['routing', severity, index],
            message: `no channel with id "${id}" under alerts.channels`,
          });
      });
    }
  })
  .transform((alerts) => {
    const every = alerts.channels.map((channel) => channel.id);
    return {
      ...alerts,
      routing: {
        info: alerts.routing.info ?? every,
        warning: alerts.routing.warning ?? every,
        critical: alerts.routing.critical ?? every,
      },
    };
  })
  .prefault({})
  .describe('Alert channels (webhook, email, log), routing by severity, cooldown and recovery notices.');

export type AlertsConfig = z.output<typeof alertsSection>;
