// The alert-channel interface: one implementation per file (webhook, email, log), registered in
// channel-registry.ts. A channel delivers one message or throws; retries are the dispatcher's.
import type { AlertMessage } from './alert-message.js';

export interface AlertChannel {
  readonly id: string;
  readonly type: string;
  /** Delivers the message; rejects on failure. `signal` aborts the attempt at its time limit. */
  send(message: AlertMessage, signal: AbortSignal): Promise<void>;
  /** Releases connections (email transport). */
  close?(): void;
}

/** Environment variables, injected so tests and the pipeline decide where secrets come from. */
export type SecretSource = Readonly<Record<string, string | undefined>>;
