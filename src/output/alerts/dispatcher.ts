// The alert dispatcher: routes flags by severity, merges checks of one rule, applies the cooldown
// per rule + control + metric, sends recovery notices, and delivers in the background with retries.
// `dispatch` never blocks or throws: failures are recorded and logged. `idle()` awaits deliveries.
import type { AlertsConfig } from '../../config/sections/alerts.js';
import { flagKey, severityRank, type QcFlag, type RecoveryNotice } from '../../qc/index.js';
import type { AlertChannel } from './alert-channel.js';
import { messageFromRecovery, messagesFromFlags, type AlertMessage } from './alert-message.js';
import type { AlertStateStore, DeliveryRecorder } from './alert-state.js';
import { deliverWithRetry, sleepMs } from './deliver-with-retry.js';
import type { AlertLogger } from './log-channel.js';

export interface DispatcherDependencies {
  readonly alerts: AlertsConfig;
  readonly channels: ReadonlyMap<string, AlertChannel>;
  readonly state: AlertStateStore;
  readonly recorder: DeliveryRecorder;
  readonly logger: AlertLogger;
  /** Clock in epoch ms (injected for tests). */
  readonly nowMs?: () => number;
  readonly sleep?: (ms: number) => Promise<void>;
}

export interface AlertDispatcher {
  /** Queues alerts for new flags and recovery notices; returns at once. Returns the messages that will be sent. */
  dispatch(flags: readonly QcFlag[], recoveries?: readonly RecoveryNotice[]): AlertMessage[];
  /** Resolves when every queued delivery has finished (delivered or failed). */
  idle(): Promise<void>;
}

/** Builds a dispatcher over configured channels, an alert state store and a delivery recorder. */
export function createAlertDispatcher(dependencies: DispatcherDependencies): AlertDispatcher {
  const { alerts, channels, state, recorder, logger } = dependencies;
  const nowMs = dependencies.nowMs ?? Date.now;
  const sleep = dependencies.sleep ?? sleepMs;
  const pending = new Set<Promise<void>>();

  const deliver = async (channel: AlertChannel, message: AlertMessage): Promise<void> => {
    const retry = alerts.channels.find((config) => config.id === channel.id) ?? { attempts: 1, backoffMs: 0, timeoutMs: 10_000 };
    const outcome = await deliverWithRetry(channel, message, retry, sleep);
    try {
      recorder.record({
        channelId: channel.id,
        key: message.key,
        type: message.type,
        severity: message.severity,
        status: outcome.status,
        attempts: outcome.attempts,
        ...(outcome.error === undefined ? {} : { error: outcome.error }),
        atMs: nowMs(),
      });
    } catch (error) {
      logger.error({ err: error instanceof Error ? error.message : String(error) }, 'could not record an alert delivery');
    }
    if (outcome.status === 'failed') {
      logger.error({ channel: channel.id, key: message.key, attempts: outcome.attempts, error: outcome.error }, `alert delivery failed on channel ${channel.id}`);
    }
  };

  const launch = (channelIds: readonly string[], message: AlertMessage): void => {
    for (const channelId of channelIds) {
      const channel = channels.get(channelId);
      if (channel === undefined) continue;
      const task = deliver(channel, message).catch((error: unknown) => {
        logger.error({ err: error instanceof Error ? error.message : String(error) }, 'alert delivery crashed');
      });
      pending.add(task);
      void task.finally(() => pending.delete(task));
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
    async idle(): Promise<void> {
      while (pending.size > 0) await Promise.allSettled([...pending]);
    },
  };
}
