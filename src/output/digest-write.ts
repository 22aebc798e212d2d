// Writes a digest's forms under results/digest/ (DATE.html, DATE.md, DATE.json and, when asked,
// DATE.csv with the day's summary table), each atomically; and e-mails it through an e-mail channel.
import { existsSync, mkdirSync } from 'node:fs';
import { join } from 'node:path';
import nodemailer from 'nodemailer';
import type { DriftlightConfig } from '../config/index.js';
import type { EmailChannelConfig } from '../config/sections/alerts.js';
import { ConfigInvalid } from '../model/errors.js';
import { writeFileAtomic } from './atomic-write.js';
import type { DigestData } from './digest-model.js';
import type { DigestForms } from './digest-render.js';
import { summaryCsv } from './summary-table.js';

/** results/digest/ of a config. */
export function digestFolder(config: DriftlightConfig): string {
  return join(config.folders.results, 'digest');
}

/** Whether the digest of `date` has been written (its JSON, written last, exists). */
export function digestExists(config: DriftlightConfig, date: string): boolean {
  return existsSync(join(digestFolder(config), `${date}.json`));
}

/** Writes the forms; the JSON last, so its presence means the digest is complete. Returns the paths. */
export function writeDigest(config: DriftlightConfig, data: DigestData, forms: DigestForms): string[] {
  const dir = digestFolder(config);
  mkdirSync(dir, { recursive: true });
  const paths: string[] = [];
  const put = (name: string, content: string): void => {
    const path = join(dir, name);
    writeFileAtomic(path, content);
    paths.push(path);
  };
  put(`${data.date}.html`, forms.html);
  put(`${data.date}.md`, forms.markdown);
  if (config.digest.dailyCsv) put(`${data.date}.csv`, summaryCsv(data.samples));
  put(`${data.date}.json`, forms.json);
  return paths;
}

/** The e-mail channel the digest goes through, or undefined when none is configured; throws ConfigInvalid for a wrong id. */
export function digestEmailChannel(config: DriftlightConfig): EmailChannelConfig | undefined {
  const id = config.digest.emailChannel;
  if (id === undefined) return undefined;
  const channel = config.alerts.channels.find((candidate) => candidate.id === id);
  if (channel?.type !== 'email') {
    throw new ConfigInvalid(`digest.emailChannel "${id}" is not an e-mail channel under alerts.channels`, {
      configPath: 'digest.emailChannel',
      hint: 'Name the id of an alerts.channels entry with type: email, or remove digest.emailChannel.',
    });
  }
  return channel;
}

/** Sends the digest (HTML with a plain-text part) through the e-mail channel's SMTP server (RFC 2046 multipart/alternative). */
export async function emailDigest(
  channel: EmailChannelConfig,
  data: DigestData,
  forms: DigestForms,
  env: NodeJS.ProcessEnv = process.env,
): Promise<void> {
  const password = channel.passwordEnv === undefined ? undefined : env[channel.passwordEnv];
  if (channel.passwordEnv !== undefined && (password === undefined || password === '')) {
    throw new ConfigInvalid(`environment variable ${channel.passwordEnv} (the SMTP password) is not set`, {
      configPath: 'digest.emailChannel',
    });
  }
  const transport = nodemailer.createTransport({
    host: channel.host,
    port: channel.port,
    secure: channel.secure,
    requireTLS: !channel.secure && !channel.allowPlainText,
    connectionTimeout: channel.timeoutMs,
    greetingTimeout: channel.timeoutMs,
    socketTimeout: channel.timeoutMs,
    ...(channel.username === undefined ? {} : { auth: { user: channel.username, pass: password ?? '' } }),
  });
  try {
    const flagged = data.controls.filter((c) => c.verdict === 'flagged').length;
    await transport.sendMail({
      from: channel.from,
      to: [...channel.to],
      subject: `driftlight digest ${data.date}: ${data.sets.processed} sets, ${data.rejections.length} rejected, ${flagged === 0 ? 'controls in control' : `${flagged} control(s) flagged`}`,
      text: forms.markdown,
      html: forms.html,
    });
  } finally {
    transport.close();
  }
}
