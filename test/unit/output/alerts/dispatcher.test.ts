// Dispatcher: routing by severity, merging checks of one rule, cooldown, escalation, recovery
// notices, retries with exponential backoff, recorded failures, and never blocking the caller.
import { describe, expect, it } from 'vitest';
import { alertsSection } from '../../../../src/config/sections/alerts.js';
import {
  createAlertDispatcher,
  createMemoryAlertState,
  createMemoryRecorder,
  type AlertChannel,
  type AlertMessage,
} from '../../../../src/output/alerts/index.js';
import { flag, memoryLogger, recovery } from './alert-fixtures.js';

/** A channel that records messages and fails its first `failures` sends. */
function fakeChannel(id: string, failures = 0): AlertChannel & { received: AlertMessage[]; calls: number } {
  const channel = {
    id,
    type: 'fake',
    received: [] as AlertMessage[],
    calls: 0,
    send(message: AlertMessage): Promise<void> {
      channel.calls++;
      if (channel.calls <= failures) return Promise.reject(new Error(`refused ${channel.calls}`));
      channel.received.push(message);
      return Promise.resolve();
    },
  };
  return channel;
}

const alerts = alertsSection.parse({
  channels: [
    { id: 'log', type: 'log', attempts: 1 },
    { id: 'pager', type: 'log', attempts: 3, backoffMs: 100 },
  ],
  routing: { info: ['log'], warning: ['log'], critical: ['log', 'pager'] },
  cooldownMinutes: 60,
});

function setup(options: { pagerFailures?: number } = {}) {
  let clockMs = Date.UTC(2026, 2, 2, 8);
  const log = fakeChannel('log');
  const pager = fakeChannel('pager', options.pagerFailures ?? 0);
  const waits: number[] = [];
  const recorder = createMemoryRecorder();
  const logger = memoryLogger();
  const dispatcher = createAlertDispatcher({
    alerts,
    channels: new Map<string, AlertChannel>([
      ['log', log],
      ['pager', pager],
    ]),
    state: createMemoryAlertState(),
    recorder,
    logger,
    nowMs: () => clockMs,
    sleep: (ms) => {
      waits.push(ms);
      return Promise.resolve();
    },
  });
  const advanceMinutes = (minutes: number): void => {
    clockMs += minutes * 60_000;
  };
  return { dispatcher, log, pager, waits, recorder, logger, advanceMinutes };
}

describe('alert dispatcher', () => {
  it('routes by severity', async () => {
    const { dispatcher, log, pager } = setup();
    dispatcher.dispatch([flag('a', 'warning', '1-2s'), flag('b', 'critical')]);
    await dispatcher.idle();
    expect(log.received.map((m) => m.ruleId).sort()).toEqual(['a', 'b']);
    expect(pager.received.map((m) => m.ruleId)).toEqual(['b']);
  });

  it('merges checks of one rule + control + metric into one message', async () => {
    const { dispatcher, log } = setup();
    dispatcher.dispatch([flag('w', 'critical', '2-2s'), flag('w', 'critical', '4-1s')]);
    await dispatcher.idle();
    expect(log.received).toHaveLength(1);
    expect(log.received[0]?.checks).toEqual(['2-2s', '4-1s']);
  });

  it('does not re-send the same rule + control + metric within cooldownMinutes, but does after', async () => {
    const { dispatcher, log, advanceMinutes } = setup();
    dispatcher.dispatch([flag('w', 'warning')]);
    advanceMinutes(59);
    expect(dispatcher.dispatch([flag('w', 'warning')])).toEqual([]);
    advanceMinutes(2);
    expect(dispatcher.dispatch([flag('w', 'warning')])).toHaveLength(1);
    await dispatcher.idle();
    expect(log.received).toHaveLength(2);
  });

  it('an escalation (warning → critical) is sent inside the cooldown', () => {
    const { dispatcher, advanceMinutes } = setup();
    dispatcher.dispatch([flag('w', 'warning')]);
    advanceMinutes(5);
    expect(dispatcher.dispatch([flag('w', 'critical')]).map((m) => m.severity)).toEqual(['critical']);
  });

  it('sends a recovery notice to the channels that got the alert, then re-arms the key', async () => {
    const { dispatcher, log, pager, advanceMinutes } = setup();
    dispatcher.dispatch([flag('w', 'critical')]);
    advanceMinutes(10);
    dispatcher.dispatch([], [recovery('w'), recovery('never-alerted')]);
    await dispatcher.idle();
    expect(pager.received.map((m) => m.type)).toEqual(['flag', 'recovery']);
    expect(log.received.map((m) => m.type)).toEqual(['flag', 'recovery']);
    advanceMinutes(1);
    expect(dispatcher.dispatch([flag('w', 'critical')])).toHaveLength(1);
  });

  it('retries with exponential backoff and records the outcome', async () => {
    const { dispatcher, pager, waits, recorder } = setup({ pagerFailures: 2 });
    dispatcher.dispatch([flag('w', 'critical')]);
    await dispatcher.idle();
    expect(pager.calls).toBe(3);
    expect(waits).toEqual([100, 200]);
    expect(recorder.records.find((r) => r.channelId === 'pager')).toMatchObject({ status: 'delivered', attempts: 3 });
  });

  it('records and logs a delivery that fails every attempt', async () => {
    const { dispatcher, recorder, logger } = setup({ pagerFailures: 99 });
    dispatcher.dispatch([flag('w', 'critical')]);
    await dispatcher.idle();
    expect(recorder.records.find((r) => r.channelId === 'pager')).toMatchObject({
      status: 'failed',
      attempts: 3,
      error: 'refused 3',
    });
    expect(logger.lines.some((line) => line.level === 'error' && line.message.includes('pager'))).toBe(true);
  });

  it('a channel that never answers does not delay dispatch or the next alert; its attempt is aborted', async () => {
    // Behaviour, not elapsed time: the channel keeps each call's signal; alerts of rule "hang" never settle.
    const calls: { ruleId: string; signal: AbortSignal; hangAbortedAtCall: boolean[] }[] = [];
    const hanging: AlertChannel = {
      id: 'log',
      type: 'hang',
      send: (message, signal) => {
        calls.push({
          ruleId: message.ruleId,
          signal,
          hangAbortedAtCall: calls.filter((c) => c.ruleId === 'hang').map((c) => c.signal.aborted),
        });
        return message.ruleId === 'hang' ? new Promise<void>(() => undefined) : Promise.resolve();
      },
    };
    const recorder = createMemoryRecorder();
    const dispatcher = createAlertDispatcher({
      alerts: alertsSection.parse({ channels: [{ id: 'log', type: 'log', attempts: 1, timeoutMs: 150 }] }),
      channels: new Map([['log', hanging]]),
      state: createMemoryAlertState(),
      recorder,
      logger: memoryLogger(),
    });
    expect(dispatcher.dispatch([flag('hang', 'critical')])).toHaveLength(1);
    // dispatch returned with the send under way and no outcome yet: the caller did not wait for it.
    expect(calls.map((c) => c.ruleId)).toEqual(['hang']);
    expect(recorder.records).toEqual([]);
    dispatcher.dispatch([flag('next', 'critical')]);
    // The next alert was handed to the channel while the first send still hung (its signal not yet aborted).
    expect(calls.map((c) => [c.ruleId, c.hangAbortedAtCall])).toEqual([
      ['hang', []],
      ['next', [false]],
    ]);
    await dispatcher.idle();
    // The time limit fired the hanging attempt's abort signal, with the limit as its reason, and the
    // delivery is recorded as failed with that cause; the next alert was delivered.
    expect(calls[0]?.signal.aborted).toBe(true);
    expect(String(calls[0]?.signal.reason)).toContain('timed out after 150 ms');
    expect(recorder.records.find((r) => r.key.startsWith('hang|'))).toMatchObject({
      status: 'failed',
      error: 'timed out after 150 ms',
    });
    expect(recorder.records.find((r) => r.key.startsWith('next|'))).toMatchObject({ status: 'delivered', attempts: 1 });
  });
});
