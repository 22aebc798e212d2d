// What the dispatcher remembers between results: when each rule + control + metric was last alerted
// (cooldown) and at which severity and on which channels (for the recovery notice); and where
// delivery outcomes are recorded. In-memory versions here; src/store/qc-store.ts persists both.
import type { StoredDelivery, StoredSentAlert } from '../../store/qc-store.js';

/** The last alert sent for a rule + control + metric key (the ledger stores the same shape). */
export type SentAlert = StoredSentAlert;

export interface AlertStateStore {
  /** The last alert sent for a key and not yet closed by a recovery. */
  lastSent(key: string): SentAlert | undefined;
  markSent(alert: SentAlert): void;
  /** Forgets a key (after its recovery notice), so a new occurrence alerts at once. */
  clear(key: string): void;
}

/** One delivery outcome: channel, key, delivered or failed, attempts, error, time (the ledger stores the same shape). */
export type DeliveryRecord = StoredDelivery;

export interface DeliveryRecorder {
  record(delivery: DeliveryRecord): void;
}

/** Alert state held in memory (tests, `rules simulate`). */
export function createMemoryAlertState(): AlertStateStore & { readonly entries: Map<string, SentAlert> } {
  const entries = new Map<string, SentAlert>();
  return {
    entries,
    lastSent: (key) => entries.get(key),
    markSent: (alert) => void entries.set(alert.key, alert),
    clear: (key) => void entries.delete(key),
  };
}

/** Delivery records held in memory. */
export function createMemoryRecorder(): DeliveryRecorder & { readonly records: DeliveryRecord[] } {
  const records: DeliveryRecord[] = [];
  return { records, record: (delivery) => void records.push(delivery) };
}
