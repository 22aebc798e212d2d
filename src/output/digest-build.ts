// Builds, writes and (when configured) e-mails the digest of one day: gather → render → write → mail.
import type { DriftlightConfig } from '../config/index.js';
import type { RuleSet } from '../qc/index.js';
import type { Ledger } from '../store/ledger.js';
import { gatherDigest } from './digest-gather.js';
import { renderDigest } from './digest-render.js';
import { digestEmailChannel, emailDigest, writeDigest } from './digest-write.js';

export interface DigestOutcome {
  readonly date: string;
  readonly paths: readonly string[];
  readonly figures: number;
  /** 'sent', 'not configured', or the error text when sending failed (the files are written either way). */
  readonly email: string;
}

/** Builds the digest of `date` (YYYY-MM-DD in the digest's zone), writes it under results/digest/ and e-mails it when configured. */
export async function buildDigest(
  ledger: Ledger,
  config: DriftlightConfig,
  ruleSet: RuleSet,
  options: { date: string; now: Date; softwareVersion: string },
): Promise<DigestOutcome> {
  const data = gatherDigest(ledger, config, {
    date: options.date,
    ruleSet,
    now: options.now,
    softwareVersion: options.softwareVersion,
  });
  const forms = await renderDigest(data);
  const paths = writeDigest(config, data, forms);
  const channel = digestEmailChannel(config);
  let email = 'not configured';
  if (channel !== undefined) {
    try {
      await emailDigest(channel, data, forms);
      email = 'sent';
    } catch (error) {
      email = `not sent: ${error instanceof Error ? error.message : String(error)}`;
    }
  }
  return { date: options.date, paths, figures: forms.figures.length, email };
}
