// What the dispatcher remembers between results: when each rule + control + metric was last alerted
// (cooldown) and at which severity and on which channels (for the recovery notice); and where
// delivery outcomes are recorded. In-memory versions here; src/store/qc-store.ts persists both.
import type { Severity } from '../../qc/index.js';

export interface SentAlert {
  readonly key: string;
  readonly sentAtMs: number;
  readonly severity: Severity;
  readonly channelIds: readonly string[];
}

export interface AlertStateStore {
  /** The last alert sent for a key and not yet closed by a recovery. */
  lastSent(key: string): SentAlert | undefined;
  markSent(alert: SentAlert): void;
  /** Forgets a key (after its recovery notice), so a new occurrence alerts at once. */
  clear(key: string): void;
}

export interface DeliveryRecord {
  readonly channelId: string;
  readonly key: string;
  readonly type: 'flag' | 'recovery';
  readonly severity: Severity;
  readonly status: 'delivered' | 'failed';
  readonly attempts: number;
  readonly error?: string;
  readonly atMs: number;
}

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
