// The alert dispatcher: routes flags by severity, merges checks of one rule, applies the cooldown
// per rule + control + metric, sends recovery notices, and delivers in the background with retries.
// Every delivery goes through the outbox first (durable in the ledger): a burst of the channel's
// attempts at once, then one attempt whenever `retryDue()` finds it due (watch calls it every
// minute), the wait doubling up to alerts.maxRetryIntervalMinutes, until it is delivered or
// alerts.deliveryExpiryHours have passed (then recorded as expired and logged as an error).
// `dispatch` never blocks or throws: failures are recorded and logged. `idle()` awaits deliveries.
import type { AlertsConfig } from '../../config/sections/alerts.js';
import { flagKey, severityRank, type QcFlag, type RecoveryNotice } from '../../qc/index.js';
import type { AlertChannel } from './alert-channel.js';
import { messageFromRecovery, messagesFromFlags, type AlertMessage } from './alert-message.js';
import type { AlertStateStore, DeliveryRecorder } from './alert-state.js';
import { createMemoryOutbox, type AlertOutbox } from './alert-outbox.js';
import { deliverWithRetry, sleepMs } from './deliver-with-retry.js';
import type { AlertLogger } from './log-channel.js';
import { exponentialBackoffMs } from '../../queue/backoff.js';

export interface DispatcherDependencies {
  readonly alerts: AlertsConfig;
  readonly channels: ReadonlyMap<string, AlertChannel>;
  readonly state: AlertStateStore;
  readonly recorder: DeliveryRecorder;
  readonly logger: AlertLogger;
  /** Where deliveries wait until delivered or expired; default in memory (the pipeline passes the ledger's). */
  readonly outbox?: AlertOutbox;
  /** Clock in epoch ms (injected for tests). */
  readonly nowMs?: () => number;
  readonly sleep?: (ms: number) => Promise<void>;
}

export interface AlertDispatcher {
  /** Queues alerts for new flags and recovery notices; returns at once. Returns the messages that will be sent. */
  dispatch(flags: readonly QcFlag[], recoveries?: readonly RecoveryNotice[]): AlertMessage[];
  /** Tries again every outbox delivery that is due (and expires those past their time); returns at once. Optional so test doubles need not have it. */
  retryDue?(): void;
  /** Resolves when every delivery attempt under way has finished (delivered, or waiting in the outbox for its next attempt). */
  idle(): Promise<void>;
}

/** Builds a dispatcher over configured channels, an alert state store and a delivery recorder. */
export function createAlertDispatcher(
  dependencies: DispatcherDependencies,
): AlertDispatcher & Required<Pick<AlertDispatcher, 'retryDue'>> {
  const { alerts, channels, state, recorder, logger } = dependencies;
  const nowMs = dependencies.nowMs ?? Date.now;
  const sleep = dependencies.sleep ?? sleepMs;
  const pending = new Set<Promise<void>>();

  const outbox = dependencies.outbox ?? createMemoryOutbox();
  const expiryMs = alerts.deliveryExpiryHours * 3_600_000;
  const maxIntervalMs = alerts.maxRetryIntervalMinutes * 60_000;
  const inFlight = new Set<number>();

  /** One delivery of the outbox: a burst of the channel's attempts when new, else one attempt; then delivered, rescheduled or expired. */
  const deliver = async (
    entry: { id: number; channelId: string; message: AlertMessage; attempts: number; expiresAtMs: number },
    fresh: boolean,
  ): Promise<void> => {
    const channel = channels.get(entry.channelId);
    if (channel === undefined) {
      outbox.markExpired(entry.id, entry.attempts, `channel ${entry.channelId} is no longer configured`, nowMs());
      logger.error(
        { channel: entry.channelId, key: entry.message.key },
        `alert not delivered: channel ${entry.channelId} is no longer configured`,
      );
      return;
    }
    const policy = alerts.channels.find((config) => config.id === channel.id) ?? {
      attempts: 1,
      backoffMs: 0,
      timeoutMs: 10_000,
    };
    const outcome = await deliverWithRetry(channel, entry.message, fresh ? policy : { ...policy, attempts: 1 }, sleep);
    const attempts = entry.attempts + outcome.attempts;
    const now = nowMs();
    try {
      recorder.record({
        channelId: channel.id,
        key: entry.message.key,
        type: entry.message.type,
        severity: entry.message.severity,
        status: outcome.status,
        attempts,
        ...(outcome.error === undefined ? {} : { error: outcome.error }),
        atMs: now,
      });
    } catch (error) {
      logger.error(
        { err: error instanceof Error ? error.message : String(error) },
        'could not record an alert delivery',
      );
    }
    if (outcome.status === 'delivered') {
      outbox.markDelivered(entry.id, attempts, now);
      if (!fresh)
        logger.info(
          { channel: channel.id, key: entry.message.key, attempts },
          `alert delivered on channel ${channel.id} after ${attempts} attempts`,
        );
      return;
    }
    const error = outcome.error ?? 'unknown error';
    const waitMs = exponentialBackoffMs(Math.max(policy.backoffMs, 1000), attempts, maxIntervalMs);
    if (now + waitMs > entry.expiresAtMs) {
      outbox.markExpired(entry.id, attempts, error, now);
      logger.error(
        { channel: channel.id, key: entry.message.key, attempts, error },
        `alert delivery on channel ${channel.id} expired after ${attempts} attempts; it was not delivered`,
      );
      return;
    }
    const nextAttemptAtMs = now + waitMs;
    outbox.markRetry(entry.id, attempts, error, nextAttemptAtMs);
    logger.error(
      {
        channel: channel.id,
        key: entry.message.key,
        attempts,
        error,
        nextAttemptAt: new Date(nextAttemptAtMs).toISOString(),
      },
      `alert delivery failed on channel ${channel.id}; it stays in the outbox and is tried again until delivered or expired`,
    );
  };

  const start = (entry: Parameters<typeof deliver>[0], fresh: boolean): void => {
    if (inFlight.has(entry.id)) return;
    inFlight.add(entry.id);
    const task = deliver(entry, fresh).catch((error: unknown) => {
      logger.error({ err: error instanceof Error ? error.message : String(error) }, 'alert delivery crashed');
    });
    pending.add(task);
    void task.finally(() => {
      pending.delete(task);
      inFlight.delete(entry.id);
    });
  };

  const launch = (channelIds: readonly string[], message: AlertMessage): void => {
    const now = nowMs();
    for (const channelId of channelIds) {
      if (!channels.has(channelId)) continue;
      const expiresAtMs = now + expiryMs;
      const id = outbox.add({ channelId, message, createdAtMs: now, expiresAtMs });
      start({ id, channelId, message, attempts: 0, expiresAtMs }, true);
    }
  };

  return {
    dispatch(flags, recoveries = []): AlertMessage[] {
      const sent: AlertMessage[] = [];
      try {
        const now = nowMs();
        const createdAt = new Date(now).toISOString();
        const cooldownMs = alerts.cooldownMinutes * 60_000;
        for (const message of messagesFromFlags(flags, createdAt)) {
          const previous = state.lastSent(message.key);
          const escalated = previous !== undefined && severityRank(message.severity) > severityRank(previous.severity);
          if (previous !== undefined && now - previous.sentAtMs < cooldownMs && !escalated) continue;
          const channelIds = alerts.routing[message.severity];
          state.markSent({ key: message.key, sentAtMs: now, severity: message.severity, channelIds });
          launch(channelIds, message);
          sent.push(message);
        }
        for (const notice of recoveries) {
          const key = flagKey(notice);
          const previous = state.lastSent(key);
          if (previous === undefined) continue;
          state.clear(key);
          if (!alerts.recoveryNotices) continue;
          const message = messageFromRecovery(notice, previous.severity, createdAt);
          launch(previous.channelIds, message);
          sent.push(message);
        }
      } catch (error) {
        logger.error({ err: error instanceof Error ? error.message : String(error) }, 'alert dispatch failed');
      }
      return sent;
    },
    retryDue(): void {
      try {
        for (const entry of outbox.due(nowMs())) start(entry, false);
      } catch (error) {
        logger.error(
          { err: error instanceof Error ? error.message : String(error) },
          'could not read the alert outbox',
        );
      }
    },
    async idle(): Promise<void> {
      while (pending.size > 0) await Promise.allSettled([...pending]);
    },
  };
}
