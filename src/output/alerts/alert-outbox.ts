// The alert outbox: every delivery (one message to one channel) is written here before it is tried
// and stays until it is delivered or expires, so a receiver that is down for hours loses nothing
// and a restart picks up what was not yet delivered. The ledger version is in
// src/store/alert-outbox.ts; the in-memory one here serves tests and `rules simulate`.
import type { AlertMessage } from './alert-message.js';

/** One delivery waiting in the outbox. */
export interface OutboxEntry {
  readonly id: number;
  readonly channelId: string;
  readonly message: AlertMessage;
  /** Attempts made so far. */
  readonly attempts: number;
  /** When the next attempt is due (epoch ms). */
  readonly nextAttemptAtMs: number;
  /** After this (epoch ms) the delivery is given up as expired. */
  readonly expiresAtMs: number;
  readonly lastError?: string;
}

export interface AlertOutbox {
  /** Adds a pending delivery and returns its id. */
  add(entry: { channelId: string; message: AlertMessage; createdAtMs: number; expiresAtMs: number }): number;
  /** Pending deliveries due at `nowMs` (next attempt reached), oldest first. */
  due(nowMs: number): OutboxEntry[];
  /** Earliest next attempt of any pending delivery, if any. */
  nextDueAtMs(): number | undefined;
  markDelivered(id: number, attempts: number, atMs: number): void;
  /** Records a failed attempt and when to try again. */
  markRetry(id: number, attempts: number, error: string, nextAttemptAtMs: number): void;
  /** Gives a delivery up (expired), keeping its last error. */
  markExpired(id: number, attempts: number, error: string, atMs: number): void;
}

/** Outbox held in memory (tests, `rules simulate`). */
export function createMemoryOutbox(): AlertOutbox & {
  readonly entries: Map<number, OutboxEntry & { status: 'pending' | 'delivered' | 'expired' }>;
} {
  const entries = new Map<number, OutboxEntry & { status: 'pending' | 'delivered' | 'expired' }>();
  let nextId = 1;
  const update = (id: number, change: Partial<OutboxEntry & { status: 'pending' | 'delivered' | 'expired' }>): void => {
    const entry = entries.get(id);
    if (entry !== undefined) entries.set(id, { ...entry, ...change });
  };
  return {
    entries,
    add({ channelId, message, createdAtMs, expiresAtMs }) {
      const id = nextId++;
      entries.set(id, {
        id,
        channelId,
        message,
        attempts: 0,
        nextAttemptAtMs: createdAtMs,
        expiresAtMs,
        status: 'pending',
      });
      return id;
    },
    due: (nowMs) => [...entries.values()].filter((e) => e.status === 'pending' && e.nextAttemptAtMs <= nowMs),
    nextDueAtMs() {
      const pending = [...entries.values()].filter((e) => e.status === 'pending').map((e) => e.nextAttemptAtMs);
      return pending.length === 0 ? undefined : Math.min(...pending);
    },
    markDelivered: (id, attempts) => update(id, { status: 'delivered', attempts }),
    markRetry: (id, attempts, error, nextAttemptAtMs) => update(id, { attempts, lastError: error, nextAttemptAtMs }),
    markExpired: (id, attempts, error) => update(id, { status: 'expired', attempts, lastError: error }),
  };
}
